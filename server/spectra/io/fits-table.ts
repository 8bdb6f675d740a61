/**
 * Spectra stored as FITS tables (binary or ASCII): one row per pixel, one row of array columns,
 * or one row per aperture or echelle order (fixed or variable-length arrays).
 */
import { hduName, keptHeader, mediumFromHeaders, type FitsHdu } from './fits'
import { decodeAsciiColumns, decodeFixedColumns, heapDescriptors, isNumericColumn, readHeapArray, rowCount, tableColumns, type TableColumn } from './fits-columns'
import { QUALITY_NAMES, preferAndMask, qualityFlags, type FlagSet } from './quality'
import { describeDispersion, fitDispersion, gather, mergeSegments, spanCoverage } from './solution'
import { SpectrumReadError, type MediumEvidence, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, isBlankUnit, vacuumFromText } from './units'

/** Column names by role, in order of preference, matched case-insensitively (common practice). */
const WAVELENGTH_NAMES = ['WAVELENGTH', 'WAVE', 'LAMBDA', 'LOGLAM', 'WAVE_VAC', 'WAVE_AIR', 'WAVELENGTH_VAC', 'WAVELENGTH_AIR', 'VACWAVE', 'AIRWAVE', 'LAM', 'WAVEL', 'WAVELEN', 'WL', 'SPECTRAL_AXIS']
const FLUX_NAMES = ['FLUX', 'FLUX_DENSITY', 'FLUXDENSITY', 'SPEC', 'SPECTRUM', 'FLAM', 'F_LAMBDA', 'FLUX_LAMBDA', 'NORM_FLUX', 'NORMALIZED_FLUX', 'FLUX_REDUCED', 'INTENSITY', 'COUNTS']
const SIGMA_NAMES = ['ERROR', 'ERR', 'SIGMA', 'STATERROR', 'STAT_ERR', 'FLUX_ERROR', 'FLUX_ERR', 'ERR_FLUX', 'ERROR_FLUX', 'UNCERTAINTY', 'STDDEV', 'NOISE', 'ERR_REDUCED', 'E_FLUX']
const IVAR_NAMES = ['IVAR', 'INVVAR', 'INV_VAR', 'INVERSE_VARIANCE']
const VARIANCE_NAMES = ['VAR', 'VARIANCE', 'FLUX_VAR', 'VAR_FLUX']

function findColumn(cols: TableColumn[], names: readonly string[]): TableColumn | undefined {
  for (const name of names) {
    const col = cols.find((c) => c.name.trim().toUpperCase() === name && isNumericColumn(c) && c.type !== 'L')
    if (col) return col
  }
  return undefined
}

export interface TableLayout {
  wave: TableColumn
  flux: TableColumn
  error?: { col: TableColumn; kind: 'sigma' | 'ivar' | 'variance' }
  quality: TableColumn[]
  others: TableColumn[]
}

/** The columns of a table HDU by role, or a reason why it holds no spectrum. */
export function tableLayout(hdu: FitsHdu, fileName: string): TableLayout | string {
  if (hdu.kind !== 'bintable' && hdu.kind !== 'ascii') return 'it is not a table'
  const cols = tableColumns(hdu, fileName)
  const wave = findColumn(cols, WAVELENGTH_NAMES)
  const flux = findColumn(cols, FLUX_NAMES)
  const names = cols.map((c) => c.name.trim()).join(', ')
  if (!wave) return `no wavelength column among ${names || 'its columns'} (looked for ${WAVELENGTH_NAMES.slice(0, 6).join(', ')}, …); rename the column`
  if (!flux) return `no flux column among ${names} (looked for ${FLUX_NAMES.slice(0, 5).join(', ')}, …); rename the column`
  const sigma = findColumn(cols, SIGMA_NAMES)
  const ivar = findColumn(cols, IVAR_NAMES)
  const variance = findColumn(cols, VARIANCE_NAMES)
  const error = sigma ? { col: sigma, kind: 'sigma' as const } : ivar ? { col: ivar, kind: 'ivar' as const } : variance ? { col: variance, kind: 'variance' as const } : undefined
  const quality = cols.filter((c) => QUALITY_NAMES.includes(c.name.trim().toUpperCase()) && isNumericColumn(c))
  const used = new Set([wave, flux, error?.col, ...quality])
  const layout: TableLayout = { wave, flux, quality, others: cols.filter((c) => !used.has(c)) }
  if (error) layout.error = error
  return layout
}

