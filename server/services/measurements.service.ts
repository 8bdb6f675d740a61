import { type InferAttributes, type Sequelize, type Transaction } from 'sequelize'
import { CLASSIFICATION_LINES } from '../../shared/lines'
import { gridWavelength } from '../../shared/grid'
import { bufferToFloat32, float32Bytes } from '../lib/binary'
import { executeInTransaction, selectInTransaction } from '../db/execute'
import { decimateMinMax } from '../lib/decimate'
import { HttpError, notFound } from '../lib/http-error'
import { sqlTime } from '../lib/sql-time'
import { LineMeasurementRow, Measurement, ProcessingJob, Spectrum, type User } from '../models'
import type { AppContext } from '../context'
import type { StoredPipelineOutput } from '../jobs/worker'
import { replaceFlagRows, storeSuggestion, suggestionDetails } from './suggestions.service'
import { findVisibleSpectrum } from './visibility'
import type { LineRow, MeasurementSummary, SpectrumMeasurements } from '../../shared/api/measurements'
import type { SeriesQuery } from '../../shared/api/spectra'

export type { LineRow, MeasurementSummary }

const LINE_INFO = new Map(CLASSIFICATION_LINES.map((l) => [l.id, l]))

function toSummary(m: Measurement, lines: InferAttributes<LineMeasurementRow>[]): MeasurementSummary {
  return {
    id: m.id,
    pipelineVersion: m.pipelineVersion,
    isCurrent: m.isCurrent,
    snr: m.snr,
    rv: m.rv,
    rvError: m.rvError,
    pseudoContinuum: m.pseudoContinuum,
    warnings: JSON.parse(m.warnings) as string[],
    ratios: JSON.parse(m.ratios) as unknown[],
    seconds: m.seconds,
    createdAt: m.createdAt.toISOString(),
    lines: lines.map((l) => {
      const info = LINE_INFO.get(l.lineId)
      return {
        id: l.lineId,
        name: info?.name ?? l.lineId,
        wavelength: info?.wavelength ?? 0,
        family: info?.family ?? '',
        measured: Boolean(l.measured),
        reason: l.reason,
        ew: l.ew,
        ewError: l.ewError,
        depth: l.depth,
        fwhm: l.fwhm,
        centroid: l.centroid,
        snr: l.snr,
        gaussianFwhm: l.gaussianFwhm,
        lorentzianFwhm: l.lorentzianFwhm,
        lorentzianError: l.lorentzianError,
      }
    }),
  }
}

/** The current measurement with its lines, and the older runs (without lines) as history. */
export async function measurementsOf(spectrumId: number): Promise<SpectrumMeasurements> {
  const all = await Measurement.findAll({
    where: { spectrumId },
    attributes: { exclude: ['flux', 'continuum', 'rectified', 'mask'] },
    order: [['id', 'DESC']],
  })
  const current = all.find((m) => m.isCurrent) ?? null
  // Plain rows: some forty lines on every detail and review screen.
  const lines = current ? ((await LineMeasurementRow.findAll({ where: { measurementId: current.id }, order: [['id', 'ASC']], raw: true })) as InferAttributes<LineMeasurementRow>[]) : []
  return {
    current: current ? toSummary(current, lines) : null,
    history: all.map((m) => {
      const { lines: _l, ...rest } = toSummary(m, [])
      return rest
    }),
  }
}

export interface PreparedSeries {
  layout: { points: number; total: number; decimated: boolean; columns: string[]; measurementId: number }
  body: Buffer
}

