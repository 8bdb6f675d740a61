// `npm test`: a throw-away MariaDB, then type-check, unit, API, component and browser tests.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { bin, ensureDatabase, ensureDebianPackages, ensureNodeModules, ensurePythonModules, log, run, startMariaDB } from './lib/setup.mjs'

const env = { ...process.env }
env.NODE_ENV = 'test'
env.DB_HOST = '127.0.0.1'
env.DB_PORT = process.env.TEST_DB_PORT ?? '3417'
env.DB_NAME = 'lineweight_test'
env.DB_USER = 'lineweight_test'
env.DB_PASSWORD = 'lineweight-test'
env.SESSION_SECRET = 'test-secret-not-for-production-use-0123456789'
env.MAIL_MODE = 'fake'
env.E2E_PORT = process.env.TEST_HTTP_PORT ?? '8091'
env.BCRYPT_ROUNDS = '4'

ensureNodeModules()
ensureDebianPackages({ mariadbd: 'mariadb-server', mariadb: 'mariadb-client', chromium: 'chromium' })
// The release read-backs run astropy through Debian's python3 (tests/reference/check_exports.py).
ensurePythonModules({ astropy: 'python3-astropy' })

const dir = mkdtempSync(join(tmpdir(), 'lineweight-test-'))
env.STORAGE_DIR = join(dir, 'files')
let db = null
let code = 0
const cleanup = async () => {
  if (db) await db.stop()
  rmSync(dir, { recursive: true, force: true })
}
process.on('SIGINT', () => { void cleanup().then(() => process.exit(130)) })

const steps = [
  ['type-check', () => run(bin('vue-tsc'), ['-b'], { env })],
  ['migrations', () => run(bin('tsx'), ['server/db/migrate-cli.ts', 'up'], { env })],
  ['unit, API and component tests', () => run(bin('vitest'), ['run', '--project', 'unit', '--project', 'api', '--project', 'component'], { env })],
  ['client build', () => run(bin('vite'), ['build', '--logLevel', 'warn'], { env })],
  ['browser journeys', () => run(bin('vitest'), ['run', '--project', 'e2e'], { env })],
]
try {
  db = await startMariaDB({ dir: join(dir, 'mariadb'), port: Number(env.DB_PORT) })
  ensureDatabase({ socket: db.socket, name: env.DB_NAME, user: env.DB_USER, password: env.DB_PASSWORD, grantAll: true })
  for (const [name, step] of steps) {
    log(`— ${name}`)
    step()
  }
  log('all tests passed')
} catch (error) {
  console.error(error instanceof Error ? error.message : error)
  code = 1
} finally {
  await cleanup()
}
process.exit(code)
