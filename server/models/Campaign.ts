import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** An observing or classification programme: its review rules and its people. */
export class Campaign extends Model<InferAttributes<Campaign>, InferCreationAttributes<Campaign>> {
  declare id: CreationOptional<number>
  declare code: string
  declare name: string
  declare description: CreationOptional<string>
  declare observatory: CreationOptional<string>
  declare regionMin: CreationOptional<number>
  declare regionMax: CreationOptional<number>
  declare callsRequired: CreationOptional<number>
  declare blindReview: CreationOptional<boolean>
  declare typeTolerance: CreationOptional<number>
  declare classTolerance: CreationOptional<number>
  /** Optional target date (YYYY-MM-DD) for the campaign's review. */
  declare deadline: CreationOptional<string | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    Campaign.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        code: { type: DataTypes.STRING(32), allowNull: false, unique: true },
        name: { type: DataTypes.STRING(160), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        observatory: { type: DataTypes.STRING(160), allowNull: false, defaultValue: '' },
        regionMin: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 3850 },
        regionMax: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 5000 },
        callsRequired: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 1 },
        blindReview: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        typeTolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
        classTolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
        deadline: { type: DataTypes.DATEONLY, allowNull: true, defaultValue: null },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'campaigns' },
    )
  }
}

export class CampaignMember extends Model<InferAttributes<CampaignMember>, InferCreationAttributes<CampaignMember>> {
  declare campaignId: number
  declare userId: number
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    CampaignMember.init(
      {
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'campaign_members', updatedAt: false },
    )
  }
}