/** The prepared spectrum on the grid: wavelength, rebinned flux, continuum and rectified flux. */
export async function getPreparedSeries(user: User, spectrumId: number, q: SeriesQuery): Promise<PreparedSeries> {
  await findVisibleSpectrum(user, spectrumId)
  const m = await Measurement.findOne({ where: { spectrumId, isCurrent: true } })
  if (!m) throw notFound('A measurement of this spectrum')
  const grid = { start: m.gridStart, step: m.gridStep, length: m.gridLength }
  const flux = bufferToFloat32(m.flux)
  const continuum = bufferToFloat32(m.continuum)
  const rectified = bufferToFloat32(m.rectified)
  const mask = m.mask
  let from = 0
  let to = grid.length
  // Trim to the covered pixels, then to the requested range.
  while (from < to && mask[from] === 1) from++
  while (to > from && mask[to - 1] === 1) to--
  if (q.from !== undefined) from = Math.max(from, Math.ceil(Math.log(q.from / grid.start) / grid.step))
  if (q.to !== undefined) to = Math.min(to, Math.floor(Math.log(q.to / grid.start) / grid.step) + 1)
  to = Math.max(from, to)
  const keep = decimateMinMax(rectified, from, to, q.maxPoints)
  const columns = ['wavelength', 'flux', 'continuum', 'rectified']
  const out = new Float32Array(keep.length * columns.length)
  keep.forEach((idx, k) => {
    const bad = mask[idx] === 1
    out[k] = gridWavelength(grid, idx)
    out[keep.length + k] = bad ? Number.NaN : flux[idx]!
    out[2 * keep.length + k] = continuum[idx]!
    out[3 * keep.length + k] = bad ? Number.NaN : rectified[idx]!
  })
  return {
    layout: { points: keep.length, total: to - from, decimated: keep.length < to - from, columns, measurementId: m.id },
    body: Buffer.from(out.buffer, out.byteOffset, out.byteLength),
  }
}

const finiteOrNull = (v: number | null | undefined) => (v !== null && v !== undefined && Number.isFinite(v) ? v : null)

/** Statuses a fresh measurement may move a spectrum on from; review states are never touched. */
export const PRE_REVIEW = ['received', 'failed', 'measured']
/** Statuses a fresh suggestion may move a spectrum on from (to 'suggested'). */
const PRE_REVIEW_SUGGESTED = [...PRE_REVIEW, 'suggested']

/**
 * Writes a pipeline output in the caller's transaction: the spectrum's new current measurement
 * (its lines in one multi-row insert), its suggestion when a library version was matched (with the
 * flags the queue filters by), and the spectrum's status. Earlier current rows are found first and
 * updated by key, so writers for other spectra never lock each other's index ranges.
 */
