// `npm run backup [FOLDER]`: a consistent MariaDB dump plus the stored files, into a dated folder.
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { cpSync, createWriteStream, existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { appEnv, ensureDebianPackages, log, startMariaDB } from './lib/setup.mjs'

const { env, dataDir, manageDb } = appEnv()
ensureDebianPackages({ 'mariadb-dump': 'mariadb-client' })
const stamp = new Date()
  .toISOString()
  .replace(/:/g, '-')
  .replace(/\.\d+Z$/, 'Z')
const folder = resolve(process.argv[2] ?? join(env.BACKUP_DIR ?? join(dataDir, 'backups'), `lineweight-${stamp}`))
if (existsSync(folder) && readdirSync(folder).length > 0) {
  console.error(`[lineweight] ${folder} is not empty; choose another folder.`)
  process.exit(1)
}
mkdirSync(folder, { recursive: true })

// With the private MariaDB, start it for the backup when the app is not running (stopped again afterwards).
const db = manageDb ? await startMariaDB({ dir: join(dataDir, 'mariadb'), port: Number(env.DB_PORT) }) : { stop: async () => {} }
try {
  // One transaction gives a snapshot of every table at one moment, without locking the running app out.
  log(`dumping database ${env.DB_NAME}`)
  const dumpFile = join(folder, 'database.sql')
  await new Promise((resolvePromise, reject) => {
    const out = createWriteStream(dumpFile)
    const dump = spawn(
      'mariadb-dump',
      [
        '--no-defaults',
        `--host=${env.DB_HOST}`,
        `--port=${env.DB_PORT}`,
        `--user=${env.DB_USER}`,
        '--protocol=tcp',
        '--single-transaction',
        '--quick',
        '--routines',
        '--triggers',
        '--hex-blob',
        '--default-character-set=utf8mb4',
        '--skip-lock-tables',
        env.DB_NAME,
      ],
      { env: { ...process.env, MYSQL_PWD: env.DB_PASSWORD }, stdio: ['ignore', 'pipe', 'pipe'] },
    )
    let err = ''
    dump.stderr.on('data', (d) => (err += d))
    dump.stdout.pipe(out)
    dump.on('exit', (code) => out.end(() => (code === 0 ? resolvePromise() : reject(new Error(`mariadb-dump failed (${code}): ${err.trim()}`)))))
  })

  // Stored files never change once written and are written before the rows that name them, so
  // copying them after the dump holds every file the dump refers to.
  const files = join(folder, 'files')
  let count = 0
  let bytes = 0
  if (existsSync(env.STORAGE_DIR)) {
    log(`copying stored files from ${env.STORAGE_DIR}`)
    cpSync(env.STORAGE_DIR, files, {
      recursive: true,
      filter: (source) => {
        if (source.includes(`${join(env.STORAGE_DIR, '.incoming')}`) || source.endsWith('.part')) return false
        const s = statSync(source)
        if (s.isFile()) {
          count++
          bytes += s.size
        }
        return true
      },
    })
  } else mkdirSync(files)
  const sql = readFileSync(dumpFile)
  const manifest = {
    format: 'lineweight-backup-1',
    createdAt: new Date().toISOString(),
    database: env.DB_NAME,
    databaseSql: { bytes: sql.length, sha256: createHash('sha256').update(sql).digest('hex') },
    files: { count, bytes },
  }
  writeFileSync(join(folder, 'manifest.json'), JSON.stringify(manifest, null, 2) + '\n')
  log(`backup written to ${folder} (database ${(sql.length / 1e6).toFixed(1)} MB, ${count} stored files)`)
  console.log(folder)
} catch (error) {
  console.error(`[lineweight] backup failed: ${error instanceof Error ? error.message : error}`)
  process.exitCode = 1
} finally {
  await db.stop()
}
