// Plain Node (no packages): this runs before `npm ci` has installed anything.
import { spawn, spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, openSync, readFileSync, writeFileSync } from 'node:fs'
import { createServer } from 'node:net'
import { join, resolve } from 'node:path'

export const root = resolve(new URL('../..', import.meta.url).pathname)

export function log(message) {
  process.stdout.write(`[lineweight] ${message}\n`)
}

/**
 * Node flags of `npm run worker` processes (QUEUE=redis), written out in package.json as well: each
 * thread collects its own garbage, without V8's GC helper threads, which only compete with the
 * pipeline while it keeps every core busy. Not for the web server, whose queue pages were slower
 * with it (DEVELOPERS.md).
 */
export const WORKER_NODE_FLAGS = ['--single-threaded-gc']

/**
 * Node flags of the web server (`npm start`, `npm run serve`, also in package.json). With V8's
 * concurrent marking its pipeline threads ran a full collection about four times a second and
 * compiled their code again after each; without it, a few times a minute (DEVELOPERS.md).
 */
export const SERVER_NODE_FLAGS = ['--no-concurrent-marking']

/** Runs a command to completion with inherited output; throws on a non-zero exit. */
export function run(command, args, options = {}) {
  const result = spawnSync(command, args, { stdio: 'inherit', cwd: root, ...options })
  if (result.error) throw result.error
  if (result.status !== 0) throw new Error(`${command} ${args.join(' ')} exited with ${result.status}`)
}

function commandExists(name) {
  return spawnSync('sh', ['-c', `command -v ${name}`], { stdio: 'ignore' }).status === 0
}

/** npm ci when node_modules is missing or was installed from another package-lock.json. */
export function ensureNodeModules() {
  const lock = join(root, 'package-lock.json')
  const stamp = join(root, 'node_modules', '.lineweight-lock.sha256')
  const want = createHash('sha256').update(readFileSync(lock)).digest('hex')
  if (existsSync(stamp) && readFileSync(stamp, 'utf8') === want) return
  log('installing npm packages (npm ci)')
  run('npm', ['ci', '--no-audit', '--no-fund'])
  writeFileSync(stamp, want)
}

let aptUpdated = false
/** Installs Debian packages whose commands are missing: { command: package }. */
export function ensureDebianPackages(wanted) {
  const missing = Object.entries(wanted)
    .filter(([command]) => !commandExists(command))
    .map(([, pkg]) => pkg)
  if (missing.length === 0) return
  if (!commandExists('apt-get')) throw new Error(`missing ${missing.join(', ')} and no apt-get to install them`)
  const sudo = process.getuid?.() === 0 ? [] : ['sudo']
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  if (!aptUpdated) {
    log('apt-get update')
    run(sudo[0] ?? 'apt-get', [...sudo.slice(1), ...(sudo.length ? ['apt-get'] : []), 'update', '-q'], { env })
    aptUpdated = true
  }
  log(`installing Debian packages: ${missing.join(' ')}`)
  run(sudo[0] ?? 'apt-get', [...(sudo.length ? ['apt-get'] : []), 'install', '-y', '-q', '--no-install-recommends', ...missing], { env })
}

/**
 * Installs the Debian packages of Python modules that Debian's /usr/bin/python3 cannot import:
 * { module: package }, e.g. { astropy: 'python3-astropy' } for the reference read-backs.
 */
export function ensurePythonModules(wanted) {
  const python = '/usr/bin/python3'
  const missing = Object.entries(wanted)
    .filter(([module]) => !existsSync(python) || spawnSync(python, ['-c', `import ${module}`], { stdio: 'ignore' }).status !== 0)
    .map(([, pkg]) => pkg)
  if (missing.length === 0) return
  const probe = Object.fromEntries(missing.map((pkg) => [`__lineweight_missing_${pkg.replace(/[^a-z0-9]/g, '_')}`, pkg]))
  ensureDebianPackages(probe)
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms))

/**
 * A private MariaDB: data under `dir`, listening on 127.0.0.1:`port` only.
 * Returns { socket, stop() }.
 */
