import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

export type JobStatus = 'queued' | 'running' | 'done' | 'failed'

/** One run of the pipeline over one spectrum; the table is the queue, so a restart resumes it. */
export class ProcessingJob extends Model<InferAttributes<ProcessingJob>, InferCreationAttributes<ProcessingJob>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare status: CreationOptional<JobStatus>
  declare attempts: CreationOptional<number>
  declare error: string | null
  declare requestedBy: number | null
  declare createdAt: CreationOptional<Date>
  declare startedAt: Date | null
  declare finishedAt: Date | null
  /** While running: when the runner's hold lapses unless renewed; an expired job goes back to the queue. */
  declare leaseExpiresAt: CreationOptional<Date | null>

  static initModel(sequelize: Sequelize): void {
    ProcessingJob.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        error: { type: DataTypes.TEXT, allowNull: true },
        requestedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE(3),
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        leaseExpiresAt: { type: DataTypes.DATE(3), allowNull: true, defaultValue: null },
      },
      { sequelize, tableName: 'processing_jobs', updatedAt: false },
    )
  }
}

/** The prepared spectrum and its headline figures; older runs stay, with isCurrent false. */
export class Measurement extends Model<InferAttributes<Measurement>, InferCreationAttributes<Measurement>> {
  declare id: CreationOptional<number>
  declare spectrumId: number
  declare pipelineVersion: string
  declare isCurrent: boolean
  declare snr: number | null
  declare rv: number | null
  declare rvError: number | null
  declare pseudoContinuum: boolean
  /** JSON string[] */
  declare warnings: string
  /** JSON LineRatio[] */
  declare ratios: string
  declare gridStart: number
  declare gridStep: number
  declare gridLength: number
  /** float32 LE on the grid */
  declare flux: Buffer
  declare continuum: Buffer
  declare rectified: Buffer
  /** uint8 on the grid */
  declare mask: Buffer
  declare seconds: number
  declare createdAt: CreationOptional<Date>

  static initModel(sequelize: Sequelize): void {
    const blob = () => ({ type: DataTypes.BLOB('medium'), allowNull: false })
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: true })
    Measurement.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        spectrumId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        pipelineVersion: { type: DataTypes.STRING(20), allowNull: false },
        isCurrent: { type: DataTypes.BOOLEAN, allowNull: false },
        snr: num(),
        rv: num(),
        rvError: num(),
        pseudoContinuum: { type: DataTypes.BOOLEAN, allowNull: false },
        warnings: { type: DataTypes.TEXT, allowNull: false },
        ratios: { type: DataTypes.TEXT('medium'), allowNull: false },
        gridStart: { type: DataTypes.DOUBLE, allowNull: false },
        gridStep: { type: DataTypes.DOUBLE, allowNull: false },
        gridLength: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        flux: blob(),
        continuum: blob(),
        rectified: blob(),
        mask: blob(),
        seconds: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'measurements', updatedAt: false },
    )
  }
}

/** One line of the line table as measured in one run. */
export class LineMeasurementRow extends Model<InferAttributes<LineMeasurementRow>, InferCreationAttributes<LineMeasurementRow>> {
  declare id: CreationOptional<number>
  declare measurementId: number
  declare lineId: string
  declare measured: boolean
  declare reason: string | null
  declare ew: number | null
  declare ewError: number | null
  declare depth: number | null
  declare fwhm: number | null
  declare centroid: number | null
  declare snr: number | null
  declare gaussianFwhm: number | null
  declare lorentzianFwhm: number | null
  declare lorentzianError: number | null

  static initModel(sequelize: Sequelize): void {
    const num = () => ({ type: DataTypes.DOUBLE, allowNull: true })
    LineMeasurementRow.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        measurementId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        lineId: { type: DataTypes.STRING(32), allowNull: false },
        measured: { type: DataTypes.BOOLEAN, allowNull: false },
        reason: { type: DataTypes.STRING(200), allowNull: true },
        ew: num(),
        ewError: num(),
        depth: num(),
        fwhm: num(),
        centroid: num(),
        snr: num(),
        gaussianFwhm: num(),
        lorentzianFwhm: num(),
        lorentzianError: num(),
      },
      { sequelize, tableName: 'line_measurements', timestamps: false },
    )
  }
}
