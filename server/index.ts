import { createServer } from 'node:http'
import { fileURLToPath } from 'node:url'
import { createApp } from './app'
import { loadConfig } from './config'
import { createSequelize } from './db'
import { createLogger } from './lib/logger'
import { settleBackground } from './lib/background'
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp'
import { createMailer } from './mail/mailer'
import { ReadPool } from './jobs/reading'
import { JobRunner } from './jobs/runner'
import { RedisPublisher } from './jobs/redis'
import { moveRawFilesToStore } from './services/spectra.service'
import { ensureDefaultLibrary } from './services/standards.service'
import { auditFromWorker, setAuditRunner, type AuditWorkerResult } from './services/audit.service'
import { Piscina } from 'piscina'
import { createFileStore } from './storage'

/** Exit code for a setting the server cannot work with (sysexits EX_CONFIG): `npm start` does not retry it. */
const CONFIG_ERROR = 78

/** A start-up problem the person starting the server can fix: said in one line, no stack trace. */
class StartupError extends Error {}

function fail(error: unknown): never {
  const message = error instanceof Error ? error.message : String(error)
  console.error(`[lineweight] cannot start: ${message}`)
  process.exit(error instanceof StartupError ? CONFIG_ERROR : 1)
}

let config
try {
  config = loadConfig()
} catch (error) {
  fail(new StartupError((error as Error).message))
}
const logger = createLogger(config.LOG_LEVEL)
const sequelize = createSequelize(config)
try {
  await sequelize.authenticate()
} catch (error) {
  fail(new Error(`MariaDB at ${config.DB_HOST}:${config.DB_PORT} cannot be reached (${(error as Error).message}).`))
}
await ensureDefaultLibrary(sequelize)
const files = await createFileStore(config)
logger.info(`uploaded files are kept on ${files.description}`)
await moveRawFilesToStore({ files, logger })

let fakeSmtp: FakeSmtp | null = null
if (config.MAIL_MODE === 'fake') {
  // Unless SMTP_PORT names one, the mail catcher takes any free port: nothing outside the server talks to it.
  const wanted = config.SMTP_PORT ?? 0
  try {
    fakeSmtp = await startFakeSmtp(wanted)
  } catch (error) {
    fail(new StartupError((error as Error).message))
  }
  logger.info(`mail catcher listening on 127.0.0.1:${fakeSmtp.port}${wanted === 0 ? ' (a free port; set SMTP_PORT to choose one)' : ''}`)
}
const mailer = createMailer({ ...config, SMTP_PORT: fakeSmtp?.port ?? config.SMTP_PORT ?? 2525 })
// The audit grows with the stored calls: a thread of its own keeps requests answered meanwhile.
// Kept started, so the first audit does not wait for a thread to load the code and connect.
const auditPool = new Piscina({ filename: new URL('./jobs/audit-worker.ts', import.meta.url).href, maxThreads: 1, minThreads: 1, idleTimeout: Number.POSITIVE_INFINITY })
setAuditRunner(async (query, campaign) =>
  auditFromWorker((await auditPool.run({ campaign, campaignId: query.campaignId, from: query.from?.toISOString() ?? null, to: query.to?.toISOString() ?? null })) as AuditWorkerResult),
)
// Uploaded files are read and archives unpacked in threads of their own, not on the request thread.
const reading = new ReadPool({ threads: config.READ_THREADS })
// QUEUE=redis: this process only publishes; `npm run worker` processes run the pipeline.
const jobs =
  config.QUEUE === 'redis'
    ? new RedisPublisher(config.REDIS_URL, logger)
    : new JobRunner({ sequelize, logger, threads: config.WORKERS, pollSeconds: config.JOB_POLL_SECONDS, leaseSeconds: config.JOB_LEASE_SECONDS })
const app = createApp({ config, sequelize, mailer, logger, jobs, files, reading }, { clientDir: fileURLToPath(new URL('../dist', import.meta.url)) })
const server = createServer(app)
await new Promise<void>((resolve) => {
  server.once('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EADDRINUSE') fail(new StartupError(`PORT ${config.PORT} on ${config.HOST} is already in use; stop whatever holds it, or set PORT to a free port.`))
    fail(error)
  })
  server.listen(config.PORT, config.HOST, resolve)
})
// Jobs are taken only once the port is ours: a server that cannot start must not hold jobs until their leases lapse.
if (jobs instanceof JobRunner) await jobs.start()
logger.info(config.QUEUE === 'redis' ? `processing jobs go to Redis at ${new URL(config.REDIS_URL).host}; run \`npm run worker\` to process them` : 'processing jobs run in this server')
logger.info(`Lineweight is serving on ${config.publicUrl}`)

async function shutdown() {
  server.close()
  server.closeAllConnections()
  if (jobs instanceof JobRunner) await jobs.stop()
  else await jobs.close()
  await auditPool.destroy()
  await reading.close()
  await settleBackground()
  await fakeSmtp?.close()
  mailer.close()
  await sequelize.close()
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown())
process.on('SIGINT', () => void shutdown())
