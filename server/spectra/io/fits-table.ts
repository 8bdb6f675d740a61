/**
 * Spectra stored as FITS binary tables: one row per pixel, or one row of array columns.
 */
import {
  cardString, isNumericColumn, keptHeader, readColumn, tableColumns, vacuumFromCommentary,
  vacuumFromKeywords, type FitsHdu, type TableColumn,
} from './fits'
import { SpectrumReadError, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, isBlankUnit, vacuumFromText } from './units'

/** Column names, in order of preference, matched case-insensitively (common practice). */
const WAVELENGTH_NAMES = ['WAVELENGTH', 'WAVE', 'LAMBDA', 'LOGLAM']
const FLUX_NAMES = ['FLUX', 'FLUX_DENSITY']
const ERROR_NAMES = ['ERROR', 'ERR', 'SIGMA', 'STATERROR', 'FLUX_ERROR', 'FLUX_ERR', 'IVAR']

function findColumn(cols: TableColumn[], names: string[]): TableColumn | undefined {
  for (const name of names) {
    const col = cols.find((c) => c.name.trim().toUpperCase() === name && isNumericColumn(c))
    if (col) return col
  }
  return undefined
}

export interface TableLayout {
  wave: TableColumn
  flux: TableColumn
  error?: TableColumn
}

/** The wavelength/flux(/error) columns of a BINTABLE HDU, or a reason why it holds no spectrum. */
export function tableLayout(hdu: FitsHdu, fileName: string): TableLayout | string {
  if (hdu.kind !== 'bintable') return 'it is not a binary table'
  const cols = tableColumns(hdu, fileName)
  const wave = findColumn(cols, WAVELENGTH_NAMES)
  const flux = findColumn(cols, FLUX_NAMES)
  if (!wave) return `no wavelength column (looked for ${WAVELENGTH_NAMES.join(', ')})`
  if (!flux) return `no flux column (looked for ${FLUX_NAMES.join(', ')})`
  const error = findColumn(cols, ERROR_NAMES)
  return error ? { wave, flux, error } : { wave, flux }
}

/** Number of values a column contributes to the spectrum: rows for scalars, repeat for arrays. */
function columnLength(hdu: FitsHdu, col: TableColumn): number {
  return col.repeat === 1 ? (hdu.naxis[1] ?? 0) : col.repeat
}

/**
 * Reads a spectrum from a binary-table HDU (FITS Standard 4.0 §7.3). Wavelength from WAVELENGTH,
 * WAVE, LAMBDA or LOGLAM (10^x), flux from FLUX or FLUX_DENSITY, 1σ error from ERROR, ERR,
 * SIGMA, STATERROR (or IVAR, turned into 1/√ivar with ivar ≤ 0 masked). Units from TUNITn (Å when
 * absent). Air or vacuum from VACUUM/AIRORVAC, the wavelength column's unit or comment, or a
 * COMMENT/HISTORY line about the wavelengths.
 * @throws SpectrumReadError NOT_A_SPECTRUM, LENGTH_MISMATCH, UNKNOWN_UNIT, TOO_MANY_PIXELS
 */
export function readTableHdu(
  bytes: Uint8Array, hdu: FitsHdu, primary: FitsHdu | undefined, fileName: string, options: ResolvedReadOptions,
): RawSpectrum {
  const layout = tableLayout(hdu, fileName)
  if (typeof layout === 'string') throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} is not a spectrum: ${layout}`)
  const { wave, flux, error } = layout
  const rows = hdu.naxis[1] ?? 0
  const n = columnLength(hdu, wave)
  for (const col of error ? [flux, error] : [flux]) {
    if ((col.repeat === 1) !== (wave.repeat === 1) || columnLength(hdu, col) !== n) {
      throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: column ${col.name} has ${columnLength(hdu, col)} values but ${wave.name} has ${n}`)
    }
  }
  if (n > options.maxPixels) {
    throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${n} pixels is more than the limit of ${options.maxPixels}`)
  }
  const notes: string[] = []
  if (wave.repeat > 1 && rows > 1) notes.push(`read the first of ${rows} rows`)
  const wavelength = readColumn(bytes, hdu, wave, 0)
  const isLog = wave.name.trim().toUpperCase() === 'LOGLAM'
  let unit = isBlankUnit(wave.unit) ? undefined : wave.unit!.trim()
  if (isLog && unit) unit = /^log(?:10)?\s*\(\s*(.*?)\s*\)$/i.exec(unit)?.[1] ?? (/^(dex|log)$/i.test(unit) ? undefined : unit)
  const factor = unit === undefined ? 1 : angstromsPerUnit(unit)
  if (factor === undefined) throw new SpectrumReadError('UNKNOWN_UNIT', `${fileName}: wavelength unit '${unit}' of column ${wave.name} is not one of Angstrom, nm, um, m`)
  for (let i = 0; i < n; i++) {
    const w = wavelength[i]!
    wavelength[i] = (isLog ? 10 ** w : w) * factor
  }
  const raw: RawSpectrum = {
    wavelength, flux: readColumn(bytes, hdu, flux, 0), vacuum: undefined, vacuumSource: '',
    wavelengthUnit: unit ?? 'Angstrom (assumed)', unitAssumed: unit === undefined,
    header: keptHeader(hdu, primary), notes, hdu: hdu.index,
  }
  if (flux.unit) raw.fluxUnit = flux.unit
  if (error) {
    const values = readColumn(bytes, hdu, error, 0)
    if (error.name.trim().toUpperCase() === 'IVAR') {
      const mask = new Uint8Array(n)
      for (let i = 0; i < n; i++) {
        const iv = values[i]!
        if (iv > 0 && Number.isFinite(iv)) values[i] = 1 / Math.sqrt(iv)
        else { values[i] = Infinity; mask[i] = 1 }
      }
      raw.mask = mask
      notes.push('error = 1/√IVAR')
    }
    raw.error = values
  }
  const kw = vacuumFromKeywords(hdu, primary)
  const colText = [wave.unit, wave.comment].filter((s): s is string => !!s).join(' ')
  const colVac = colText ? vacuumFromText(colText) : undefined
  const fromText = vacuumFromCommentary([hdu, primary], vacuumFromText)
  if (kw) { raw.vacuum = kw.vacuum; raw.vacuumSource = kw.source }
  else if (colVac !== undefined) { raw.vacuum = colVac; raw.vacuumSource = `column ${wave.name} says "${colText}"` }
  else if (fromText) { raw.vacuum = fromText.vacuum; raw.vacuumSource = fromText.source }
  const extname = cardString(hdu, 'EXTNAME')
  notes.push(`columns ${wave.name}, ${flux.name}${error ? `, ${error.name}` : ''}${extname ? ` of ${extname}` : ''}`)
  return raw
}
