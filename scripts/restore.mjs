// `npm run restore FOLDER`: puts back a backup made by `npm run backup` (database and stored files).
import { spawn, spawnSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { cpSync, createReadStream, existsSync, mkdirSync, readFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { appEnv, ensureDebianPackages, log, portInUse, startMariaDB } from './lib/setup.mjs'

const { env, dataDir, manageDb } = appEnv()
const arg = process.argv[2]
if (!arg) {
  console.error('[lineweight] usage: npm run restore FOLDER (a folder written by npm run backup)')
  process.exit(2)
}
const folder = resolve(arg)
const fail = (message) => {
  console.error(`[lineweight] restore refused: ${message}`)
  process.exit(1)
}
if (!existsSync(join(folder, 'manifest.json')) || !existsSync(join(folder, 'database.sql'))) fail(`${folder} is not a Lineweight backup (no manifest.json or database.sql).`)
const manifest = JSON.parse(readFileSync(join(folder, 'manifest.json'), 'utf8'))
if (manifest.format !== 'lineweight-backup-1') fail(`unknown backup format ${manifest.format}.`)
const sha = createHash('sha256')
  .update(readFileSync(join(folder, 'database.sql')))
  .digest('hex')
if (sha !== manifest.databaseSql.sha256) fail('database.sql does not match its manifest (damaged or changed).')
// Replacing the data under a running server would mix two states.
if (await portInUse(env.PORT, env.HOST)) fail(`something listens on PORT=${env.PORT}; stop Lineweight first.`)
ensureDebianPackages({ mariadb: 'mariadb-client' })

const db = manageDb ? await startMariaDB({ dir: join(dataDir, 'mariadb'), port: Number(env.DB_PORT) }) : { stop: async () => {} }
const client = (args, input) =>
  spawnSync('mariadb', ['--no-defaults', `--host=${env.DB_HOST}`, `--port=${env.DB_PORT}`, `--user=${env.DB_USER}`, '--protocol=tcp', '--default-character-set=utf8mb4', ...args, env.DB_NAME], {
    env: { ...process.env, MYSQL_PWD: env.DB_PASSWORD },
    input,
    encoding: 'utf8',
  })
try {
  log(`emptying database ${env.DB_NAME}`)
  const tables = client(['--batch', '--skip-column-names', '-e', 'SHOW FULL TABLES'])
  if (tables.status !== 0) throw new Error(tables.stderr.trim())
  const names = tables.stdout
    .split('\n')
    .filter(Boolean)
    .map((l) => l.split('\t'))
  const drop = names.map(([name, type]) => `DROP ${type === 'VIEW' ? 'VIEW' : 'TABLE'} IF EXISTS \`${name.replace(/`/g, '``')}\`;`)
  const dropped = client([], ['SET FOREIGN_KEY_CHECKS=0;', ...drop, 'SET FOREIGN_KEY_CHECKS=1;'].join('\n'))
  if (dropped.status !== 0) throw new Error(dropped.stderr.trim())

  log(`loading ${join(folder, 'database.sql')}`)
  await new Promise((resolvePromise, reject) => {
    const load = spawn('mariadb', ['--no-defaults', `--host=${env.DB_HOST}`, `--port=${env.DB_PORT}`, `--user=${env.DB_USER}`, '--protocol=tcp', '--default-character-set=utf8mb4', env.DB_NAME], {
      env: { ...process.env, MYSQL_PWD: env.DB_PASSWORD },
      stdio: ['pipe', 'ignore', 'pipe'],
    })
    let err = ''
    load.stderr.on('data', (d) => (err += d))
    createReadStream(join(folder, 'database.sql')).pipe(load.stdin)
    load.on('exit', (code) => (code === 0 ? resolvePromise() : reject(new Error(`loading the dump failed (${code}): ${err.trim()}`))))
  })

  log(`copying stored files into ${env.STORAGE_DIR}`)
  mkdirSync(env.STORAGE_DIR, { recursive: true })
  if (existsSync(join(folder, 'files'))) cpSync(join(folder, 'files'), env.STORAGE_DIR, { recursive: true, force: true })
  log(`restored the backup of ${manifest.createdAt} (${manifest.files.count} stored files)`)
} catch (error) {
  console.error(`[lineweight] restore failed: ${error instanceof Error ? error.message : error}`)
  process.exitCode = 1
} finally {
  await db.stop()
}
