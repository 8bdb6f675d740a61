import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Standards promoted from a team's agreed spectra belong to an instrument and keep their
 * provenance (who decided, the calls, the date); a library version says what it changed and why
 * (promoted or demoted standards, for which instrument, on top of which version); a suggestion
 * names the instrument whose standards it was matched against.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.addColumn('standards', 'instrument_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'instruments', key: 'id' } })
  await q.addIndex('standards', ['instrument_id'], { name: 'standards_instrument_id' })
  await q.addColumn('standards', 'provenance', { type: DataTypes.TEXT('medium'), allowNull: true })
  await q.addColumn('library_versions', 'instrument_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'instruments', key: 'id' } })
  await q.addColumn('library_versions', 'based_on_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'library_versions', key: 'id' } })
  await q.addColumn('library_versions', 'changes', { type: DataTypes.TEXT('medium'), allowNull: true })
  await q.addColumn('suggestions', 'instrument_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'instruments', key: 'id' } })
  await q.addIndex('suggestions', ['instrument_id'], { name: 'suggestions_instrument_id' })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeIndex('suggestions', 'suggestions_instrument_id')
  await q.removeColumn('suggestions', 'instrument_id')
  for (const c of ['changes', 'based_on_id', 'instrument_id']) await q.removeColumn('library_versions', c)
  await q.removeColumn('standards', 'provenance')
  await q.removeIndex('standards', 'standards_instrument_id')
  await q.removeColumn('standards', 'instrument_id')
}
