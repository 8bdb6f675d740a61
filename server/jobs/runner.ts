import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import { Op } from 'sequelize'
import { isDatabaseUnavailable } from '../lib/db-errors'
import type { Logger } from 'pino'
import type { Sequelize } from 'sequelize'
import { bufferToFloat32, bufferToFloat64, float32ToBuffer } from '../lib/binary'
import { Campaign, Instrument, LibraryVersion, LineMeasurementRow, Measurement, ProcessingJob, Spectrum, SpectrumBlob } from '../models'
import { resolutionFwhm, type PipelineOutput } from '../spectra/pipeline'
import type { ProcessingQueue } from '../context'
import { librarySpecFor } from '../services/standards.service'
import { storeSuggestion, suggestionDetails } from '../services/suggestions.service'
import runTask, { type LibrarySpec, type WorkerTask } from './worker'

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

/** Statuses a fresh measurement may move a spectrum on from; review states are never touched. */
const PRE_REVIEW = new Set(['received', 'failed', 'measured'])
/** Statuses a fresh suggestion may move a spectrum on from (to 'suggested'). */
const PRE_REVIEW_SUGGESTED = new Set([...PRE_REVIEW, 'suggested'])

/**
 * The processing queue: uploads add a job row in their own transaction; this runner takes queued
 * rows one per free worker, runs the pipeline off the request path and stores what it returns.
 * Besides being woken by uploads it looks at the queue on a timer, so work resumes by itself after
 * a database outage. A running job holds a lease that the runner renews on each tick; a job whose
 * lease lapses (its runner died, or lost the database mid-job) goes back to the queue. The lease
 * lives on the job row, so a queue service or several runner machines can take the same rules.
 */
