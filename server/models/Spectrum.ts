import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { SpectrumStatus } from '../../shared/status'

export class Spectrum extends Model<InferAttributes<Spectrum>, InferCreationAttributes<Spectrum>> {
  declare id: CreationOptional<number>
  declare campaignId: number
  declare submittedBy: number
  declare batchId: string | null
  declare status: CreationOptional<SpectrumStatus>
  declare statusReason: string | null
  /** Calls asked for beyond the campaign's number, when a lead sends a dispute to another classifier. */
  declare extraCalls: CreationOptional<number>
  declare objectName: string
  declare raDeg: number | null
  declare decDeg: number | null
  declare obsDate: Date | null
  declare exposureS: number | null
  /** The instrument setup as the observer or the file header wrote it. */
  declare instrument: string
  /** The campaign's instrument record the spectrum was taken with (instruments). */
  declare instrumentId: CreationOptional<number | null>
  declare resolutionFwhm: number | null
  declare resolvingPower: number | null
  declare vMag: number | null
  declare parallaxMas: number | null
  declare parallaxErrorMas: number | null
  declare ebv: number | null
  declare notes: string
  declare fileName: string
  declare fileSha256: string
  declare fileSize: number
  declare format: string
  declare hdu: number | null
  declare pixels: number
  declare wlMin: number
  declare wlMax: number
  declare dispersion: number
  declare snr: number | null
  /** Flags of the current suggestion (0 without one); the review queue orders by it. */
  declare flagCount: CreationOptional<number>
  declare vacuumConverted: boolean
  /** JSON: the reader's metadata (header keywords, units, notes, HDUs). */
  declare readInfo: string
  /** JSON ReadChoices: how the observer asked for the file to be read. */
  declare readChoices: CreationOptional<string>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    // A fresh object per attribute: Sequelize writes into attribute definitions.
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: true })
    Spectrum.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        submittedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        batchId: { type: DataTypes.CHAR(36), allowNull: true },
        status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'received' },
        extraCalls: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
        statusReason: { type: DataTypes.TEXT, allowNull: true },
        objectName: { type: DataTypes.STRING(120), allowNull: false },
        raDeg: num(),
        decDeg: num(),
        obsDate: { type: DataTypes.DATE(3), allowNull: true },
        exposureS: num(),
        instrument: { type: DataTypes.STRING(160), allowNull: false },
        instrumentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, defaultValue: null },
        resolutionFwhm: num(),
        resolvingPower: num(),
        vMag: num(),
        parallaxMas: num(),
        parallaxErrorMas: num(),
        ebv: num(),
        notes: { type: DataTypes.TEXT, allowNull: false },
        fileName: { type: DataTypes.STRING(255), allowNull: false },
        fileSha256: { type: DataTypes.CHAR(64), allowNull: false },
        fileSize: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        format: { type: DataTypes.STRING(16), allowNull: false },
        hdu: { type: DataTypes.INTEGER, allowNull: true },
        pixels: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        wlMin: { type: DataTypes.DOUBLE, allowNull: false },
        wlMax: { type: DataTypes.DOUBLE, allowNull: false },
        dispersion: { type: DataTypes.DOUBLE, allowNull: false },
        snr: num(),
        flagCount: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
        vacuumConverted: { type: DataTypes.BOOLEAN, allowNull: false },
        readInfo: { type: DataTypes.TEXT('medium'), allowNull: false },
        readChoices: { type: DataTypes.STRING(255), allowNull: false, defaultValue: '{}' },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'spectra', indexes: [{ unique: true, fields: ['campaign_id', 'file_sha256'], name: 'spectra_campaign_file' }] },
    )
  }
}

/** The uploaded bytes and the parsed arrays, kept apart from the row so listings stay light. */
export class SpectrumBlob extends Model<InferAttributes<SpectrumBlob>, InferCreationAttributes<SpectrumBlob>> {
  declare spectrumId: number
  /** The uploaded file, for rows written before files moved to the file store. */
  declare raw: Buffer | null
  /** The uploaded file's key in the file store. */
  declare rawKey: string | null
  /** float64 little-endian, Å air. */
  declare wavelength: Buffer
  /** float32 little-endian. */
  declare flux: Buffer
  declare error: Buffer | null
  /** uint8, 1 = unusable pixel. */
  declare mask: Buffer | null

  static initModel(sequelize: Sequelize): void {
    SpectrumBlob.init(
      {
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        raw: { type: DataTypes.BLOB('long'), allowNull: true },
        rawKey: { type: DataTypes.STRING(200), allowNull: true },
        wavelength: { type: DataTypes.BLOB('long'), allowNull: false },
        flux: { type: DataTypes.BLOB('long'), allowNull: false },
        error: { type: DataTypes.BLOB('long'), allowNull: true },
        mask: { type: DataTypes.BLOB('long'), allowNull: true },
      },
      { sequelize, tableName: 'spectrum_blobs', timestamps: false },
    )
  }
}

const refuseChange = () => {
  throw new Error('Spectrum events are history: written once, never changed or removed')
}

export type SpectrumEventKind = 'reread' | 'reprocess' | 'withdrawn'

/** Something done to a spectrum that is not a call: a reading correction, a re-run, a withdrawal. Never updated. */
export class SpectrumEvent extends Model<InferAttributes<SpectrumEvent>, InferCreationAttributes<SpectrumEvent>> {
  declare id: CreationOptional<number>
  /** No foreign key: the record of a withdrawal outlives the spectrum. */
  declare spectrumId: number
  declare campaignId: number
  declare kind: SpectrumEventKind
  declare userId: number | null
  declare summary: string
  /** JSON: what was before and after. */
  declare details: string
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    SpectrumEvent.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        campaignId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        summary: { type: DataTypes.TEXT, allowNull: false },
        details: { type: DataTypes.TEXT('medium'), allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      {
        sequelize,
        tableName: 'spectrum_events',
        updatedAt: false,
        hooks: {
          beforeUpdate: refuseChange,
          beforeBulkUpdate: refuseChange,
          beforeDestroy: refuseChange,
          beforeBulkDestroy: refuseChange,
        },
      },
    )
  }
}
