// The steps of processing one spectrum that every queue shares: claim a job row, load its input,
// store the pipeline's output (the rows are the measurements service's), record a failure. The
// database queue (runner.ts) and the Redis worker (redis.ts) differ only in how they learn that
// there is work.
import { Op, QueryTypes, Transaction, type Sequelize } from 'sequelize'
import { executeInTransaction } from '../db/execute'
import { bufferToFloat32, bufferToFloat64 } from '../lib/binary'
import { sqlTime } from '../lib/sql-time'
import { withRetry } from '../lib/db-errors'
import { ProcessingJob, Spectrum } from '../models'
import { resolutionFwhm } from '../spectra/pipeline'
import { PRE_REVIEW, storePipelineOutput } from '../services/measurements.service'
import type { StoredPipelineOutput, WorkerTask } from './worker'

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
      const ids = rows.map((r) => Number(r.id))
      // A statement of its own rather than Model.update: this runs for every few jobs.
      await executeInTransaction(
        transaction,
        `UPDATE processing_jobs SET status = 'running', started_at = ?, attempts = attempts + 1, lease_expires_at = ? WHERE id IN (${ids.map(() => '?').join(', ')})`,
        [sqlTime(now), sqlTime(new Date(now.getTime() + leaseMs)), ...ids],
      )
      return rows.map((r) => ({ id: Number(r.id), spectrumId: Number(r.spectrum_id) }))
    }),
  )
}

/** Renews the leases of jobs still being worked on. */
export async function renewLeases(ids: number[], leaseMs: number): Promise<void> {
  if (ids.length === 0) return
  // It can deadlock with a job's own store transaction (both write job rows): tried again at once,
  // rather than skipping this tick's claims.
  await withRetry(() => ProcessingJob.update({ leaseExpiresAt: new Date(Date.now() + leaseMs) }, { where: { id: { [Op.in]: ids }, status: 'running' } }), { tries: 3, baseMs: 20 })
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

interface InputRow {
  resolution_fwhm: number | null
  resolving_power: number | null
  region_min: number | null
  region_max: number | null
  instrument_id: number | null
  instrument_fwhm: number | null
  wavelength: Buffer
  flux: Buffer
  error: Buffer | null
  mask: Buffer | null
  version_id: number | null
}

/**
 * The stored arrays and settings of a spectrum as the pipeline takes them, and the library version
 * its suggestion is made against, in one statement: a job's reads were four round trips.
 */
export async function loadJob(spectrumId: number): Promise<{ input: WorkerTask; versionId: number | undefined }> {
  const [row] = await ProcessingJob.sequelize!.query<InputRow>(
    `SELECT sp.resolution_fwhm, sp.resolving_power, c.region_min, c.region_max, i.id AS instrument_id, i.resolution_fwhm AS instrument_fwhm,
            b.wavelength, b.flux, b.error, b.mask,
            (SELECT v.id FROM library_versions v WHERE v.is_active = 1 LIMIT 1) AS version_id
     FROM spectra sp JOIN spectrum_blobs b ON b.spectrum_id = sp.id
     LEFT JOIN campaigns c ON c.id = sp.campaign_id
     LEFT JOIN instruments i ON i.id = sp.instrument_id
     WHERE sp.id = :spectrumId`,
    { replacements: { spectrumId }, type: QueryTypes.SELECT },
  )
  if (!row) throw new Error(`spectrum ${spectrumId} has no stored data`)
  const input: WorkerTask = {
    spectrum: {
      wavelength: bufferToFloat64(row.wavelength),
      flux: bufferToFloat32(row.flux),
      ...(row.error ? { error: bufferToFloat32(row.error) } : {}),
      ...(row.mask ? { mask: new Uint8Array(row.mask) } : {}),
    },
  }
  // The instrument's own standards are matched first; its resolution stands in for one the spectrum does not give.
  if (row.instrument_id !== null) input.instrumentId = Number(row.instrument_id)
  const fwhm = resolutionFwhm(row.resolution_fwhm, row.resolving_power) ?? row.instrument_fwhm ?? undefined
  if (fwhm !== undefined) input.inputFwhm = fwhm
  const [min, max] = [Number(row.region_min ?? 0), Number(row.region_max ?? 0)]
  if (min > 0 && max > min) input.region = [min, max]
  return { input, versionId: row.version_id === null ? undefined : Number(row.version_id) }
}

/**
 * Stores a pipeline output (measurement, line rows, suggestion: `storePipelineOutput`), marks the
 * job done and moves the spectrum on, all in one READ COMMITTED transaction: earlier rows are found
 * first and updated by key, so concurrent writers for other spectra never lock each other's index
 * ranges; a deadlock or lost connection is retried with back-off.
 */
export async function storeOutput(sequelize: Sequelize, job: ClaimedJob, output: StoredPipelineOutput, libraryVersionId: number | undefined): Promise<void> {
  await withRetry(() =>
    sequelize.transaction(READ_COMMITTED, async (transaction) => {
      await storePipelineOutput(sequelize, job.spectrumId, output, libraryVersionId, transaction)
      await executeInTransaction(transaction, "UPDATE processing_jobs SET status = 'done', error = NULL, finished_at = ?, lease_expires_at = NULL WHERE id = ?", [sqlTime(new Date()), job.id])
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
