import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A personal API token; only its SHA-256 is stored. It acts with its owner's role. */
export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<number>
  declare userId: number
  declare name: string
  declare tokenHash: string
  declare prefix: string
  declare expiresAt: Date | null
  declare lastUsedAt: CreationOptional<Date | null>
  declare lastUsedIp: CreationOptional<string | null>
  declare uses: CreationOptional<number>
  declare revokedAt: CreationOptional<Date | null>
  declare revokedBy: CreationOptional<number | null>
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    ApiToken.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        name: { type: DataTypes.STRING(80), allowNull: false },
        tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        prefix: { type: DataTypes.STRING(16), allowNull: false },
        expiresAt: { type: DataTypes.DATE(3), allowNull: true },
        lastUsedAt: { type: DataTypes.DATE(3), allowNull: true },
        lastUsedIp: { type: DataTypes.STRING(64), allowNull: true },
        uses: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        revokedAt: { type: DataTypes.DATE(3), allowNull: true },
        revokedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'api_tokens', updatedAt: false },
    )
  }
}