export async function startMariaDB({ dir, port }) {
  const dataDir = join(dir, 'data')
  const socket = join(dir, 'mysqld.sock')
  mkdirSync(dir, { recursive: true })
  const asRoot = process.getuid?.() === 0 ? ['--user=root'] : []
  if (!existsSync(join(dataDir, 'mysql'))) {
    log(`initialising MariaDB data directory ${dataDir}`)
    const init = spawnSync('mariadb-install-db', ['--no-defaults', `--datadir=${dataDir}`, ...asRoot, '--auth-root-authentication-method=normal', '--skip-test-db', '--skip-name-resolve'], {
      encoding: 'utf8',
    })
    if (init.status !== 0) throw new Error(`mariadb-install-db failed:\n${init.stdout}\n${init.stderr}`)
  }
  const admin = (...args) => spawnSync('mariadb-admin', ['--no-defaults', '--protocol=socket', `--socket=${socket}`, '-uroot', ...args], { encoding: 'utf8' })
  if (mariadbRunning(dir)) {
    log(`MariaDB already running on ${socket}`)
    return { socket, stop: async () => {} }
  }
  const child = spawn(
    'mariadbd',
    [
      '--no-defaults',
      `--datadir=${dataDir}`,
      ...asRoot,
      '--bind-address=127.0.0.1',
      `--port=${port}`,
      `--socket=${socket}`,
      `--pid-file=${join(dir, 'mysqld.pid')}`,
      `--log-error=${join(dir, 'error.log')}`,
      '--skip-name-resolve',
      '--character-set-server=utf8mb4',
      '--collation-server=utf8mb4_unicode_ci',
      '--max-allowed-packet=256M',
      '--innodb-log-file-size=256M',
    ],
    { detached: true, stdio: 'ignore' },
  )
  let exited = null
  child.on('exit', (code) => {
    exited = code ?? -1
  })
  child.unref()
  for (let i = 0; i < 300; i++) {
    if (exited !== null) {
      const logFile = join(dir, 'error.log')
      const tail = existsSync(logFile) ? readFileSync(logFile, 'utf8').split('\n').slice(-15).join('\n') : ''
      throw new Error(`mariadbd exited (code ${exited}); is port ${port} taken? Set DB_PORT to another port.\n${tail}`)
    }
    if (admin('ping').status === 0) break
    await sleep(100)
    if (i === 299) throw new Error('MariaDB did not become ready within 30 s')
  }
  log(`MariaDB listening on 127.0.0.1:${port}`)
  let stopped = false
  return {
    socket,
    stop: async () => {
      if (stopped) return
      stopped = true
      admin('shutdown')
      for (let i = 0; i < 100 && exited === null; i++) await sleep(100)
    },
  }
}

/** Whether the private MariaDB whose files are under `dir` answers on its socket. */
export function mariadbRunning(dir) {
  const socket = join(dir, 'mysqld.sock')
  if (!existsSync(socket)) return false
  return spawnSync('mariadb-admin', ['--no-defaults', '--protocol=socket', `--socket=${socket}`, '-uroot', 'ping'], { stdio: 'ignore' }).status === 0
}

/** Creates the database and its user (idempotent), through the root socket. */
export function ensureDatabase({ socket, name, user, password, grantAll = false }) {
  const q = (s) => s.replace(/\\/g, '\\\\').replace(/'/g, "\\'")
  const grant = grantAll ? `GRANT ALL PRIVILEGES ON *.* TO '${q(user)}'@'127.0.0.1'` : `GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${q(user)}'@'127.0.0.1'`
  const sql = [
    `CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    `CREATE USER IF NOT EXISTS '${q(user)}'@'127.0.0.1' IDENTIFIED BY '${q(password)}'`,
    `ALTER USER '${q(user)}'@'127.0.0.1' IDENTIFIED BY '${q(password)}'`,
    grant,
    'FLUSH PRIVILEGES',
  ].join(';\n')
  const result = spawnSync('mariadb', ['--no-defaults', '--protocol=socket', `--socket=${socket}`, '-uroot'], { input: sql, encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`creating database ${name} failed: ${result.stderr}`)
}

/** A secret kept in a file so restarts keep sessions valid. */
export function persistentSecret(file) {
  if (existsSync(file)) return readFileSync(file, 'utf8').trim()
  const secret = randomBytes(32).toString('hex')
  writeFileSync(file, secret, { mode: 0o600 })
  return secret
}

export function bin(name) {
  return join(root, 'node_modules', '.bin', name)
}

/** The settings `npm start`, `npm run backup` and `npm run restore` share (environment wins). */
export function appEnv(base = process.env) {
  const env = { ...base }
  env.NODE_ENV ??= 'production'
  env.PORT ??= '8080'
  env.HOST ??= '127.0.0.1'
  env.DB_HOST ??= '127.0.0.1'
  env.DB_PORT ??= '3407'
  env.DB_NAME ??= 'lineweight'
  env.DB_USER ??= 'lineweight'
  env.DB_PASSWORD ??= 'lineweight-local'
  env.MAIL_MODE ??= 'fake'
  env.PUBLIC_URL ??= `http://${env.HOST}:${env.PORT}`
  const dataDir = join(root, '.data')
  mkdirSync(dataDir, { recursive: true })
  env.SESSION_SECRET ??= persistentSecret(join(dataDir, 'session-secret'))
  env.STORAGE_DIR ??= join(dataDir, 'files')
  return { env, dataDir, manageDb: (env.MANAGE_DB ?? '1') !== '0' }
}

/** Whether something already listens on host:port. */
export function portInUse(port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const server = createServer()
    server.once('error', (error) => resolve(error.code === 'EADDRINUSE' || error.code === 'EACCES'))
    server.once('listening', () => server.close(() => resolve(false)))
    server.listen(Number(port), host)
  })
}

