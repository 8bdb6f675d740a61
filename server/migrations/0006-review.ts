import { DataTypes, type QueryInterface } from 'sequelize'

const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true }
const ref = (model: string, allowNull = false) => ({ type: DataTypes.INTEGER.UNSIGNED, allowNull, references: { model, key: 'id' } })

/**
 * Review: claims on queue items, classifiers' calls, disputes and final classifications.
 * Calls, disputes and classifications are written once and never changed; a later row wins.
 */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('review_claims', {
    spectrum_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'spectra', key: 'id' }, onDelete: 'CASCADE' },
    user_id: ref('users'),
    claimed_at: { type: DataTypes.DATE(3), allowNull: false },
    expires_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('review_claims', ['user_id'])

  await q.createTable('review_calls', {
    id,
    spectrum_id: ref('spectra'),
    user_id: ref('users'),
    kind: { type: DataTypes.STRING(12), allowNull: false },
    // 1 for a person's first call, NULL for corrections: the unique key allows one call per person.
    first_call: { type: DataTypes.TINYINT.UNSIGNED, allowNull: true },
    corrects_call_id: ref('review_calls', true),
    spectral_type: { type: DataTypes.STRING(60), allowNull: false },
    letter: { type: DataTypes.STRING(2), allowNull: false },
    subtype: { type: DataTypes.DOUBLE, allowNull: false },
    type_code: { type: DataTypes.DOUBLE, allowNull: false },
    luminosity_class: { type: DataTypes.STRING(12), allowNull: false },
    class_code: { type: DataTypes.DOUBLE, allowNull: false },
    peculiarities: { type: DataTypes.TEXT, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false },
    confidence: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    uncertain: { type: DataTypes.BOOLEAN, allowNull: false },
    accepted_suggestion: { type: DataTypes.BOOLEAN, allowNull: false },
    suggestion_id: ref('suggestions', true),
    suggestion_shown: { type: DataTypes.BOOLEAN, allowNull: false },
    seconds_spent: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('review_calls', ['spectrum_id', 'user_id', 'first_call'], { unique: true, name: 'review_calls_one_per_person' })
  await q.addIndex('review_calls', ['user_id', 'created_at'])

  await q.createTable('disputes', {
    id,
    spectrum_id: ref('spectra'),
    campaign_id: ref('campaigns'),
    /** JSON number[]: the calls that disagreed. */
    call_ids: { type: DataTypes.TEXT, allowNull: false },
    type_spread: { type: DataTypes.DOUBLE, allowNull: false },
    class_spread: { type: DataTypes.DOUBLE, allowNull: false },
    type_tolerance: { type: DataTypes.DOUBLE, allowNull: false },
    class_tolerance: { type: DataTypes.DOUBLE, allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('disputes', ['spectrum_id'])

  await q.createTable('classifications', {
    id,
    spectrum_id: ref('spectra'),
    source: { type: DataTypes.STRING(20), allowNull: false },
    spectral_type: { type: DataTypes.STRING(60), allowNull: false },
    letter: { type: DataTypes.STRING(2), allowNull: false },
    subtype: { type: DataTypes.DOUBLE, allowNull: false },
    type_code: { type: DataTypes.DOUBLE, allowNull: false },
    luminosity_class: { type: DataTypes.STRING(12), allowNull: false },
    class_code: { type: DataTypes.DOUBLE, allowNull: false },
    peculiarities: { type: DataTypes.TEXT, allowNull: false },
    decided_by: ref('users', true),
    n_calls: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    /** JSON number[]: the calls the decision rests on. */
    call_ids: { type: DataTypes.TEXT, allowNull: false },
    agreement: { type: DataTypes.STRING(12), allowNull: false },
    type_spread: { type: DataTypes.DOUBLE, allowNull: true },
    class_spread: { type: DataTypes.DOUBLE, allowNull: true },
    suggestion_id: ref('suggestions', true),
    // A settlement names its dispute; the unique key makes a second settlement impossible.
    dispute_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, unique: true, references: { model: 'disputes', key: 'id' } },
    note: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('classifications', ['spectrum_id', 'id'])
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  for (const t of ['classifications', 'disputes', 'review_calls', 'review_claims']) await q.dropTable(t)
}
