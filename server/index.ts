import { createServer } from 'node:http'
import { fileURLToPath } from 'node:url'
import { createApp } from './app'
import { loadConfig } from './config'
import { createSequelize } from './db'
import { createLogger } from './lib/logger'
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp'
import { createMailer } from './mail/mailer'
import { JobRunner } from './jobs/runner'
import { moveRawFilesToStore } from './services/spectra.service'
import { ensureDefaultLibrary } from './services/standards.service'
import { createFileStore } from './storage'

const config = loadConfig()
const logger = createLogger(config.LOG_LEVEL)
const sequelize = createSequelize(config)
await sequelize.authenticate()
await ensureDefaultLibrary(sequelize)
const files = await createFileStore(config)
logger.info(`uploaded files are kept on ${files.description}`)
await moveRawFilesToStore({ files, logger })

let fakeSmtp: FakeSmtp | null = null
if (config.MAIL_MODE === 'fake') {
  fakeSmtp = await startFakeSmtp(config.SMTP_PORT)
  config.SMTP_PORT = fakeSmtp.port
}
const mailer = createMailer(config)
const jobs = new JobRunner({ sequelize, logger, threads: config.WORKERS, pollSeconds: config.JOB_POLL_SECONDS, leaseSeconds: config.JOB_LEASE_SECONDS })
await jobs.start()
const app = createApp({ config, sequelize, mailer, logger, jobs, files }, { clientDir: fileURLToPath(new URL('../dist', import.meta.url)) })
const server = createServer(app)
server.listen(config.PORT, config.HOST, () => {
  logger.info(`Lineweight is serving on ${config.publicUrl}`)
})

async function shutdown() {
  server.close()
  server.closeAllConnections()
  await jobs.stop()
  await fakeSmtp?.close()
  mailer.close()
  await sequelize.close()
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown())
process.on('SIGINT', () => void shutdown())
