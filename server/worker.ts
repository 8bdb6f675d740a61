// `npm run worker`: a processing process for QUEUE=redis. Start any number, on any machine that
// reaches Redis, MariaDB and the file store; each runs WORKERS pipeline threads.
import { loadConfig } from './config'
import { createSequelize } from './db'
import { RedisRunner } from './jobs/redis'
import { createLogger } from './lib/logger'
import { ensureDefaultLibrary } from './services/standards.service'

let config
try {
  config = loadConfig()
} catch (error) {
  console.error(`[lineweight worker] cannot start: ${(error as Error).message}`)
  process.exit(78)
}
const logger = createLogger(config.LOG_LEVEL)
const sequelize = createSequelize(config)
try {
  await sequelize.authenticate()
} catch (error) {
  console.error(`[lineweight worker] cannot start: MariaDB at ${config.DB_HOST}:${config.DB_PORT} cannot be reached (${(error as Error).message}).`)
  process.exit(1)
}
await ensureDefaultLibrary(sequelize)
const runner = new RedisRunner({ sequelize, logger, threads: config.WORKERS, leaseSeconds: config.JOB_LEASE_SECONDS, pollSeconds: config.JOB_POLL_SECONDS, redisUrl: config.REDIS_URL })
await runner.start()
logger.info(`worker ${process.pid} takes jobs from Redis at ${new URL(config.REDIS_URL).host} with ${runner.threads} thread(s)`)

async function shutdown() {
  await runner.stop()
  await sequelize.close()
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown())
process.on('SIGINT', () => void shutdown())
