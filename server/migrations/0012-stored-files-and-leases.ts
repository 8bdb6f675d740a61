import { DataTypes, QueryTypes, type QueryInterface } from 'sequelize'

/** Names of the single-column unique indexes on spectra.file_sha256 (MariaDB names it after the column). */
async function shaUniqueIndexes(q: QueryInterface): Promise<string[]> {
  const rows = await q.sequelize.query<{ Key_name: string; Column_name: string; Non_unique: number; Seq_in_index: number }>('SHOW INDEX FROM spectra', { type: QueryTypes.SELECT })
  const byName = new Map<string, typeof rows>()
  for (const r of rows) byName.set(r.Key_name, [...(byName.get(r.Key_name) ?? []), r])
  return [...byName].filter(([, cols]) => cols.length === 1 && cols[0]!.Column_name === 'file_sha256' && Number(cols[0]!.Non_unique) === 0).map(([name]) => name)
}

/**
 * Uploaded files move out of the database into the file store (spectrum_blobs.raw_key names them;
 * `raw` stays for rows written before, until the server moves them at start-up). Duplicates are
 * judged per campaign. Running jobs hold a lease that the runner renews; an expired one goes back
 * to the queue.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  for (const name of await shaUniqueIndexes(q)) await q.removeIndex('spectra', name)
  await q.addIndex('spectra', ['campaign_id', 'file_sha256'], { unique: true, name: 'spectra_campaign_file' })
  await q.addIndex('spectra', ['file_sha256'], { name: 'spectra_file_sha256' })
  await q.changeColumn('spectrum_blobs', 'raw', { type: DataTypes.BLOB('long'), allowNull: true })
  await q.addColumn('spectrum_blobs', 'raw_key', { type: DataTypes.STRING(200), allowNull: true })
  await q.addColumn('processing_jobs', 'lease_expires_at', { type: DataTypes.DATE(3), allowNull: true })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeColumn('processing_jobs', 'lease_expires_at')
  await q.removeColumn('spectrum_blobs', 'raw_key')
  // Rows whose file lives in the store cannot go back into a NOT NULL column.
  await q.sequelize.query("UPDATE spectrum_blobs SET raw = '' WHERE raw IS NULL")
  await q.changeColumn('spectrum_blobs', 'raw', { type: DataTypes.BLOB('long'), allowNull: false })
  await q.removeIndex('spectra', 'spectra_file_sha256')
  await q.removeIndex('spectra', 'spectra_campaign_file')
  await q.addIndex('spectra', ['file_sha256'], { unique: true, name: 'file_sha256' })
}
