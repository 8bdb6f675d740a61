import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Standards from the shipped observed library (templates/observed-v1) carry their template id,
 * star, origin, resolution and published [Fe/H]; suggestions keep what the matcher says beyond the
 * type and class (parameter estimates, class shares, resolution used, notes) as one JSON document.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.addColumn('standards', 'template_id', { type: DataTypes.STRING(48), allowNull: true })
  await q.addIndex('standards', ['template_id'], { unique: true, name: 'standards_template_id' })
  await q.addColumn('standards', 'star', { type: DataTypes.STRING(60), allowNull: true })
  await q.addColumn('standards', 'origin', { type: DataTypes.STRING(120), allowNull: true })
  await q.addColumn('standards', 'feh', { type: DataTypes.DOUBLE, allowNull: true })
  await q.addColumn('standards', 'resolution_fwhm', { type: DataTypes.DOUBLE, allowNull: true })
  await q.addColumn('suggestions', 'details', { type: DataTypes.TEXT('medium'), allowNull: true })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeColumn('suggestions', 'details')
  await q.removeIndex('standards', 'standards_template_id')
  for (const c of ['resolution_fwhm', 'feh', 'origin', 'star', 'template_id']) await q.removeColumn('standards', c)
}
