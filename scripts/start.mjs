// `npm start`: everything a fresh machine needs, then the app on http://127.0.0.1:8080, kept running.
import { spawn, spawnSync } from 'node:child_process'
import { existsSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { SERVER_NODE_FLAGS, appEnv, bin, ensureDatabase, ensureDebianPackages, ensureNodeModules, ensurePortsFree, log, mariadbRunning, root, run, startMariaDB, supervise } from './lib/setup.mjs'

const { env, dataDir, manageDb } = appEnv()
/** The server's exit code for a setting it cannot work with (sysexits EX_CONFIG). */
const CONFIG_ERROR = 78

ensureNodeModules()
if (manageDb) ensureDebianPackages({ mariadbd: 'mariadb-server', mariadb: 'mariadb-client' })

// Refuse before starting anything when another program (often an earlier `npm start`) holds a port.
const ports = [{ name: 'PORT', port: env.PORT, host: env.HOST }]
if (manageDb && !mariadbRunning(join(dataDir, 'mariadb'))) ports.push({ name: 'DB_PORT', port: env.DB_PORT, host: '127.0.0.1' })
if (env.MAIL_MODE === 'fake' && env.SMTP_PORT && env.SMTP_PORT !== '0') ports.push({ name: 'SMTP_PORT', port: env.SMTP_PORT, host: '127.0.0.1' })
try {
  await ensurePortsFree(ports)
} catch (error) {
  console.error(`[lineweight] ${error.message}`)
  process.exit(1)
}

let db = { stop: async () => {} }
if (manageDb) {
  db = await startMariaDB({ dir: join(dataDir, 'mariadb'), port: Number(env.DB_PORT) })
  ensureDatabase({ socket: db.socket, name: env.DB_NAME, user: env.DB_USER, password: env.DB_PASSWORD })
}

let server = null
let stopping = false
async function stop(code) {
  if (stopping) return
  stopping = true
  await server?.stop()
  if (manageDb) {
    log('stopping MariaDB')
    await db.stop()
  }
  process.exit(code)
}
process.on('SIGINT', () => void stop(0))
process.on('SIGTERM', () => void stop(0))

let signIns = []
try {
  const migrate = spawnSync(bin('tsx'), ['server/db/migrate-cli.ts', 'up', '--seed', '--print-sign-ins'], { cwd: root, env, encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] })
  const lines = (migrate.stdout ?? '').split('\n').filter(Boolean)
  signIns = lines.filter((l) => l.startsWith('SIGN-IN ')).map((l) => l.slice(8))
  for (const l of lines.filter((l) => !l.startsWith('SIGN-IN '))) console.log(l)
  if (migrate.status !== 0) throw new Error('migrations failed')
  if (needsBuild()) {
    log('building the client')
    run(bin('vite'), ['build', '--logLevel', 'warn'], { env })
  }
} catch (error) {
  console.error(error instanceof Error ? error.message : error)
  await stop(1)
}

// A server that dies is started again (with a growing pause), and MariaDB keeps running meanwhile.
server = supervise({
  name: 'the server',
  fatalCodes: [CONFIG_ERROR],
  onFatal: (code) => void stop(code),
  start: () => spawn(bin('tsx'), [...SERVER_NODE_FLAGS, 'server/index.ts'], { cwd: root, env, stdio: 'inherit' }),
})
await announce()

async function announce() {
  const url = env.PUBLIC_URL
  for (let i = 0; i < 600 && !stopping; i++) {
    try {
      if ((await fetch(`http://${env.HOST}:${env.PORT}/api/health`)).ok) break
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100))
  }
  if (stopping) return
  const lines = ['', `  Lineweight is ready: ${url}`, '', '  Demo sign-ins (role, e-mail, password):', ...signIns.map((l) => `    ${l}`), '', '  Press Ctrl-C to stop the server and MariaDB.', '']
  console.log(lines.join('\n'))
}

function newestMtime(path) {
  if (!existsSync(path)) return 0
  const s = statSync(path)
  if (!s.isDirectory()) return s.mtimeMs
  return readdirSync(path).reduce((m, f) => Math.max(m, newestMtime(join(path, f))), s.mtimeMs)
}

function needsBuild() {
  const built = join(root, 'dist', 'index.html')
  if (!existsSync(built)) return true
  const sources = ['src', 'shared', 'index.html', 'vite.config.ts', 'package-lock.json', 'public'].map((p) => newestMtime(join(root, p)))
  return Math.max(...sources) > statSync(built).mtimeMs
}
