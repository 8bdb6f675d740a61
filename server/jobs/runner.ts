import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import { Op } from 'sequelize'
import { isDatabaseUnavailable } from '../lib/db-errors'
import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import { ProcessingJob } from '../models'
import type { PipelineOutput } from '../spectra/pipeline'
import type { ProcessingQueue } from '../context'
import { librarySpecFor } from '../services/standards.service'
import { activeLibraryVersionId, claimJobs, loadInput, recordFailure, releaseJobs, renewLeases, returnLapsed, storeOutput, type ClaimedJob } from './process'
import runTask, { type LibrarySpec } from './worker'

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
  private pool: Piscina | null = null
  private inflight = 0
  private readonly threads: number
  private readonly capacity: number
  private stopped = false
  private pumping = false
  private again = false
  private idleWaiters: (() => void)[] = []
  /** Library specs by version id: versions are immutable once published. */
  private specs = new Map<number, Promise<LibrarySpec>>()
  private running = new Set<number>()
  /** Jobs this runner gave up on when the database went away; they go back to the queue when it returns. */
  private abandoned = new Set<number>()
  private timer: NodeJS.Timeout | null = null
  private readonly pollMs: number
  private readonly leaseMs: number

  constructor(private readonly options: RunnerOptions) {
    this.threads = options.inline ? 1 : options.threads > 0 ? options.threads : Math.max(1, availableParallelism() - 1)
    this.capacity = options.inline ? 1 : this.threads * 2
    this.pollMs = (options.pollSeconds ?? 5) * 1000
    this.leaseMs = (options.leaseSeconds ?? 120) * 1000
  }

  /** Starts taking jobs; jobs whose runner died come back through their lapsed leases. */
  async start(): Promise<void> {
    if (!this.options.inline) {
      this.pool = new Piscina({ filename: new URL('./worker.ts', import.meta.url).href, maxThreads: this.threads, minThreads: 1, idleTimeout: 60_000 })
    }
    this.timer = setInterval(() => void this.tick(), this.pollMs)
    this.timer.unref()
    await this.tick()
  }

  /** Renews the leases of the jobs this runner holds, returns lapsed ones to the queue, and takes work. */
  async tick(): Promise<void> {
    if (this.stopped) return
    try {
      await renewLeases([...this.running], this.leaseMs)
      if (this.abandoned.size > 0) {
        const ids = [...this.abandoned]
        await releaseJobs(ids)
        for (const id of ids) this.abandoned.delete(id)
      }
      const lapsed = await returnLapsed([...this.running])
      if (lapsed > 0) this.options.logger.warn({ jobs: lapsed }, 'jobs whose lease lapsed went back to the queue')
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

  private async pump(): Promise<void> {
    if (this.pumping) {
      this.again = true
      return
    }
    this.pumping = true
    try {
      do {
        this.again = false
        while (!this.stopped && this.inflight < this.capacity) {
          const jobs = await claimJobs(this.options.sequelize, this.capacity - this.inflight, this.leaseMs)
          if (jobs.length === 0) break
          for (const job of jobs) {
            this.inflight++
            void this.run(job).finally(() => {
              this.inflight--
              if (this.inflight === 0) this.notifyIdle()
              this.poke()
            })
          }
        }
      } while (this.again && !this.stopped)
    } finally {
      this.pumping = false
    }
    if (this.inflight === 0) this.notifyIdle()
  }

  private async run(job: ClaimedJob): Promise<void> {
    const { logger } = this.options
    this.running.add(job.id)
    try {
      const input = await loadInput(job.spectrumId)
      const versionId = await activeLibraryVersionId()
      if (versionId !== undefined) input.library = await this.specFor(versionId)
      const output = this.pool ? ((await this.pool.run(input)) as PipelineOutput) : runTask(input)
      await storeOutput(this.options.sequelize, job, output, versionId)
      logger.debug({ spectrumId: job.spectrumId, seconds: output.seconds }, 'spectrum measured')
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error)
      if (this.stopped || isDatabaseUnavailable(error)) {
        // Not the spectrum's fault: the job keeps its row and goes back to the queue.
        logger.warn({ spectrumId: job.spectrumId, err: message }, 'spectrum processing stopped before it finished; it goes back to the queue')
        this.abandoned.add(job.id)
        return
      }
      logger.warn({ spectrumId: job.spectrumId, err: message }, 'spectrum processing failed')
      try {
        await recordFailure(job, message)
      } catch (e) {
        // The lease returns the job to the queue if this could not be written.
        logger.warn({ spectrumId: job.spectrumId, err: (e as Error).message }, 'could not record the failure')
      }
    } finally {
      this.running.delete(job.id)
    }
  }

  private specFor(versionId: number): Promise<LibrarySpec> {
    let spec = this.specs.get(versionId)
    if (!spec) {
      spec = librarySpecFor(versionId)
      spec.catch(() => this.specs.delete(versionId))
      this.specs.set(versionId, spec)
    }
    return spec
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
    const held = [...this.running]
    await this.pool?.destroy()
    this.pool = null
    try {
      await releaseJobs([...new Set([...held, ...this.abandoned])])
    } catch {
      // Without the database the leases lapse and return them instead.
    }
  }
}
