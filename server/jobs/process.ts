// The steps of processing one spectrum that every queue shares: claim a job row, load its input,
// store the pipeline's output, record a failure. The database queue (runner.ts) and the Redis
// worker (redis.ts) differ only in how they learn that there is work.
import { Op, QueryTypes, Transaction, type Sequelize } from 'sequelize'
import { bufferToFloat32, bufferToFloat64, float32ToBuffer } from '../lib/binary'
import { isDatabaseUnavailable } from '../lib/db-errors'
import { Campaign, Instrument, LibraryVersion, LineMeasurementRow, Measurement, ProcessingJob, Spectrum, SpectrumBlob } from '../models'
import { resolutionFwhm, type PipelineOutput } from '../spectra/pipeline'
import { indexSuggestionFlags } from '../services/queue.service'
import { storeSuggestion, suggestionDetails } from '../services/suggestions.service'
import type { WorkerTask } from './worker'

/** Statuses a fresh measurement may move a spectrum on from; review states are never touched. */
const PRE_REVIEW = ['received', 'failed', 'measured']
/** Statuses a fresh suggestion may move a spectrum on from (to 'suggested'). */
const PRE_REVIEW_SUGGESTED = [...PRE_REVIEW, 'suggested']

/** MariaDB errors that a second try usually gets past: deadlock (1213) and lock wait timeout (1205). */
export function isTransient(error: unknown): boolean {
  for (let e = error as { errno?: number; parent?: unknown; original?: unknown } | undefined, depth = 0; e && depth < 4; depth++) {
    if (e.errno === 1213 || e.errno === 1205) return true
    e = (e.parent ?? e.original) as typeof e
  }
  return isDatabaseUnavailable(error)
}

/**
 * Runs `work` again after a deadlock, a lock wait timeout or a lost connection, waiting a little
 * longer each time with some randomness so that two writers that collided do not collide again.
 */
export async function withRetry<T>(work: () => Promise<T>, options: { tries?: number; baseMs?: number } = {}): Promise<T> {
  const tries = options.tries ?? 5
  const base = options.baseMs ?? 50
  for (let attempt = 1; ; attempt++) {
    try {
      return await work()
    } catch (error) {
      if (attempt >= tries || !isTransient(error)) throw error
      const wait = base * 2 ** (attempt - 1) * (0.5 + Math.random())
      await new Promise((r) => setTimeout(r, wait))
    }
  }
}

/** Transactions here take no gap locks: rows are found by key, and concurrent inserts never wait on them. */
const READ_COMMITTED = { isolationLevel: Transaction.ISOLATION_LEVELS.READ_COMMITTED }

export interface ClaimedJob {
  id: number
  spectrumId: number
}

/**
 * Takes up to `count` queued jobs, oldest first, for `leaseMs`. `SKIP LOCKED` lets several runners
 * (threads, processes, machines) claim at once without waiting on each other's rows.
 */
export async function claimJobs(sequelize: Sequelize, count: number, leaseMs: number, spectrumId?: number): Promise<ClaimedJob[]> {
  if (count <= 0) return []
  return withRetry(() =>
    sequelize.transaction(READ_COMMITTED, async (transaction) => {
      const rows = await sequelize.query<{ id: number; spectrum_id: number }>(
        `SELECT id, spectrum_id FROM processing_jobs WHERE status = 'queued' ${spectrumId === undefined ? '' : 'AND spectrum_id = :spectrumId'}
         ORDER BY id LIMIT :count FOR UPDATE SKIP LOCKED`,
        { replacements: { count, spectrumId }, type: QueryTypes.SELECT, transaction },
      )
      if (rows.length === 0) return []
      const now = new Date()
      await ProcessingJob.update(
        { status: 'running', startedAt: now, attempts: sequelize.literal('attempts + 1') as never, leaseExpiresAt: new Date(now.getTime() + leaseMs) },
        { where: { id: { [Op.in]: rows.map((r) => Number(r.id)) } }, transaction },
      )
      return rows.map((r) => ({ id: Number(r.id), spectrumId: Number(r.spectrum_id) }))
    }),
  )
}

/** Renews the leases of jobs still being worked on. */
export async function renewLeases(ids: number[], leaseMs: number): Promise<void> {
  if (ids.length === 0) return
  await ProcessingJob.update({ leaseExpiresAt: new Date(Date.now() + leaseMs) }, { where: { id: { [Op.in]: ids }, status: 'running' } })
}

/** Returns running jobs whose lease lapsed (their runner died or lost the database) to the queue. */
export async function returnLapsed(except: number[] = []): Promise<number> {
  const [lapsed] = await ProcessingJob.update(
    { status: 'queued', startedAt: null, leaseExpiresAt: null },
    { where: { status: 'running', id: { [Op.notIn]: [0, ...except] }, [Op.or]: [{ leaseExpiresAt: null }, { leaseExpiresAt: { [Op.lt]: new Date() } }] } },
  )
  return lapsed
}

