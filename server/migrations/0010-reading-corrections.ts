import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * How the observer asked for a file to be read (kept so a later correction changes one choice at a
 * time), and the spectrum events that are not calls: reading corrections, re-processing, withdrawal.
 * Events keep the spectrum id without a foreign key, so a withdrawal's record outlives the spectrum.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.addColumn('spectra', 'read_choices', { type: DataTypes.STRING(255), allowNull: false, defaultValue: '{}' })
  await q.createTable('spectrum_events', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    campaign_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' } },
    summary: { type: DataTypes.TEXT, allowNull: false },
    /** JSON: what was before and after. */
    details: { type: DataTypes.TEXT('medium'), allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('spectrum_events', ['spectrum_id'])
  await q.addIndex('spectrum_events', ['campaign_id', 'kind'])
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.dropTable('spectrum_events')
  await q.removeColumn('spectra', 'read_choices')
}
