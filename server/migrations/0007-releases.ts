import { DataTypes, type QueryInterface } from 'sequelize'

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true }

/**
 * Catalogue releases: frozen snapshots, numbered per campaign. The column table, the release
 * keywords and every row's values are stored as written, so later code or data never alter them.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('releases', {
    id,
    campaign_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'campaigns', key: 'id' } },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    title: { type: DataTypes.STRING(200), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    row_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    /** JSON ExportColumn[] as frozen. */
    columns: { type: DataTypes.TEXT('medium'), allowNull: false },
    /** JSON TableParam[] as frozen. */
    params: { type: DataTypes.TEXT, allowNull: false },
    /** JSON string[] */
    notes: { type: DataTypes.TEXT, allowNull: false },
    created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    superseded_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'releases', key: 'id' } },
  })
  await q.addIndex('releases', ['campaign_id', 'version'], { unique: true, name: 'releases_campaign_version' })

  await q.createTable('release_rows', {
    id,
    release_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'releases', key: 'id' } },
    position: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    /** JSON: column label → value, as frozen. */
    cells: { type: DataTypes.TEXT('medium'), allowNull: false },
  })
  await q.addIndex('release_rows', ['release_id', 'position'], { unique: true, name: 'release_rows_position' })
  await q.addIndex('release_rows', ['spectrum_id'])
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  for (const t of ['release_rows', 'releases']) await q.dropTable(t)
}
