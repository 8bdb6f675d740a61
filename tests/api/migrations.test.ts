import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Sequelize } from 'sequelize'
import { loadConfig } from '../../server/config'
import { createSequelize } from '../../server/db'
import { migrateUp } from '../../server/db/migrate'
import { migrations } from '../../server/migrations'

const config = loadConfig(process.env)
const name = `lw_migr_${randomBytes(4).toString('hex')}`
let admin: Sequelize

beforeAll(async () => {
  admin = new Sequelize('', config.DB_USER, config.DB_PASSWORD, { host: config.DB_HOST, port: config.DB_PORT, dialect: 'mariadb', logging: false })
  await admin.query(`CREATE DATABASE \`${name}\``)
})
afterAll(async () => {
  await admin.query(`DROP DATABASE IF EXISTS \`${name}\``)
  await admin.close()
})

describe('migrateUp', () => {
  it('builds the schema on an empty database and is idempotent', async () => {
    const db = createSequelize({ ...config, DB_NAME: name }, { models: false })
    try {
      const first = await migrateUp(db)
      expect(first).toEqual(migrations.map((m) => m.name))
      expect(await migrateUp(db)).toEqual([])
      const tables = (await db.getQueryInterface().showAllTables()).map((t) => (typeof t === 'string' ? t : (t as { tableName: string }).tableName))
      for (const table of ['users', 'sessions', 'user_tokens', 'mail_messages', 'campaigns', 'campaign_members', 'schema_migrations']) {
        expect(tables).toContain(table)
      }
    } finally {
      await db.close()
    }
  })
})
