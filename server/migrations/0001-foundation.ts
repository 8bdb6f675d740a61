import { DataTypes, type QueryInterface } from 'sequelize'

const timestamps = {
  created_at: { type: DataTypes.DATE(3), allowNull: false },
  updated_at: { type: DataTypes.DATE(3), allowNull: false },
}
const id = { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true }

export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('users', {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    role: { type: DataTypes.ENUM('observer', 'classifier', 'lead'), allowNull: false },
    password_hash: { type: DataTypes.STRING(100), allowNull: true },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    last_login_at: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  })
  await q.createTable('user_tokens', {
    id,
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    purpose: { type: DataTypes.ENUM('invite', 'reset'), allowNull: false },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE(3), allowNull: false },
    used_at: { type: DataTypes.DATE(3), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.createTable('sessions', {
    sid: { type: DataTypes.STRING(64), primaryKey: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    expires: { type: DataTypes.DATE(3), allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: false },
    ...timestamps,
  })
  await q.addIndex('sessions', ['user_id'])
  await q.addIndex('sessions', ['expires'])
  await q.createTable('mail_messages', {
    id,
    from_address: { type: DataTypes.STRING(320), allowNull: false },
    to_addresses: { type: DataTypes.STRING(2000), allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    text: { type: DataTypes.TEXT('medium'), allowNull: false },
    html: { type: DataTypes.TEXT('medium'), allowNull: true },
    raw: { type: DataTypes.TEXT('medium'), allowNull: false },
    received_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.createTable('campaigns', {
    id,
    code: { type: DataTypes.STRING(32), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(160), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    observatory: { type: DataTypes.STRING(160), allowNull: false, defaultValue: '' },
    region_min: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 3850 },
    region_max: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 5000 },
    calls_required: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 1 },
    blind_review: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    type_tolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
    class_tolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
    ...timestamps,
  })
  await q.createTable('campaign_members', {
    campaign_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'campaigns', key: 'id' }, onDelete: 'CASCADE' },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  for (const table of ['campaign_members', 'campaigns', 'mail_messages', 'sessions', 'user_tokens', 'users']) await q.dropTable(table)
}
