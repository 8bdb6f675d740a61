import { DataTypes, type QueryInterface } from 'sequelize'

/** Personal API tokens: pipelines send one as `Authorization: Bearer …`; only its SHA-256 is stored. */
export async function up({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.createTable('api_tokens', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, references: { model: 'users', key: 'id' } },
    name: { type: DataTypes.STRING(80), allowNull: false },
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    /** The first characters of the token, so its owner can tell tokens apart. */
    prefix: { type: DataTypes.STRING(16), allowNull: false },
    expires_at: { type: DataTypes.DATE(3), allowNull: true },
    last_used_at: { type: DataTypes.DATE(3), allowNull: true },
    last_used_ip: { type: DataTypes.STRING(64), allowNull: true },
    uses: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    revoked_at: { type: DataTypes.DATE(3), allowNull: true },
    revoked_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await q.addIndex('api_tokens', ['user_id'], { name: 'api_tokens_user' })
}

export async function down({ context: q }: { context: QueryInterface }): Promise<void> {
  await q.dropTable('api_tokens')
}