export async function storePipelineOutput(sequelize: Sequelize, spectrumId: number, output: StoredPipelineOutput, libraryVersionId: number | undefined, transaction: Transaction): Promise<void> {
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
  const measurement = [
    spectrumId,
    output.pipelineVersion,
    1,
    finiteOrNull(analysis.snr),
    finiteOrNull(analysis.rv?.v),
    finiteOrNull(analysis.rv?.error),
    analysis.pseudoContinuum ? 1 : 0,
    JSON.stringify(analysis.warnings),
    JSON.stringify(analysis.ratios),
    p.grid.start,
    p.grid.step,
    p.grid.length,
    float32Bytes(p.flux),
    float32Bytes(p.continuum),
    float32Bytes(p.rectified),
    Buffer.from(p.mask),
    output.seconds,
    sqlTime(new Date()),
  ]
  const suggestion = output.suggestion && libraryVersionId !== undefined ? output.suggestion : null
  const details = suggestion ? await suggestionDetails(suggestion, output.resolution, output.notes, output.standards, transaction) : null
  const instrumentId = output.standards && output.standards.instrumentStandards > 0 ? output.standards.instrumentId : null
  // What a new spectrum has none of, found in one read: earlier current rows, updated by key.
  const [state] = await selectInTransaction<{ measurements: string | null; suggestions: string | null; flags: number | bigint }>(
    transaction,
    `SELECT (SELECT GROUP_CONCAT(id) FROM measurements WHERE spectrum_id = ? AND is_current = 1) AS measurements,
            (SELECT GROUP_CONCAT(id) FROM suggestions WHERE spectrum_id = ? AND is_current = 1) AS suggestions,
            (SELECT COUNT(*) FROM spectrum_flags WHERE spectrum_id = ?) AS flags`,
    [spectrumId, spectrumId, spectrumId],
  )
  const ids = (list: string | null | undefined) => (list ? list.split(',').map(Number) : [])
  const earlier = ids(state?.measurements)
  if (earlier.length > 0) await executeInTransaction(transaction, `UPDATE measurements SET is_current = 0 WHERE id IN (${earlier.map(() => '?').join(', ')})`, earlier)
  // The arrays (80 KB and more) and the line rows go through the driver's binary protocol on the
  // transaction's connection: raw bytes instead of escaped text, and no model instance per row.
  const inserted = await executeInTransaction(
    transaction,
    `INSERT INTO measurements (spectrum_id, pipeline_version, is_current, snr, rv, rv_error, pseudo_continuum, warnings, ratios,
       grid_start, grid_step, grid_length, flux, continuum, rectified, mask, seconds, created_at)
     VALUES (${measurement.map(() => '?').join(', ')})`,
    measurement,
  )
  const m = { id: inserted.insertId }
  if (lines.length > 0) {
    await executeInTransaction(
      transaction,
      `INSERT INTO line_measurements (measurement_id, line_id, measured, reason, ew, ew_error, depth, fwhm, centroid, snr, gaussian_fwhm, lorentzian_fwhm, lorentzian_error)
       VALUES ${lines.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}`,
      lines.flatMap((l) => [m.id, l.lineId, l.measured ? 1 : 0, l.reason, l.ew, l.ewError, l.depth, l.fwhm, l.centroid, l.snr, l.gaussianFwhm, l.lorentzianFwhm, l.lorentzianError]),
    )
  }
  let flagCount: number | null = null
  if (suggestion && details && libraryVersionId !== undefined) {
    await storeSuggestion(
      { spectrumId, measurementId: m.id, libraryVersionId, pipelineVersion: output.pipelineVersion, result: suggestion, details, instrumentId },
      ids(state?.suggestions),
      transaction,
    )
    flagCount = await replaceFlagRows(transaction, spectrumId, suggestion.flags, Number(state?.flags ?? 0) > 0)
  }
  const from = flagCount === null ? PRE_REVIEW : PRE_REVIEW_SUGGESTED
  // The spectrum moves on only from the statuses before review; MariaDB assigns left to right, so
  // the reason and the time are set before the status they are judged by. Its S/N becomes the
  // pipeline's (from the errors, or the residual of the best standard), which lists, the queue and
  // the detail then all show; the quick estimate made when the file was read stays only until then.
  const moving = `status IN (${from.map(() => '?').join(', ')})`
  await executeInTransaction(
    transaction,
    `UPDATE spectra SET ${flagCount === null ? '' : 'flag_count = ?, '}snr = COALESCE(?, snr), status_reason = IF(${moving}, NULL, status_reason), updated_at = IF(${moving}, ?, updated_at),
       status = IF(${moving}, ?, status) WHERE id = ?`,
    [...(flagCount === null ? [] : [flagCount]), finiteOrNull(analysis.snr), ...from, ...from, sqlTime(new Date()), ...from, flagCount === null ? 'measured' : 'suggested', spectrumId],
  )
}

/** Puts a spectrum back in the queue: after a failure, or to re-measure with a newer pipeline. */
export async function requeueSpectrum(ctx: AppContext, user: User, spectrumId: number): Promise<void> {
  const s = await findVisibleSpectrum(user, spectrumId)
  if (user.role === 'observer' && s.submittedBy !== user.id) throw new HttpError(403, 'forbidden', 'Only the person who submitted a spectrum, or a lead, can re-run it.')
  const pending = await ProcessingJob.count({ where: { spectrumId, status: ['queued', 'running'] } })
  if (pending > 0) throw new HttpError(409, 'already_queued', 'This spectrum is already waiting to be processed.')
  await ctx.sequelize.transaction(async (transaction) => {
    await ProcessingJob.create({ spectrumId, error: null, requestedBy: user.id, startedAt: null, finishedAt: null }, { transaction })
    if (s.status === 'failed') await Spectrum.update({ status: 'received', statusReason: null }, { where: { id: spectrumId }, transaction })
  })
  ctx.jobs?.enqueue(spectrumId)
}