/** Gives jobs back to the queue at once (a runner that stops, or lost the database mid-job). */
export async function releaseJobs(ids: number[]): Promise<void> {
  if (ids.length === 0) return
  await ProcessingJob.update({ status: 'queued', startedAt: null, leaseExpiresAt: null }, { where: { id: { [Op.in]: ids }, status: 'running' } })
}

/** The library version new suggestions are made against. */
export async function activeLibraryVersionId(): Promise<number | undefined> {
  return (await LibraryVersion.findOne({ where: { isActive: true }, attributes: ['id'] }))?.id
}

/** The stored arrays and settings of a spectrum, as the pipeline takes them. */
export async function loadInput(spectrumId: number): Promise<WorkerTask> {
  const [spectrum, blob] = await Promise.all([
    Spectrum.findByPk(spectrumId, {
      attributes: ['id', 'campaignId', 'resolutionFwhm', 'resolvingPower', 'instrumentId'],
      include: [{ model: Campaign, as: 'campaign', attributes: ['id', 'regionMin', 'regionMax'] }],
    }) as Promise<(Spectrum & { campaign?: Campaign }) | null>,
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
  const c = spectrum.campaign
  if (c && c.regionMin > 0 && c.regionMax > c.regionMin) input.region = [c.regionMin, c.regionMax]
  return input
}

const finiteOrNull = (v: number | null | undefined) => (v !== null && v !== undefined && Number.isFinite(v) ? v : null)

/**
 * Stores a pipeline output as the spectrum's current measurement (lines in one multi-row insert)
 * and suggestion, marks the job done and moves the spectrum on, all in one transaction. Earlier
 * rows are found first and updated by key, so concurrent writers for other spectra never lock
 * each other's index ranges; a deadlock or lost connection is retried with back-off.
 */
export async function storeOutput(sequelize: Sequelize, job: ClaimedJob, output: PipelineOutput, libraryVersionId: number | undefined): Promise<void> {
  const { analysis } = output
  const p = analysis.prepared
  const lines = analysis.lines.map((l) =>
    l.measured
      ? {
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
      : {
          lineId: l.id,
          measured: false,
          reason: `${l.reason}: ${l.detail}`.slice(0, 200),
          ew: null,
          ewError: null,
          depth: null,
          fwhm: null,
          centroid: null,
          snr: null,
          gaussianFwhm: null,
          lorentzianFwhm: null,
          lorentzianError: null,
        },
  )
  const measurement = {
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
  }
  const suggestion = output.suggestion && libraryVersionId !== undefined ? output.suggestion : null
  const details = suggestion ? await suggestionDetails(suggestion, output.resolution, output.notes, output.standards) : null
  const instrumentId = output.standards && output.standards.instrumentStandards > 0 ? output.standards.instrumentId : null
  await withRetry(() =>
    sequelize.transaction(READ_COMMITTED, async (transaction) => {
      const earlier = await Measurement.findAll({ where: { spectrumId: job.spectrumId, isCurrent: true }, attributes: ['id'], transaction })
      if (earlier.length > 0) await Measurement.update({ isCurrent: false }, { where: { id: { [Op.in]: earlier.map((m) => m.id) } }, transaction })
      const m = await Measurement.create(measurement, { transaction })
      await LineMeasurementRow.bulkCreate(
        lines.map((l) => ({ measurementId: m.id, ...l })),
        { transaction },
      )
      await ProcessingJob.update({ status: 'done', error: null, finishedAt: new Date(), leaseExpiresAt: null }, { where: { id: job.id }, transaction })
      if (suggestion && details && libraryVersionId !== undefined) {
        await storeSuggestion({ spectrumId: job.spectrumId, measurementId: m.id, libraryVersionId, pipelineVersion: output.pipelineVersion, result: suggestion, details, instrumentId }, transaction)
        await indexSuggestionFlags(sequelize, job.spectrumId, suggestion.flags, transaction)
        await Spectrum.update({ status: 'suggested', statusReason: null }, { where: { id: job.spectrumId, status: { [Op.in]: PRE_REVIEW_SUGGESTED } }, transaction })
        return
      }
      await Spectrum.update({ status: 'measured', statusReason: null }, { where: { id: job.spectrumId, status: { [Op.in]: PRE_REVIEW } }, transaction })
    }),
  )
}

/** Records that the pipeline refused or broke on a spectrum; the job is not tried again by itself. */
export async function recordFailure(job: ClaimedJob, message: string): Promise<void> {
  await withRetry(async () => {
    await ProcessingJob.update({ status: 'failed', error: message, finishedAt: new Date(), leaseExpiresAt: null }, { where: { id: job.id } })
    await Spectrum.update({ status: 'failed', statusReason: `Processing failed: ${message}` }, { where: { id: job.spectrumId, status: { [Op.in]: PRE_REVIEW } } })
  })
}
