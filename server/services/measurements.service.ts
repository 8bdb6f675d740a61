import { CLASSIFICATION_LINES } from '../../shared/lines'
import { gridWavelength } from '../../shared/grid'
import { bufferToFloat32 } from '../lib/binary'
import { decimateMinMax } from '../lib/decimate'
import { HttpError, notFound } from '../lib/http-error'
import { LineMeasurementRow, Measurement, ProcessingJob, Spectrum, type User } from '../models'
import type { AppContext } from '../context'
import { findVisibleSpectrum } from './visibility'
import type { LineRow, MeasurementSummary, SpectrumMeasurements } from '../../shared/api/measurements'
import type { SeriesQuery } from '../../shared/api/spectra'

export type { LineRow, MeasurementSummary }

const LINE_INFO = new Map(CLASSIFICATION_LINES.map((l) => [l.id, l]))

function toSummary(m: Measurement, lines: LineMeasurementRow[]): MeasurementSummary {
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
        measured: l.measured,
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
  const lines = current ? await LineMeasurementRow.findAll({ where: { measurementId: current.id }, order: [['id', 'ASC']] }) : []
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
