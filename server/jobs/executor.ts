import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import { isDatabaseUnavailable } from '../lib/db-errors'
import { librarySpecFor } from '../services/standards.service'
import { loadJob, recordFailure, releaseJobs, renewLeases, returnLapsed, storeOutput, type ClaimedJob } from './process'
import runTask, { shareLibrarySpec, type SharedLibrarySpec, type StoredPipelineOutput } from './worker'

export interface ExecutorOptions {
  sequelize: Sequelize
  logger: Logger
  /** Worker threads; 0 = one fewer than the cores (at least one). */
  threads: number
  /** Run the pipeline on the calling thread (tests, the CLI). */
  inline?: boolean
  /** How long a running job is held without a renewal before it goes back to the queue, seconds. @default 120 */
  leaseSeconds?: number
}

/**
 * Runs claimed jobs: loads the input, runs the pipeline in a pool of worker threads, stores the
 * output. It keeps the leases of the jobs it holds and knows which ones it had to give up; the
 * queues (database or Redis) decide which jobs it gets.
 */
export class JobExecutor {
  private pool: Piscina | null = null
  readonly threads: number
  readonly leaseMs: number
  /** Library specs by version id: versions are immutable once published. */
  private specs = new Map<number, Promise<SharedLibrarySpec>>()
  readonly running = new Set<number>()
  /** Jobs given up when the database went away or the executor stopped; they go back to the queue. */
  private abandoned = new Set<number>()
  /** Runs not yet settled, so that stopping can wait for loads and stores in progress. */
  private settling = new Set<Promise<void>>()
  private stopped = false

  constructor(private readonly options: ExecutorOptions) {
    this.threads = options.inline ? 1 : options.threads > 0 ? options.threads : Math.max(1, availableParallelism() - 1)
    this.leaseMs = (options.leaseSeconds ?? 120) * 1000
    if (!options.inline) {
      this.pool = new Piscina({ filename: new URL('./worker.ts', import.meta.url).href, maxThreads: this.threads, minThreads: 1, idleTimeout: 60_000 })
    }
  }

  /** Renews held leases, gives back what was abandoned, and returns anyone's lapsed jobs to the queue. */
  async keepLeases(): Promise<number> {
    await renewLeases([...this.running], this.leaseMs)
    if (this.abandoned.size > 0) {
      const ids = [...this.abandoned]
      await releaseJobs(ids)
      for (const id of ids) this.abandoned.delete(id)
    }
    const lapsed = await returnLapsed([...this.running])
    if (lapsed > 0) this.options.logger.warn({ jobs: lapsed }, 'jobs whose lease lapsed went back to the queue')
    return lapsed
  }

  async run(job: ClaimedJob): Promise<void> {
    const settled = this.execute(job)
    this.settling.add(settled)
    try {
      await settled
    } finally {
      this.settling.delete(settled)
    }
  }

  private async execute(job: ClaimedJob): Promise<void> {
    const { logger } = this.options
    this.running.add(job.id)
    try {
      if (this.stopped) throw new Error('stopping')
      const { input, versionId } = await loadJob(job.spectrumId)
      if (versionId !== undefined) input.library = await this.specFor(versionId)
      if (this.stopped) throw new Error('stopping')
      const output = this.pool ? ((await this.pool.run(input)) as StoredPipelineOutput) : runTask(input)
      await storeOutput(this.options.sequelize, job, output, versionId)
      logger.info({ jobId: job.id, spectrumId: job.spectrumId, seconds: output.seconds }, 'spectrum measured')
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

  private specFor(versionId: number): Promise<SharedLibrarySpec> {
    let spec = this.specs.get(versionId)
    if (!spec) {
      spec = librarySpecFor(versionId).then(shareLibrarySpec)
      spec.catch(() => this.specs.delete(versionId))
      this.specs.set(versionId, spec)
    }
    return spec
  }

  /**
   * Stops the threads and waits for the runs in progress to store their result or give up; jobs
   * given up go back to the queue for any runner to take, not to a lease that lapses minutes later.
   */
  async stop(): Promise<void> {
    this.stopped = true
    await this.pool?.destroy()
    this.pool = null
    await Promise.allSettled([...this.settling])
    try {
      await releaseJobs([...new Set([...this.running, ...this.abandoned])])
    } catch {
      // Without the database the leases lapse and return them instead.
    }
  }
}
