import { randomBytes } from 'node:crypto'
import supertest from 'supertest'
import type { Express } from 'express'
import type { Sequelize } from 'sequelize'
import { createApp } from '../../server/app'
import { loadConfig, type Config } from '../../server/config'
import type { AppContext } from '../../server/context'
import { createSequelize } from '../../server/db'
import { createLogger } from '../../server/lib/logger'
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp'
import { createMailer } from '../../server/mail/mailer'
import { createFileStore } from '../../server/storage'
import { ReadPool } from '../../server/jobs/reading'
import { User } from '../../server/models'
import { hashPassword } from '../../server/services/users.service'
import type { Role } from '../../shared/roles'
import type { Answer } from './openapi'

export interface TestContext {
  ctx: AppContext
  app: Express
  smtp: FakeSmtp
  close(): Promise<void>
}

/** The JSON answers of every app built here (tests/api/setup.ts checks them against the OpenAPI document). */
export const seenAnswers: Answer[] = []
let firstContext: AppContext | null = null
export const seenContext = () => firstContext

let shared: Sequelize | null = null
/** One connection per test file: models are module-wide, so every app in the file shares it. */
function database(config: Config): Sequelize {
  shared ??= createSequelize(config)
  return shared
}

/**
 * An app over the test MariaDB (settings from the environment that `npm test` sets) with its own
 * mail fake. A second call builds a second app instance over the same database, as a restart would.
 */
export async function createTestContext(overrides: Partial<Config> = {}): Promise<TestContext> {
  const config = { ...loadConfig(process.env), LOG_LEVEL: 'silent' as const, ...overrides }
  const sequelize = database(config)
  const smtp = await startFakeSmtp(0)
  const mailer = createMailer({ ...config, SMTP_PORT: smtp.port, MAIL_MODE: 'fake' })
  // Uploads are read in a thread of the read pool, as in the server (vitest does not run under tsx, so the thread loads it).
  const reading = new ReadPool({ threads: 1, keepStarted: false, execArgv: ['--import', 'tsx'] })
  const ctx: AppContext = { config, sequelize, mailer, logger: createLogger('silent'), files: await createFileStore(config), reading }
  firstContext ??= ctx
  const app = createApp(ctx, { observeJson: (answer) => seenAnswers.push(answer) })
  return {
    ctx,
    app,
    smtp,
    async close() {
      await reading.close()
      mailer.close()
      await smtp.close()
    },
  }
}

export const uniqueEmail = (label: string) => `${label}-${randomBytes(5).toString('hex')}@test.example`

/** A user with a known password, straight into the database. */
export async function makeUser(role: Role, overrides: Partial<{ email: string; name: string; password: string; active: boolean }> = {}) {
  const password = overrides.password ?? 'correct horse battery'
  const user = await User.create({
    email: overrides.email ?? uniqueEmail(role),
    name: overrides.name ?? `Test ${role}`,
    role,
    passwordHash: await hashPassword(password, 4),
    active: overrides.active ?? true,
    lastLoginAt: null,
  })
  return { user, password }
}

/** A cookie-keeping client that knows its CSRF token. */
export async function agentFor(app: Express) {
  const agent = supertest.agent(app)
  const res = await agent.get('/api/auth/csrf').expect(200)
  const client = { agent, csrf: res.body.csrfToken as string }
  return client
}

export async function signedInAgent(app: Express, email: string, password: string) {
  const client = await agentFor(app)
  const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).send({ email, password })
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  client.csrf = res.body.csrfToken
  return client
}

export function sessionCookie(res: { headers: Record<string, unknown> }): string | null {
  const raw = res.headers['set-cookie']
  const cookies = Array.isArray(raw) ? (raw as string[]) : []
  const sid = cookies.find((c) => c.startsWith('lw.sid='))
  return sid ? sid.split(';')[0]! : null
}

/** Closes the file's database connection; call once in the last afterAll. */
export async function closeDatabase(): Promise<void> {
  await shared?.close()
  shared = null
}
