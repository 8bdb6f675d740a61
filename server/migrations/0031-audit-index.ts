import type { QueryInterface } from 'sequelize'

/**
 * The agreement audit reads a few numbers of every suggestion of a campaign, and the suggestion
 * rows are large (candidates, votes, details, the probability grid): at 100 000 spectra they no
 * longer fit in memory and each lookup went to disk. This index holds those numbers (and the
 * instrument's share of the vote, kept out of the details JSON as a virtual column), so the audit
 * reads the index alone.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.sequelize.query(
    `ALTER TABLE suggestions
       ADD COLUMN own_share VARCHAR(255) AS (JSON_VALUE(details, '$.standards.instrumentShare.type')) VIRTUAL,
       ADD INDEX suggestions_audit (spectrum_id, is_current, library_version_id, type_code, class_code, created_at, own_share)`,
  )
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.sequelize.query('ALTER TABLE suggestions DROP INDEX suggestions_audit, DROP COLUMN own_share')
}
