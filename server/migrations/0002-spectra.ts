import { DataTypes, type QueryInterface } from 'sequelize'

export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('spectra', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    campaign_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'campaigns', key: 'id' } },
    submitted_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' } },
    batch_id: { type: DataTypes.CHAR(36), allowNull: true },
    status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'received' },
    status_reason: { type: DataTypes.TEXT, allowNull: true },
    object_name: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
    ra_deg: { type: DataTypes.DOUBLE, allowNull: true },
    dec_deg: { type: DataTypes.DOUBLE, allowNull: true },
    obs_date: { type: DataTypes.DATE(3), allowNull: true },
    exposure_s: { type: DataTypes.DOUBLE, allowNull: true },
    instrument: { type: DataTypes.STRING(160), allowNull: false, defaultValue: '' },
    resolution_fwhm: { type: DataTypes.DOUBLE, allowNull: true },
    resolving_power: { type: DataTypes.DOUBLE, allowNull: true },
    v_mag: { type: DataTypes.DOUBLE, allowNull: true },
    parallax_mas: { type: DataTypes.DOUBLE, allowNull: true },
    parallax_error_mas: { type: DataTypes.DOUBLE, allowNull: true },
    ebv: { type: DataTypes.DOUBLE, allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false },
    file_name: { type: DataTypes.STRING(255), allowNull: false },
    file_sha256: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    file_size: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    format: { type: DataTypes.STRING(16), allowNull: false },
    hdu: { type: DataTypes.INTEGER, allowNull: true },
    pixels: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    wl_min: { type: DataTypes.DOUBLE, allowNull: false },
    wl_max: { type: DataTypes.DOUBLE, allowNull: false },
    dispersion: { type: DataTypes.DOUBLE, allowNull: false },
    snr: { type: DataTypes.DOUBLE, allowNull: true },
    vacuum_converted: { type: DataTypes.BOOLEAN, allowNull: false },
    read_info: { type: DataTypes.TEXT('medium'), allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    updated_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('spectra', ['campaign_id', 'status'])
  await q.addIndex('spectra', ['submitted_by'])
  await q.addIndex('spectra', ['object_name'])
  await q.createTable('spectrum_blobs', {
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    raw: { type: DataTypes.BLOB('long'), allowNull: false },
    wavelength: { type: DataTypes.BLOB('long'), allowNull: false },
    flux: { type: DataTypes.BLOB('long'), allowNull: false },
    error: { type: DataTypes.BLOB('long'), allowNull: true },
    mask: { type: DataTypes.BLOB('long'), allowNull: true },
  })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.dropTable('spectrum_blobs')
  await q.dropTable('spectra')
}
