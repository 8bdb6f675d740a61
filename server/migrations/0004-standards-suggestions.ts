import { DataTypes, type QueryInterface } from 'sequelize'

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true }

export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('library_versions', {
    id,
    name: { type: DataTypes.STRING(60), allowNull: false, unique: true },
    description: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
    is_active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    published_at: { type: DataTypes.DATE(3), allowNull: true },
    published_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.createTable('standards', {
    id,
    source: { type: DataTypes.STRING(16), allowNull: false },
    model_id: { type: DataTypes.STRING(32), allowNull: true, unique: true },
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'spectra', key: 'id' } },
    spectral_type: { type: DataTypes.STRING(40), allowNull: false },
    type_code: { type: DataTypes.DOUBLE, allowNull: false },
    luminosity_class: { type: DataTypes.STRING(12), allowNull: false },
    class_code: { type: DataTypes.DOUBLE, allowNull: false },
    teff: { type: DataTypes.DOUBLE, allowNull: true },
    logg: { type: DataTypes.DOUBLE, allowNull: true },
    note: { type: DataTypes.TEXT, allowNull: false },
    rectified: { type: DataTypes.BLOB('medium'), allowNull: true },
    added_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    retired_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.createTable('library_version_standards', {
    version_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'library_versions', key: 'id' }, onDelete: 'CASCADE' },
    standard_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'standards', key: 'id' } },
  })
  await q.createTable('suggestions', {
    id,
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    measurement_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'measurements', key: 'id' } },
    library_version_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'library_versions', key: 'id' } },
    pipeline_version: { type: DataTypes.STRING(20), allowNull: false },
    is_current: { type: DataTypes.BOOLEAN, allowNull: false },
    spectral_type: { type: DataTypes.STRING(40), allowNull: false },
    letter: { type: DataTypes.STRING(2), allowNull: false },
    subtype: { type: DataTypes.DOUBLE, allowNull: false },
    type_code: { type: DataTypes.DOUBLE, allowNull: false },
    luminosity_class: { type: DataTypes.STRING(12), allowNull: false },
    class_code: { type: DataTypes.DOUBLE, allowNull: false },
    uncertainty_subtypes: { type: DataTypes.DOUBLE, allowNull: false },
    uncertainty_classes: { type: DataTypes.DOUBLE, allowNull: false },
    best_standard_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    candidates: { type: DataTypes.TEXT('medium'), allowNull: false },
    votes: { type: DataTypes.TEXT('medium'), allowNull: false },
    flags: { type: DataTypes.TEXT, allowNull: false },
    probabilities: { type: DataTypes.TEXT('medium'), allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('suggestions', ['spectrum_id', 'is_current'])
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  for (const t of ['suggestions', 'library_version_standards', 'standards', 'library_versions']) await q.dropTable(t)
}