/** Per-row values of one column: rows of one pixel each (scalar), or one array per row. */
type ColumnData = { perRow: false; values: Float64Array } | { perRow: true; rows: Float64Array[] }

function readColumns(bytes: Uint8Array, hdu: FitsHdu, cols: TableColumn[], maxPixels: number, fileName: string): ColumnData[] {
  const rows = rowCount(hdu)
  if (hdu.kind === 'ascii') return decodeAsciiColumns(bytes, hdu, cols).map((values) => ({ perRow: false, values }))
  const fixed = cols.filter((c) => !c.heap)
  const allHeap = tableColumns(hdu, fileName).filter((c) => c.heap)
  for (const c of fixed) {
    if (c.repeat > 1 && c.repeat > maxPixels) throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: column ${c.name} holds ${c.repeat} values a row, more than the limit of ${maxPixels}`)
  }
  const decoded = fixed.length ? decodeFixedColumns(bytes, hdu, fixed, allHeap, fileName) : []
  return cols.map((c) => {
    if (c.heap) {
      const descriptors = heapDescriptors(bytes, hdu, c, maxPixels, fileName)
      return { perRow: true, rows: descriptors.map((d) => readHeapArray(bytes, hdu, c, d)) }
    }
    const values = decoded[fixed.indexOf(c)]!
    if (c.repeat === 1) return { perRow: false, values }
    return { perRow: true, rows: Array.from({ length: rows }, (_, r) => values.subarray(r * c.repeat, (r + 1) * c.repeat)) }
  })
}

/**
 * Reads a spectrum from a table HDU (FITS Standard 4.0 §7.2–7.3). Wavelength, flux, error
 * (1σ, inverse variance or variance) and quality columns by name; LOGLAM is log10 λ. Units from
 * TUNITn (Å when absent) or the observer's unit. Several rows of arrays are apertures or echelle
 * orders: the observer's, else the first covering the classification region, else all merged.
 * Air or vacuum: VACUUM/AIRORVAC, a WAVE_VAC/WAVE_AIR name, the column's unit or comment, header
 * text, and the survey convention that LOGLAM tables are vacuum.
 * @throws SpectrumReadError NOT_A_SPECTRUM, LENGTH_MISMATCH, UNKNOWN_UNIT, TOO_MANY_PIXELS, APERTURE_NOT_FOUND
 */
export function readTableHdu(bytes: Uint8Array, hdu: FitsHdu, primary: FitsHdu | undefined, fileName: string, options: ResolvedReadOptions): RawSpectrum {
  const layout = tableLayout(hdu, fileName)
  if (typeof layout === 'string') throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} is not a spectrum: ${layout}`)
  const { wave, flux, error } = layout
  const quality = preferAndMask(layout.quality)
  const wanted = [wave, flux, ...(error ? [error.col] : []), ...quality.use]
  const rows = rowCount(hdu)
  if (rows === 0) throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} has no rows`)
  const perPixel = wave.repeat === 1 && !wave.heap
  if (perPixel && rows > options.maxPixels) {
    throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${rows} pixels is more than the limit of ${options.maxPixels}`)
  }
  for (const col of wanted.slice(1)) {
    const colPerPixel = col.repeat === 1 && !col.heap
    if (colPerPixel !== perPixel || (!col.heap && !wave.heap && col.repeat !== wave.repeat)) {
      throw new SpectrumReadError(
        'LENGTH_MISMATCH',
        `${fileName}: column ${col.name} has ${col.heap ? 'variable-length arrays' : `${col.repeat} value(s) a row`} but ${wave.name} has ${wave.heap ? 'variable-length arrays' : `${wave.repeat}`}`,
      )
    }
  }
  const data = readColumns(bytes, hdu, wanted, options.maxPixels, fileName)
  const segmentsOf = (d: ColumnData): Float64Array[] => (d.perRow ? d.rows : [d.values])
  const segs = data.map(segmentsOf)
  const count = segs[0]!.length
  for (let k = 1; k < segs.length; k++) {
    for (let r = 0; r < count; r++) {
      if (segs[k]![r]!.length !== segs[0]![r]!.length) {
        throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: row ${r + 1}: column ${wanted[k]!.name} has ${segs[k]![r]!.length} values but ${wave.name} has ${segs[0]![r]!.length}`)
      }
    }
  }

  // Wavelength unit and scale.
  const isLog = wave.name.trim().toUpperCase() === 'LOGLAM'
  let fileUnit = isBlankUnit(wave.unit) ? undefined : wave.unit!.trim()
  if (isLog && fileUnit) fileUnit = /^log(?:10)?\s*\(\s*(.*?)\s*\)$/i.exec(fileUnit)?.[1] ?? (/^(dex|log|log10)$/i.test(fileUnit) ? undefined : fileUnit)
  let factor: number
  if (options.unitFactor) factor = options.unitFactor.factor
  else {
    const f = fileUnit === undefined ? 1 : angstromsPerUnit(fileUnit)
    if (f === undefined)
      throw new SpectrumReadError(
        'UNKNOWN_UNIT',
        `${fileName}: wavelength unit '${fileUnit}' of column ${wave.name} is not one of Angstrom, nm, um, m; choose the unit when you submit (--unit with npm run classify)`,
      )
    factor = f
  }
  const waves = segs[0]!.map((w) => w.map((v) => (isLog ? 10 ** v : v) * factor))

  // Which row(s).
  const ignored: string[] = []
  const warnings: string[] = []
  let chosen: number[] = [0]
  let apertureWhy: string | undefined
  if (count > 1) {
    if (options.aperture !== undefined) {
      if (options.aperture < 1 || options.aperture > count) {
        throw new SpectrumReadError('APERTURE_NOT_FOUND', `${fileName}: there is no aperture ${options.aperture}; HDU ${hdu.index} holds ${count} rows of spectra, counted from 1`)
      }
      chosen = [options.aperture - 1]
      apertureWhy = 'your choice'
    } else {
      const covers = waves.findIndex((w) => spanCoverage(w, options.classificationRegion) >= options.minCoverage)
      if (covers >= 0) {
        chosen = [covers]
        apertureWhy = covers === 0 ? 'the first row, and it covers the classification region' : `the first row that covers the classification region (rows 1–${covers} do not)`
      } else {
        chosen = waves.map((_, i) => i)
        apertureWhy = `no single row covers the classification region, so all ${count} were merged in wavelength order (in overlaps each keeps the pixels on its side of the midpoint); pick one with the aperture option`
      }
    }
    if (chosen.length === 1) ignored.push(`${count - 1} other row${count > 2 ? 's' : ''} of spectra in this table: pick another with the aperture option`)
  }
  const flags: FlagSet[] = []
  let wavelength: Float64Array
  let pick: (k: number) => Float64Array
  if (chosen.length > 1) {
    const order = mergeSegments(chosen.map((i) => waves[i]!))
    wavelength = gather(
      chosen.map((i) => waves[i]!),
      order,
      (k) => new Float64Array(k),
    )
    pick = (k) =>
      gather(
        chosen.map((i) => segs[k]![i]!),
        order,
        (m) => new Float64Array(m),
      )
    if (order.skipped.length) ignored.push(`rows ${order.skipped.map((i) => i + 1).join(', ')}: inside the range of the others`)
    warnings.push(`${count} orders were merged without a blaze correction or flux matching between them: check the continuum, or pick one order with the aperture option`)
  } else {
    wavelength = waves[chosen[0]!]!
    pick = (k) => segs[k]![chosen[0]!]!.slice()
  }
  if (wavelength.length > options.maxPixels) {
    throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${wavelength.length} pixels is more than the limit of ${options.maxPixels}`)
  }
  const fluxValues = pick(1)
  const raw: RawSpectrum = {
    wavelength,
    flux: fluxValues,
    medium: [],
    wavelengthUnit: options.unitFactor?.unit ?? fileUnit ?? 'Angstrom (assumed)',
    unitSource: options.unitFactor
      ? `your choice (the file says ${fileUnit ?? 'nothing'})`
      : fileUnit
        ? `TUNIT${wave.number} of column ${wave.name}`
        : `assumed Å: column ${wave.name} has no TUNIT${wave.number}`,
    unitAssumed: !options.unitFactor && fileUnit === undefined,
    header: keptHeader(hdu, primary),
    notes: [],
    hdu: hdu.index,
    source: `HDU ${hdu.index}${hduName(hdu) ? ` (${hduName(hdu)})` : ''}, ${hdu.kind === 'ascii' ? 'ASCII' : 'binary'} table, ${perPixel ? `one row per pixel (${rows} rows)` : count > 1 ? `${count} rows of ${wave.heap ? 'variable-length ' : ''}arrays` : `one row of ${wave.heap ? 'variable-length ' : ''}arrays`}`,
    solution: `${isLog ? `10^${wave.name}` : `column ${wave.name}`} (${describeDispersion(fitDispersion(wavelength))})`,
    masks: [],
    ignored,
    warnings,
  }
  if (hduName(hdu)) raw.hduName = hduName(hdu)!
  if (flux.unit) raw.fluxUnit = flux.unit
  if (count > 1) raw.aperture = { number: chosen.length > 1 ? 'merged' : chosen[0]! + 1, of: count, why: apertureWhy! }
  let next = 2
  if (error) {
    const values = pick(next++)
    const name = error.col.name.trim()
    if (error.kind === 'ivar') {
      const zero = new Uint8Array(values.length)
      for (let i = 0; i < values.length; i++) {
        const iv = values[i]!
        if (iv > 0 && Number.isFinite(iv)) values[i] = 1 / Math.sqrt(iv)
        else {
          values[i] = Infinity
          zero[i] = 1
        }
      }
      flags.push({ source: `${name} column`, rule: 'inverse variance 0 means no data', flags: zero })
      raw.errorSource = `column ${name}: error = 1/√${name}`
    } else if (error.kind === 'variance') {
      for (let i = 0; i < values.length; i++) values[i] = values[i]! >= 0 ? Math.sqrt(values[i]!) : NaN
      raw.errorSource = `column ${name}: error = √${name}`
    } else raw.errorSource = `column ${name} (1σ)`
    raw.error = values
  }
  for (const q of quality.use) {
    const set = qualityFlags(q.name, q.comment, pick(next++), q.type === 'L')
    set.source = `${q.name.trim()} column`
    flags.push(set)
  }
  for (const q of quality.dropped) ignored.push(`column ${q.name.trim()}: the AND mask is the one used for science`)
  if (layout.others.length) ignored.push(`column${layout.others.length > 1 ? 's' : ''} ${layout.others.map((c) => c.name.trim()).join(', ')}`)
  raw.flagSets = flags
  raw.medium = tableMedium(hdu, primary, wave, isLog)
  return raw
}

function tableMedium(hdu: FitsHdu, primary: FitsHdu | undefined, wave: TableColumn, isLog: boolean): MediumEvidence[] {
  const out: MediumEvidence[] = []
  const name = wave.name.trim().toUpperCase()
  if (/(^|_)VAC|^VACWAVE$/.test(name)) out.push({ vacuum: true, source: `column name ${wave.name.trim()}`, strength: 3 })
  if (/(^|_)AIR|^AIRWAVE$/.test(name)) out.push({ vacuum: false, source: `column name ${wave.name.trim()}`, strength: 3 })
  out.push(...mediumFromHeaders([hdu, primary]))
  const colText = [wave.unit, wave.comment].filter((s): s is string => !!s).join(' ')
  const colVac = colText ? vacuumFromText(colText) : undefined
  if (colVac !== undefined) out.push({ vacuum: colVac, source: `column ${wave.name.trim()} says "${colText}"`, strength: 2 })
  if (isLog) out.push({ vacuum: true, source: 'LOGLAM column: log10 vacuum wavelengths by the survey convention', strength: 1.5, inferred: true })
  return out.sort((a, b) => b.strength - a.strength)
}
