import { DataTypes, type QueryInterface } from 'sequelize'

export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('processing_jobs', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    error: { type: DataTypes.TEXT, allowNull: true },
    requested_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
  })
  await q.addIndex('processing_jobs', ['status', 'id'])
  await q.addIndex('processing_jobs', ['spectrum_id'])
  await q.createTable('measurements', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    pipeline_version: { type: DataTypes.STRING(20), allowNull: false },
    is_current: { type: DataTypes.BOOLEAN, allowNull: false },
    snr: { type: DataTypes.DOUBLE, allowNull: true },
    rv: { type: DataTypes.DOUBLE, allowNull: true },
    rv_error: { type: DataTypes.DOUBLE, allowNull: true },
    pseudo_continuum: { type: DataTypes.BOOLEAN, allowNull: false },
    warnings: { type: DataTypes.TEXT, allowNull: false },
    ratios: { type: DataTypes.TEXT('medium'), allowNull: false },
    grid_start: { type: DataTypes.DOUBLE, allowNull: false },
    grid_step: { type: DataTypes.DOUBLE, allowNull: false },
    grid_length: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    flux: { type: DataTypes.BLOB('medium'), allowNull: false },
    continuum: { type: DataTypes.BLOB('medium'), allowNull: false },
    rectified: { type: DataTypes.BLOB('medium'), allowNull: false },
    mask: { type: DataTypes.BLOB('medium'), allowNull: false },
    seconds: { type: DataTypes.DOUBLE, allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('measurements', ['spectrum_id', 'is_current'])
  await q.createTable('line_measurements', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    measurement_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'measurements', key: 'id' }, onDelete: 'CASCADE' },
    line_id: { type: DataTypes.STRING(32), allowNull: false },
    measured: { type: DataTypes.BOOLEAN, allowNull: false },
    reason: { type: DataTypes.STRING(200), allowNull: true },
    ew: { type: DataTypes.DOUBLE, allowNull: true },
    ew_error: { type: DataTypes.DOUBLE, allowNull: true },
    depth: { type: DataTypes.DOUBLE, allowNull: true },
    fwhm: { type: DataTypes.DOUBLE, allowNull: true },
    centroid: { type: DataTypes.DOUBLE, allowNull: true },
    snr: { type: DataTypes.DOUBLE, allowNull: true },
    gaussian_fwhm: { type: DataTypes.DOUBLE, allowNull: true },
    lorentzian_fwhm: { type: DataTypes.DOUBLE, allowNull: true },
    lorentzian_error: { type: DataTypes.DOUBLE, allowNull: true },
  })
  await q.addIndex('line_measurements', ['measurement_id'])
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.dropTable('line_measurements')
  await q.dropTable('measurements')
  await q.dropTable('processing_jobs')
}
