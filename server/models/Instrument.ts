import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A spectrograph setup of one campaign: spectra and standards are grouped by it. */
export class Instrument extends Model<InferAttributes<Instrument>, InferCreationAttributes<Instrument>> {
  declare id: CreationOptional<number>
  declare campaignId: number
  declare name: string
  /** Resolution, FWHM Å; a spectrum that gives none is matched at it. */
  declare resolutionFwhm: number | null
  /** Wavelength coverage, Å (air). */
  declare wlMin: number | null
  declare wlMax: number | null
  /** S/N a decided spectrum needs to be proposed as one of the instrument's standards. */
  declare candidateMinSnr: CreationOptional<number>
  declare notes: CreationOptional<string>
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    Instrument.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        resolutionFwhm: { type: DataTypes.DOUBLE, allowNull: true },
        wlMin: { type: DataTypes.DOUBLE, allowNull: true },
        wlMax: { type: DataTypes.DOUBLE, allowNull: true },
        candidateMinSnr: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 40 },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'instruments', indexes: [{ unique: true, fields: ['campaign_id', 'name'], name: 'instruments_campaign_name' }] },
    )
  }
}
