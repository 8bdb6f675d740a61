// `npm test`: a throw-away MariaDB, then type-check, lint, unit, API, component and browser tests.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { bin, ensureDatabase, ensureDebianPackages, ensureNodeModules, ensurePythonModules, freePort, log, run, startMariaDB, startRedis, startS3Fake } from './lib/setup.mjs'

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
ensureDebianPackages({ mariadbd: 'mariadb-server', mariadb: 'mariadb-client', chromium: 'chromium', 'redis-server': 'redis-server' })
// The release read-backs run astropy through Debian's python3 (tests/reference/check_exports.py).
ensurePythonModules({ astropy: 'python3-astropy' })

const dir = mkdtempSync(join(tmpdir(), 'lineweight-test-'))
env.STORAGE_DIR = join(dir, 'files')
let db = null
let redis = null
let s3 = null
let code = 0
const cleanup = async () => {
  if (redis) await redis.stop()
  if (s3) await s3.stop()
  if (db) await db.stop()
  rmSync(dir, { recursive: true, force: true })
}
process.on('SIGINT', () => {
  void cleanup().then(() => process.exit(130))
})

// Processing, upload and re-reading tests run a second time on Redis (BullMQ) and an S3-compatible store, with
// two worker processes sharing a batch; the first pass leaves that test out (it needs QUEUE=redis).
const BOTH_MODES = [
  'tests/api/processing.test.ts',
  'tests/api/spectra.test.ts',
  'tests/api/upload-memory.test.ts',
  'tests/api/upload-budget.test.ts',
  'tests/api/upload-abort.test.ts',
  'tests/api/input-hardening.test.ts',
  'tests/api/reading.test.ts',
]
const REDIS_ONLY = 'tests/api/redis-workers.test.ts'
const redisEnv = () => ({
  ...env,
  QUEUE: 'redis',
  REDIS_URL: redis.url,
  STORAGE_DRIVER: 's3',
  S3_ENDPOINT: s3.endpoint,
  S3_BUCKET: 'lineweight-test',
  S3_ACCESS_KEY_ID: 'S3RVER',
  S3_SECRET_ACCESS_KEY: 'S3RVER',
  STORAGE_DIR: join(dir, 'incoming-s3'),
})
const steps = [
  ['type-check', () => run(bin('vue-tsc'), ['-b'], { env })],
  [
    'lint and formatting',
    () => {
      run(bin('eslint'), ['--cache', '--cache-location', 'node_modules/.cache/eslint/', '.'], { env })
      run(bin('prettier'), ['--check', '.'], { env })
    },
  ],
  ['migrations', () => run(bin('tsx'), ['server/db/migrate-cli.ts', 'up'], { env })],
  ['unit, API and component tests', () => run(bin('vitest'), ['run', '--project', 'unit', '--project', 'api', '--project', 'component', '--exclude', REDIS_ONLY], { env })],
  ['processing and upload tests on Redis and S3', () => run(bin('vitest'), ['run', '--project', 'api', ...BOTH_MODES], { env: redisEnv() })],
  // On its own: its batch and two cold worker processes would hold up the other files' waits for an
  // empty queue (the database is shared), and their workers could take those files' jobs.
  ['two worker processes on Redis', () => run(bin('vitest'), ['run', '--project', 'api', REDIS_ONLY], { env: redisEnv() })],
  ['client build', () => run(bin('vite'), ['build', '--logLevel', 'warn'], { env })],
  ['browser journeys', () => run(bin('vitest'), ['run', '--project', 'e2e'], { env })],
]
try {
  db = await startMariaDB({ dir: join(dir, 'mariadb'), port: Number(env.DB_PORT) })
  redis = await startRedis({ dir: join(dir, 'redis'), port: Number(process.env.TEST_REDIS_PORT ?? (await freePort())) })
  s3 = await startS3Fake({ dir: join(dir, 's3'), port: Number(process.env.TEST_S3_PORT ?? (await freePort())), bucket: 'lineweight-test' })
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
