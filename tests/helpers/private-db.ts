import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Sequelize } from 'sequelize'
import { ensureDatabase, startMariaDB, type ManagedMariaDB } from '../../scripts/lib/setup.mjs'
import { hashPassword } from '../../server/services/users.service'
import { freePort } from './server'

/**
 * A MariaDB of the test's own, in a temporary folder on a free port, migrated; for tests that stop,
 * wipe or restore a database, which the shared test database must not see.
 */
export async function privateDatabase() {
  const dir = mkdtempSync(join(tmpdir(), 'lineweight-private-'))
  const port = await freePort()
  const name = 'lineweight_private'
  const user = 'lineweight_private'
  const password = 'private-test-password'
  let db: ManagedMariaDB | null = await startMariaDB({ dir: join(dir, 'mariadb'), port })
  ensureDatabase({ socket: db.socket, name, user, password })
  const env: NodeJS.ProcessEnv = { ...process.env, DB_HOST: '127.0.0.1', DB_PORT: String(port), DB_NAME: name, DB_USER: user, DB_PASSWORD: password, STORAGE_DIR: join(dir, 'files') }
  const migrate = spawnSync('node_modules/.bin/tsx', ['server/db/migrate-cli.ts', 'up'], { env, encoding: 'utf8' })
  if (migrate.status !== 0) throw new Error(`migrating the private database failed:\n${migrate.stdout}\n${migrate.stderr}`)
  const sql = new Sequelize(name, user, password, { host: '127.0.0.1', port, dialect: 'mariadb', logging: false, pool: { max: 2, min: 0, idle: 1000 } })
  return {
    dir,
    port,
    env,
    socket: db.socket,
    /** Plain SQL on the private database (its own pool, not the models'). */
    sql,
    async stop() {
      await db?.stop()
      db = null
    },
    async start() {
      db ??= await startMariaDB({ dir: join(dir, 'mariadb'), port })
    },
    /** A user with a password, a campaign they belong to; returns their ids. */
    async person(role: 'observer' | 'classifier' | 'lead', email: string, password: string, campaignId?: number) {
      const hash = await hashPassword(password, 4)
      await sql.query('INSERT INTO users (email, name, role, password_hash, active, created_at, updated_at) VALUES (?, ?, ?, ?, 1, NOW(3), NOW(3))', {
        replacements: [email, email.split('@')[0]!, role, hash],
      })
      const [[row]] = (await sql.query('SELECT id FROM users WHERE email = ?', { replacements: [email] })) as [Array<{ id: number }>, unknown]
      if (campaignId) await sql.query('INSERT INTO campaign_members (campaign_id, user_id, created_at) VALUES (?, ?, NOW(3))', { replacements: [campaignId, row!.id] })
      return row!.id
    },
    async campaign(code: string) {
      await sql.query("INSERT INTO campaigns (code, name, description, created_at, updated_at) VALUES (?, ?, '', NOW(3), NOW(3))", { replacements: [code, `${code} fields`] })
      const [[row]] = (await sql.query('SELECT id FROM campaigns WHERE code = ?', { replacements: [code] })) as [Array<{ id: number }>, unknown]
      return row!.id
    },
    async dispose() {
      await sql.close()
      await db?.stop()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}