export class JobRunner implements ProcessingQueue {
  private pool: Piscina | null = null
  private inflight = 0
  private readonly capacity: number
  private stopped = false
  private pumping = false
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
    this.capacity = options.inline ? 1 : options.threads > 0 ? options.threads : Math.max(1, availableParallelism() - 1)
    this.pollMs = (options.pollSeconds ?? 5) * 1000
    this.leaseMs = (options.leaseSeconds ?? 120) * 1000
  }

  /** Resumes work left unfinished by a stop or a crash, then starts taking jobs. */
  async start(): Promise<void> {
    if (!this.options.inline) {
      this.pool = new Piscina({ filename: new URL('./worker.ts', import.meta.url).href, maxThreads: this.capacity, minThreads: 1, idleTimeout: 60_000 })
    }
    // One runner per database today: whatever is left running was this server's before a stop or crash.
    await ProcessingJob.update({ status: 'queued', startedAt: null, leaseExpiresAt: null }, { where: { status: 'running' } })
    this.timer = setInterval(() => void this.tick(), this.pollMs)
    this.timer.unref()
    this.poke()
  }

  /** Renews the leases of the jobs this runner holds, returns lapsed ones to the queue, and takes work. */
  async tick(): Promise<void> {
    if (this.stopped) return
    try {
      const now = new Date()
      if (this.running.size > 0) {
        await ProcessingJob.update({ leaseExpiresAt: new Date(now.getTime() + this.leaseMs) }, { where: { id: { [Op.in]: [...this.running] }, status: 'running' } })
      }
      if (this.abandoned.size > 0) {
        const ids = [...this.abandoned]
        await ProcessingJob.update({ status: 'queued', startedAt: null, leaseExpiresAt: null }, { where: { id: { [Op.in]: ids }, status: 'running' } })
        for (const id of ids) this.abandoned.delete(id)
      }
      const [lapsed] = await ProcessingJob.update(
        { status: 'queued', startedAt: null, leaseExpiresAt: null },
        { where: { status: 'running', id: { [Op.notIn]: [0, ...this.running] }, [Op.or]: [{ leaseExpiresAt: null }, { leaseExpiresAt: { [Op.lt]: now } }] } },
      )
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
    void this.pump().catch((error: unknown) => this.options.logger.error({ err: error }, 'job queue failed'))
  }

  private async pump(): Promise<void> {
    if (this.pumping) return
    this.pumping = true
    try {
      while (!this.stopped && this.inflight < this.capacity) {
        const job = await this.claim()
        if (!job) break
        this.inflight++
        void this.run(job).finally(() => {
          this.inflight--
          if (this.inflight === 0) this.notifyIdle()
          this.poke()
        })
      }
    } finally {
      this.pumping = false
    }
    if (this.inflight === 0) this.notifyIdle()
  }

  private async claim(): Promise<ProcessingJob | null> {
    for (;;) {
      const next = await ProcessingJob.findOne({ where: { status: 'queued' }, order: [['id', 'ASC']] })
      if (!next) return null
      const now = new Date()
      const [taken] = await ProcessingJob.update(
        { status: 'running', startedAt: now, attempts: next.attempts + 1, leaseExpiresAt: new Date(now.getTime() + this.leaseMs) },
        { where: { id: next.id, status: 'queued' } },
      )
      if (taken === 1) return next.reload()
    }
  }

  private async run(job: ProcessingJob): Promise<void> {
    const { logger } = this.options
    this.running.add(job.id)
    try {
      const input = await loadInput(job.spectrumId)
      const versionId = (await LibraryVersion.findOne({ where: { isActive: true }, attributes: ['id'] }))?.id
      if (versionId !== undefined) input.library = await this.specFor(versionId)
      const output = this.pool ? ((await this.pool.run(input)) as PipelineOutput) : runTask(input)
      await storeOutput(this.options.sequelize, job, output, versionId)
      logger.info({ spectrumId: job.spectrumId, seconds: output.seconds }, 'spectrum measured')
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error)
      if (isDatabaseUnavailable(error)) {
        // Not the spectrum's fault: the job keeps its row and goes back to the queue when its lease lapses.
        logger.warn({ spectrumId: job.spectrumId, err: message }, 'spectrum processing stopped: database unavailable')
        this.abandoned.add(job.id)
        return
      }
      logger.warn({ spectrumId: job.spectrumId, err: message }, 'spectrum processing failed')
      try {
        await ProcessingJob.update({ status: 'failed', error: message, finishedAt: new Date(), leaseExpiresAt: null }, { where: { id: job.id } })
        await Spectrum.update({ status: 'failed', statusReason: `Processing failed: ${message}` }, { where: { id: job.spectrumId, status: { [Op.in]: [...PRE_REVIEW] } } })
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

  async stop(): Promise<void> {
    this.stopped = true
    if (this.timer) clearInterval(this.timer)
    // Jobs still running go back to the queue on the next start.
    await this.pool?.destroy()
    this.pool = null
  }
}

async function loadInput(spectrumId: number): Promise<WorkerTask> {
  const [spectrum, blob] = await Promise.all([
    Spectrum.findByPk(spectrumId, { attributes: ['id', 'campaignId', 'resolutionFwhm', 'resolvingPower', 'instrumentId'] }),
    SpectrumBlob.findByPk(spectrumId, { attributes: ['wavelength', 'flux', 'error', 'mask'] }),
  ])
  if (!spectrum || !blob) throw new Error(`spectrum ${spectrumId} has no stored data`)
  const input: WorkerTask = {
    spectrum: {
      wavelength: bufferToFloat64(blob.wavelength),
      flux: bufferToFloat32(blob.flux),
      ...(blob.error ? { error: bufferToFloat32(blob.error) } : {}),
      ...(blob.mask ? { mask: new Uint8Array(blob.mask) } : {}),
    },
  }
  // The instrument's own standards are matched first; its resolution stands in for one the spectrum does not give.
  const instrument = spectrum.instrumentId !== null ? await Instrument.findByPk(spectrum.instrumentId, { attributes: ['id', 'resolutionFwhm'] }) : null
  if (instrument) input.instrumentId = instrument.id
  const fwhm = resolutionFwhm(spectrum.resolutionFwhm, spectrum.resolvingPower) ?? instrument?.resolutionFwhm ?? undefined
  if (fwhm !== undefined) input.inputFwhm = fwhm
  const campaign = await Campaign.findByPk(spectrum.campaignId, { attributes: ['id', 'regionMin', 'regionMax'] })
  if (campaign && campaign.regionMin > 0 && campaign.regionMax > campaign.regionMin) input.region = [campaign.regionMin, campaign.regionMax]
  return input
}

const finiteOrNull = (v: number | null | undefined) => (v !== null && v !== undefined && Number.isFinite(v) ? v : null)

async function storeOutput(sequelize: Sequelize, job: ProcessingJob, output: PipelineOutput, libraryVersionId: number | undefined): Promise<void> {
  const { analysis } = output
  const p = analysis.prepared
  const details = output.suggestion ? await suggestionDetails(output.suggestion, output.resolution, output.notes, output.standards) : null
  await sequelize.transaction(async (transaction) => {
    await Measurement.update({ isCurrent: false }, { where: { spectrumId: job.spectrumId, isCurrent: true }, transaction })
    const m = await Measurement.create(
      {
        spectrumId: job.spectrumId,
        pipelineVersion: output.pipelineVersion,
        isCurrent: true,
        snr: finiteOrNull(analysis.snr),
        rv: finiteOrNull(analysis.rv?.v),
        rvError: finiteOrNull(analysis.rv?.error),
        pseudoContinuum: analysis.pseudoContinuum,
        warnings: JSON.stringify(analysis.warnings),
        ratios: JSON.stringify(analysis.ratios),
        gridStart: p.grid.start,
        gridStep: p.grid.step,
        gridLength: p.grid.length,
        flux: float32ToBuffer(p.flux),
        continuum: float32ToBuffer(p.continuum),
        rectified: float32ToBuffer(p.rectified),
        mask: Buffer.from(p.mask),
        seconds: output.seconds,
      },
      { transaction },
    )
    await LineMeasurementRow.bulkCreate(
      analysis.lines.map((l) =>
        l.measured
          ? {
              measurementId: m.id,
              lineId: l.id,
              measured: true,
              reason: l.voigt === null && l.voigtReason ? l.voigtReason.slice(0, 200) : null,
              ew: finiteOrNull(l.equivalentWidth),
              ewError: finiteOrNull(l.equivalentWidthError),
              depth: finiteOrNull(l.depth),
              fwhm: finiteOrNull(l.fwhm),
              centroid: finiteOrNull(l.centroid),
              snr: finiteOrNull(l.snr),
              gaussianFwhm: finiteOrNull(l.voigt?.gaussianFwhm),
              lorentzianFwhm: finiteOrNull(l.voigt?.lorentzianFwhm),
              lorentzianError: l.voigt ? finiteOrNull(2 * l.voigt.errors.gamma) : null,
            }
          : { measurementId: m.id, lineId: l.id, measured: false, reason: `${l.reason}: ${l.detail}`.slice(0, 200), ew: null, ewError: null, depth: null, fwhm: null, centroid: null, snr: null, gaussianFwhm: null, lorentzianFwhm: null, lorentzianError: null },
      ),
      { transaction },
    )
    await ProcessingJob.update({ status: 'done', error: null, finishedAt: new Date(), leaseExpiresAt: null }, { where: { id: job.id }, transaction })
    if (output.suggestion && details && libraryVersionId !== undefined) {
      await storeSuggestion(
        {
          spectrumId: job.spectrumId,
          measurementId: m.id,
          libraryVersionId,
          pipelineVersion: output.pipelineVersion,
          result: output.suggestion,
          details,
          instrumentId: output.standards && output.standards.instrumentStandards > 0 ? output.standards.instrumentId : null,
        },
        transaction,
      )
      await Spectrum.update(
        { status: 'suggested', statusReason: null },
        { where: { id: job.spectrumId, status: { [Op.in]: [...PRE_REVIEW_SUGGESTED] } }, transaction },
      )
      return
    }
    await Spectrum.update(
      { status: 'measured', statusReason: null },
      { where: { id: job.spectrumId, status: { [Op.in]: [...PRE_REVIEW] } }, transaction },
    )
  })
}
