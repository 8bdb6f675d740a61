import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A mail as the local SMTP fake received it. */
export class MailMessage extends Model<InferAttributes<MailMessage>, InferCreationAttributes<MailMessage>> {
  declare id: CreationOptional<number>
  declare fromAddress: string
  declare toAddresses: string
  declare subject: string
  declare text: string
  declare html: string | null
  declare raw: string
  declare receivedAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    MailMessage.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        fromAddress: { type: DataTypes.STRING(320), allowNull: false },
        toAddresses: { type: DataTypes.STRING(2000), allowNull: false },
        subject: { type: DataTypes.STRING(500), allowNull: false },
        text: { type: DataTypes.TEXT('medium'), allowNull: false },
        html: { type: DataTypes.TEXT('medium'), allowNull: true },
        raw: { type: DataTypes.TEXT('medium'), allowNull: false },
        receivedAt: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'mail_messages', timestamps: false },
    )
  }
}