/** Throws, naming each one, when any of the ports is taken: [{ name, port, host }]. */
export async function ensurePortsFree(ports) {
  const busy = []
  for (const p of ports) if (await portInUse(p.port, p.host)) busy.push(p)
  if (busy.length === 0) return
  const list = busy.map((p) => `${p.name}=${p.port}`).join(', ')
  throw new Error(
    `Port${busy.length > 1 ? 's' : ''} already in use: ${list}. Is Lineweight already running? Stop it, or choose free port${busy.length > 1 ? 's' : ''}: ${busy.map((p) => `${p.name}=…`).join(' ')} npm start`,
  )
}

/**
 * Keeps a process running: when it exits on its own it is started again after a back-off that
 * doubles from `minDelayMs` to `maxDelayMs`, and starts over once a run lasted `healthyMs`.
 * An exit code in `fatalCodes` (a configuration mistake) is not retried: `onFatal(code)` is called.
 * Returns { stop() } which ends the process and stops restarting.
 */
export function supervise({ start, name = 'server', minDelayMs = 1000, maxDelayMs = 30_000, healthyMs = 60_000, fatalCodes = [], onRestart = () => {}, onFatal = () => {} }) {
  let child = null
  let stopping = false
  let delay = minDelayMs
  let timer = null
  const launch = () => {
    const started = Date.now()
    child = start()
    child.once('exit', (code, signal) => {
      if (stopping) return
      if (fatalCodes.includes(code)) {
        // A mistake in the settings: starting again would fail the same way.
        onFatal(code)
        return
      }
      if (Date.now() - started >= healthyMs) delay = minDelayMs
      log(`${name} stopped (${signal ?? `exit code ${code}`}); starting it again in ${(delay / 1000).toFixed(1)} s`)
      onRestart({ code, signal, delay })
      timer = setTimeout(launch, delay)
      delay = Math.min(maxDelayMs, delay * 2)
    })
  }
  launch()
  return {
    get child() {
      return child
    },
    async stop() {
      stopping = true
      if (timer) clearTimeout(timer)
      if (child && child.exitCode === null && child.signalCode === null) {
        child.kill('SIGTERM')
        await new Promise((r) => child.once('exit', r))
      }
    },
  }
}

/** A port nothing listens on right now (the kernel picks it). */
export function freePort() {
  return new Promise((resolve, reject) => {
    const server = createServer()
    server.once('error', reject)
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address()
      server.close(() => resolve(port))
    })
  })
}

/** Starts a child in its own process group and waits until `ready()` says yes; stop() ends the group. */
async function startService({ name, command, args, ready, logFile }) {
  const out = openSync(logFile, 'a')
  const child = spawn(command, args, { detached: true, stdio: ['ignore', out, out] })
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`${name} exited with ${child.exitCode}; see ${logFile}`)
    if (await ready()) break
    if (i > 200) throw new Error(`${name} did not start within 20 s; see ${logFile}`)
    await sleep(100)
  }
  return {
    async stop() {
      if (child.exitCode !== null || !child.pid) return
      const exited = new Promise((r) => child.once('exit', r))
      try {
        process.kill(-child.pid, 'SIGTERM')
      } catch {
        return
      }
      await Promise.race([exited, sleep(5000)])
    },
  }
}

/** A private redis-server on 127.0.0.1:`port`, nothing saved to disk. Returns { url, stop() }. */
export async function startRedis({ dir, port }) {
  mkdirSync(dir, { recursive: true })
  const service = await startService({
    name: 'redis-server',
    command: 'redis-server',
    args: ['--bind', '127.0.0.1', '--port', String(port), '--dir', dir, '--save', '', '--appendonly', 'no', '--protected-mode', 'yes'],
    ready: async () => portInUse(port),
    logFile: join(dir, 'redis.log'),
  })
  log(`redis-server listening on 127.0.0.1:${port}`)
  return { url: `redis://127.0.0.1:${port}`, stop: service.stop }
}

/** A local S3-compatible server (the s3rver npm package) on 127.0.0.1:`port` with `bucket` made. Returns { endpoint, stop() }. */
export async function startS3Fake({ dir, port, bucket }) {
  mkdirSync(dir, { recursive: true })
  const endpoint = `http://127.0.0.1:${port}`
  const service = await startService({
    name: 'the S3 fake (s3rver)',
    command: process.execPath,
    args: [join(root, 'node_modules', 's3rver', 'bin', 's3rver.js'), '--directory', dir, '--address', '127.0.0.1', '--port', String(port), '--silent', '--configure-bucket', bucket],
    ready: async () => {
      try {
        return (await fetch(`${endpoint}/`)).status < 500
      } catch {
        return false
      }
    },
    logFile: join(dir, '..', 's3rver.log'),
  })
  log(`S3 fake listening on ${endpoint}`)
  return { endpoint, stop: service.stop }
}
