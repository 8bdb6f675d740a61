import { Op } from 'sequelize'
import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import { isDatabaseUnavailable } from '../lib/db-errors'
import { ProcessingJob } from '../models'
import type { ProcessingQueue } from '../context'
import { JobExecutor } from './executor'
import { claimJobs } from './process'

export interface RunnerOptions {
  sequelize: Sequelize
  logger: Logger
  /** Worker threads; 0 = one fewer than the cores (at least one). */
  threads: number
  /** Run the pipeline on the calling thread (tests, the CLI). */
  inline?: boolean
  /** How often the queue is looked at without being woken, seconds. @default 5 */
  pollSeconds?: number
  /** How long a running job is held without a renewal before it goes back to the queue, seconds. @default 120 */
  leaseSeconds?: number
}

/**
 * The processing queue on the database: uploads add a job row in their own transaction; this runner
 * claims queued rows (`FOR UPDATE SKIP LOCKED`, so several runners never wait on or take the same
 * row), runs the pipeline in a pool of worker threads and stores what it returns. It keeps a few
 * more jobs in hand than it has threads, so loading and storing overlap with computing. Besides
 * being woken by uploads it looks at the queue on a timer, so work resumes by itself after a
 * database outage. A running job holds a lease that its runner renews on each tick; a job whose
 * lease lapses (its runner died, or lost the database mid-job) goes back to the queue, whoever
 * notices first. Nothing is reset at start-up: with several runners, only the lease can tell.
 */
export class JobRunner implements ProcessingQueue {
  private readonly executor: JobExecutor
  private inflight = 0
  private readonly capacity: number
  /** Free slots that make a claim worth its round trips. */
  private readonly batch: number
  private stopped = false
  private pumping = false
  /** The latest pass of claiming, so that stopping can wait for a claim in flight. */
  private pumped: Promise<void> = Promise.resolve()
  private again = false
  private idleWaiters: (() => void)[] = []
  private timer: NodeJS.Timeout | null = null
  private readonly pollMs: number

  constructor(private readonly options: RunnerOptions) {
    this.executor = new JobExecutor(options)
    this.capacity = options.inline ? 1 : this.executor.threads * 2
    this.batch = options.inline ? 1 : this.executor.threads
    this.pollMs = (options.pollSeconds ?? 5) * 1000
  }

  /** Starts taking jobs; jobs whose runner died come back through their lapsed leases. */
  async start(): Promise<void> {
    this.timer = setInterval(() => void this.tick(), this.pollMs)
    this.timer.unref()
    await this.tick()
  }

  /** Renews the leases of the jobs this runner holds, returns lapsed ones to the queue, and takes work. */
  async tick(): Promise<void> {
    if (this.stopped) return
    try {
      await this.executor.keepLeases()
    } catch (error) {
      this.options.logger.warn({ err: (error as Error).message }, 'job queue tick failed; trying again on the next one')
      return
    }
    this.poke()
  }

  /** Wakes the runner; the job row itself is written by the caller's transaction. */
  enqueue(): void {
    this.poke()
  }

  poke(): void {
    if (this.stopped) return
    void this.pump().catch((error: unknown) => {
      if (isDatabaseUnavailable(error)) this.options.logger.warn({ err: (error as Error).message }, 'job queue cannot reach the database; the next tick tries again')
      else this.options.logger.error({ err: error }, 'job queue failed')
    })
  }

  private pump(): Promise<void> {
    if (this.pumping) {
      this.again = true
      return Promise.resolve()
    }
    this.pumping = true
    this.pumped = this.claimAndRun()
    return this.pumped
  }

  private async claimAndRun(): Promise<void> {
    try {
      do {
        this.again = false
        // Claims wait until a thread's worth of slots is free: one claim (a transaction of five
        // statements) then serves several jobs, and the jobs still in hand keep the threads busy.
        while (!this.stopped && this.capacity - this.inflight >= this.batch) {
          const jobs = await claimJobs(this.options.sequelize, this.capacity - this.inflight, this.executor.leaseMs)
          if (jobs.length === 0) break
          for (const job of jobs) {
            this.inflight++
            void this.executor.run(job).finally(() => {
              this.inflight--
              if (this.inflight === 0) this.notifyIdle()
              this.poke()
            })
          }
        }
      } while (this.again && !this.stopped)
    } finally {
      // Cleared with no await after the last look at `again`, so no wake-up falls in between.
      this.pumping = false
      if (this.inflight === 0) this.notifyIdle()
    }
  }

  /** Resolves when nothing is queued or running (tests and shutdown). */
  async idle(): Promise<void> {
    for (;;) {
      if (this.inflight === 0 && (await ProcessingJob.count({ where: { status: { [Op.in]: ['queued', 'running'] } } })) === 0) return
      await new Promise<void>((resolve) => {
        this.idleWaiters.push(resolve)
        setTimeout(resolve, 200)
      })
    }
  }

  private notifyIdle(): void {
    const waiters = this.idleWaiters
    this.idleWaiters = []
    for (const w of waiters) w()
  }

  /** Stops taking work; jobs still in hand go back to the queue for any runner to take. */
  async stop(): Promise<void> {
    this.stopped = true
    if (this.timer) clearInterval(this.timer)
    // A claim in flight hands its jobs to the executor, which gives them back when it stops.
    await this.pumped.catch(() => undefined)
    await this.executor.stop()
  }
}
