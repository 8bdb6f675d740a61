import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * The lead's other answers to a dispute (another classifier's call, or the calls reopened), extra
 * calls per spectrum, a campaign deadline, and the authors of a release.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('dispute_actions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    dispute_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true, references: { model: 'disputes', key: 'id' } },
    /** 'another-call' | 'reopened' */
    action: { type: DataTypes.STRING(20), allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: false },
    decided_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addColumn('spectra', 'extra_calls', { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 })
  await q.addColumn('campaigns', 'deadline', { type: DataTypes.DATEONLY, allowNull: true })
  await q.addColumn('releases', 'authors', { type: DataTypes.STRING(500), allowNull: false, defaultValue: '' })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.removeColumn('releases', 'authors')
  await q.removeColumn('campaigns', 'deadline')
  await q.removeColumn('spectra', 'extra_calls')
  await q.dropTable('dispute_actions')
}
