import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Instruments become records of their campaign (name, resolution, wavelength coverage, the S/N a
 * spectrum needs to be proposed as one of its standards), and a spectrum names its instrument.
 * Spectra already stored get one instrument per campaign and distinct instrument setup they give,
 * with the wavelengths those spectra cover; its resolution is left for a lead to fill in.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('instruments', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    campaign_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'campaigns', key: 'id' }, onDelete: 'CASCADE' },
    name: { type: DataTypes.STRING(120), allowNull: false },
    resolution_fwhm: { type: DataTypes.DOUBLE, allowNull: true },
    wl_min: { type: DataTypes.DOUBLE, allowNull: true },
    wl_max: { type: DataTypes.DOUBLE, allowNull: true },
    candidate_min_snr: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 40 },
    notes: { type: DataTypes.TEXT, allowNull: false },
    created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    updated_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('instruments', ['campaign_id', 'name'], { unique: true, name: 'instruments_campaign_name' })
  await q.addColumn('spectra', 'instrument_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'instruments', key: 'id' }, onDelete: 'SET NULL' })
  await q.addIndex('spectra', ['instrument_id'], { name: 'spectra_instrument_id' })
  await q.sequelize.query(
    `INSERT INTO instruments (campaign_id, name, resolution_fwhm, wl_min, wl_max, candidate_min_snr, notes, created_by, created_at, updated_at)
     SELECT campaign_id, LEFT(instrument, 120), NULL, MIN(wl_min), MAX(wl_max), 40, 'Made from the instrument setup the uploaded spectra gave.', NULL, NOW(3), NOW(3)
     FROM spectra WHERE instrument <> '' GROUP BY campaign_id, LEFT(instrument, 120)`,
  )
  await q.sequelize.query('UPDATE spectra s JOIN instruments i ON i.campaign_id = s.campaign_id AND i.name = LEFT(s.instrument, 120) SET s.instrument_id = i.id')
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeIndex('spectra', 'spectra_instrument_id')
  await q.removeColumn('spectra', 'instrument_id')
  await q.dropTable('instruments')
}
