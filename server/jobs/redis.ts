// Processing on a Redis queue (BullMQ): the web process publishes, `npm run worker` processes —
// any number of them, on any machine that reaches Redis, MariaDB and the file store.
import { Queue, Worker, type ConnectionOptions } from 'bullmq'
import type { Logger } from 'pino'
import { Op, QueryTypes } from 'sequelize'
import type { ProcessingQueue } from '../context'
import { ProcessingJob } from '../models'
import { JobExecutor, type ExecutorOptions } from './executor'
import { claimJobs } from './process'

export const QUEUE_NAME = 'lineweight-processing'

/** ioredis settings from a redis:// URL; BullMQ needs maxRetriesPerRequest null for its blocking reads. */
export function redisConnection(url: string): ConnectionOptions {
  const u = new URL(url)
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    ...(u.username ? { username: decodeURIComponent(u.username) } : {}),
    ...(u.password ? { password: decodeURIComponent(u.password) } : {}),
    db: Number(u.pathname.slice(1) || 0),
    maxRetriesPerRequest: null,
  }
}

/** One message per spectrum while it waits: adding it again is a no-op until a worker has taken it. */
const message = (spectrumId: number) => ({ name: 'process', data: { spectrumId }, opts: { jobId: `spectrum-${spectrumId}`, removeOnComplete: true, removeOnFail: true } })

/**
 * The web side: tells the workers that a spectrum has a queued job. The processing_jobs row,
 * written in the upload's own transaction, stays the record; the message only says where to look,
 * so a message lost (Redis restarted, the web process died between the two) is sent again by the
 * workers' sweep of queued rows.
 */
export class RedisPublisher implements ProcessingQueue {
  readonly queue: Queue

  constructor(
    url: string,
    private readonly logger: Logger,
  ) {
    this.queue = new Queue(QUEUE_NAME, { connection: redisConnection(url) })
    this.queue.on('error', (error) => logger.warn({ err: error.message }, 'Redis queue error'))
  }

  enqueue(spectrumId: number): void {
    const m = message(spectrumId)
    this.queue.add(m.name, m.data, m.opts).catch((error: unknown) => this.logger.warn({ spectrumId, err: (error as Error).message }, 'could not publish a job; the workers’ sweep will'))
  }

  async close(): Promise<void> {
    await this.queue.close()
  }
}

export interface RedisRunnerOptions extends ExecutorOptions {
  redisUrl: string
  /** How often queued rows are swept into Redis and leases renewed, seconds. @default 5 */
  pollSeconds?: number
}

/**
 * The worker side: takes messages from Redis, claims the spectrum's queued job row (SKIP LOCKED,
 * so a message delivered twice or a row swept twice is still done once), and runs it. Every
 * `pollSeconds` it renews its leases, returns lapsed jobs of any worker to the queue and publishes
 * queued rows that have no message.
 */
export class RedisRunner {
  private readonly executor: JobExecutor
  private readonly publisher: RedisPublisher
  private worker: Worker | null = null
  private timer: NodeJS.Timeout | null = null
  private stopped = false

  constructor(private readonly options: RedisRunnerOptions) {
    this.executor = new JobExecutor(options)
    this.publisher = new RedisPublisher(options.redisUrl, options.logger)
  }

  get threads(): number {
    return this.executor.threads
  }

  async start(): Promise<void> {
    // Twice as many messages in hand as threads, so loading and storing overlap with computing.
    this.worker = new Worker(QUEUE_NAME, async (job) => this.handle(Number((job.data as { spectrumId: number }).spectrumId)), {
      connection: redisConnection(this.options.redisUrl),
      concurrency: this.executor.threads * 2,
    })
    this.worker.on('error', (error) => this.options.logger.warn({ err: error.message }, 'Redis worker error'))
    const pollMs = (this.options.pollSeconds ?? 5) * 1000
    this.timer = setInterval(() => void this.tick(), pollMs)
    this.timer.unref()
    await this.tick()
  }

  private async handle(spectrumId: number): Promise<void> {
    if (this.stopped) throw new Error('worker stopping')
    const [job] = await claimJobs(this.options.sequelize, 1, this.executor.leaseMs, spectrumId)
    // Nothing queued: another worker took it, or it was done already.
    if (!job) return
    await this.executor.run(job)
    // A newer job for the same spectrum may have been queued while this one ran.
    const more = await ProcessingJob.count({ where: { spectrumId, status: 'queued' } })
    if (more > 0) this.publisher.enqueue(spectrumId)
  }

  /** Leases, lapsed jobs, and queued rows without a message. */
  async tick(): Promise<void> {
    if (this.stopped) return
    try {
      await this.executor.keepLeases()
      const rows = await this.options.sequelize.query<{ spectrum_id: number }>(
        "SELECT DISTINCT spectrum_id FROM processing_jobs WHERE status = 'queued' AND created_at < NOW(3) - INTERVAL 2 SECOND ORDER BY spectrum_id LIMIT 5000",
        { type: QueryTypes.SELECT },
      )
      if (rows.length > 0) await this.publisher.queue.addBulk(rows.map((r) => message(Number(r.spectrum_id))))
    } catch (error) {
      this.options.logger.warn({ err: (error as Error).message }, 'worker sweep failed; trying again on the next one')
    }
  }

  /** Resolves when no job is queued or running anywhere. */
  async idle(): Promise<void> {
    while ((await ProcessingJob.count({ where: { status: { [Op.in]: ['queued', 'running'] } } })) > 0) await new Promise((r) => setTimeout(r, 200))
  }

  async stop(): Promise<void> {
    this.stopped = true
    if (this.timer) clearInterval(this.timer)
    await this.worker?.close()
    await this.executor.stop()
    await this.publisher.close()
  }
}
