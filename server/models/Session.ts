import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** express-session rows (connect-session-sequelize); userId lets a deactivation end them at once. */
export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
  declare sid: string
  declare userId: number | null
  declare expires: Date | null
  declare data: string
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    Session.init(
      {
        sid: { type: DataTypes.STRING(64), primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        expires: { type: DataTypes.DATE(3), allowNull: true },
        data: { type: DataTypes.TEXT, allowNull: false },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'sessions' },
    )
  }
}
