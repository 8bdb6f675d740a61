import { DataTypes, type QueryInterface } from 'sequelize'

/** Indexes named here so `down` can drop exactly these. */
const SPECTRA_INDEXES: Array<{ name: string; fields: Array<string | { name: string; order: 'ASC' | 'DESC' }> }> = [
  // The list: every sort, alone and under each filter the screens offer.
  { name: 'spectra_created', fields: ['created_at', 'id'] },
  { name: 'spectra_status_created', fields: ['status', 'created_at', 'id'] },
  { name: 'spectra_campaign_created', fields: ['campaign_id', 'created_at', 'id'] },
  { name: 'spectra_submitter_created', fields: ['submitted_by', 'created_at', 'id'] },
  { name: 'spectra_submitter_status_created', fields: ['submitted_by', 'status', 'created_at', 'id'] },
  { name: 'spectra_snr', fields: ['snr', 'id'] },
  { name: 'spectra_obs_date', fields: ['obs_date', 'id'] },
  { name: 'spectra_status', fields: ['status', 'id'] },
  // Names starting with a searched text (object names already have an index of their own).
  { name: 'spectra_file_name', fields: ['file_name'] },
  { name: 'spectra_submitter_snr', fields: ['submitted_by', 'snr', 'id'] },
  { name: 'spectra_submitter_object', fields: ['submitted_by', 'object_name', 'id'] },
  { name: 'spectra_submitter_obs_date', fields: ['submitted_by', 'obs_date', 'id'] },
  { name: 'spectra_campaign_status_created', fields: ['campaign_id', 'status', 'created_at', 'id'] },
  // The review queue, in each of its orders.
  { name: 'spectra_queue_oldest', fields: ['open_for_calls', 'created_at', 'id'] },
  { name: 'spectra_queue_flagged', fields: ['open_for_calls', { name: 'flag_count', order: 'DESC' }, 'created_at', 'id'] },
  { name: 'spectra_queue_snr', fields: ['open_for_calls', { name: 'snr', order: 'DESC' }, 'id'] },
]

/**
 * Lists and the review queue at 100 000 spectra: an index for every order and filter the screens
 * offer, full-text search over object and file names, the current suggestion's flag count stored
 * on the spectrum (ordering by flags cannot use an index over JSON), and a stored column that says
 * whether a spectrum takes calls, so the queue reads one index in its order and stops at its limit;
 * and the flags themselves one row each, so a flag filter starts from the flag.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.addColumn('spectra', 'flag_count', { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 })
  await q.sequelize.query("ALTER TABLE spectra ADD COLUMN open_for_calls TINYINT(1) AS (status IN ('suggested', 'under_review')) PERSISTENT")
  await q.sequelize.query(
    `UPDATE spectra sp JOIN suggestions sg ON sg.spectrum_id = sp.id AND sg.is_current = 1
     SET sp.flag_count = LEAST(255, COALESCE(JSON_LENGTH(sg.flags), 0))`,
  )
  for (const index of SPECTRA_INDEXES) await q.addIndex('spectra', index.fields as never, { name: index.name })
  await q.sequelize.query('ALTER TABLE spectra ADD FULLTEXT INDEX spectra_names_fulltext (object_name, file_name)')
  // The current suggestion's flags, one row each, so the queue's flag filter starts from the flag.
  await q.createTable('spectrum_flags', {
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, primaryKey: true, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    flag: { type: DataTypes.STRING(40), allowNull: false, primaryKey: true },
  })
  await q.addIndex('spectrum_flags', ['flag', 'spectrum_id'], { name: 'spectrum_flags_flag' })
  await q.sequelize.query(
    `INSERT IGNORE INTO spectrum_flags (spectrum_id, flag)
     SELECT sg.spectrum_id, jt.flag FROM suggestions sg,
       JSON_TABLE(sg.flags, '$[*]' COLUMNS (flag VARCHAR(40) PATH '$')) AS jt
     WHERE sg.is_current = 1 AND JSON_VALID(sg.flags) AND jt.flag IS NOT NULL`,
  )
  await q.addIndex('review_calls', ['spectrum_id', 'id'], { name: 'review_calls_spectrum_id' })
  await q.addIndex('processing_jobs', ['status', 'lease_expires_at'], { name: 'processing_jobs_status_lease' })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeIndex('processing_jobs', 'processing_jobs_status_lease')
  await q.dropTable('spectrum_flags')
  await q.removeIndex('review_calls', 'review_calls_spectrum_id')
  await q.removeIndex('spectra', 'spectra_names_fulltext')
  for (const index of [...SPECTRA_INDEXES].reverse()) await q.removeIndex('spectra', index.name)
  await q.removeColumn('spectra', 'open_for_calls')
  await q.removeColumn('spectra', 'flag_count')
}
