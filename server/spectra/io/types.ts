import type { Spectrum1D } from '../../../shared/spectrum'
import type { HeaderValue, ReadMeta, SpectrumFormat, SpectrumHdu } from '../../../shared/api/spectra'

export type { HeaderValue, ReadMeta, SpectrumFormat, SpectrumHdu }

/** Why a file was refused. Stable strings: the API and the client show them. */
export type RefusalCode =
  | 'EMPTY_FILE'
  | 'FILE_TOO_LARGE'
  | 'UNKNOWN_FORMAT'
  | 'FITS_MALFORMED'
  | 'FITS_TRUNCATED'
  | 'FITS_UNSUPPORTED'
  | 'HDU_NOT_FOUND'
  | 'NOT_A_SPECTRUM'
  | 'NO_WAVELENGTH_SCALE'
  | 'UNKNOWN_UNIT'
  | 'TEXT_MALFORMED'
  | 'LENGTH_MISMATCH'
  | 'BAD_WAVELENGTHS'
  | 'UNSORTED_WAVELENGTHS'
  | 'DUPLICATE_WAVELENGTHS'
  | 'NO_VALID_FLUX'
  | 'TOO_FEW_PIXELS'
  | 'TOO_MANY_PIXELS'
  | 'NOT_OPTICAL'
  | 'NO_COVERAGE'

/** Every refusal code, for tests and for clients that list them. */
export const REFUSAL_CODES: readonly RefusalCode[] = [
  'EMPTY_FILE', 'FILE_TOO_LARGE', 'UNKNOWN_FORMAT', 'FITS_MALFORMED', 'FITS_TRUNCATED',
  'FITS_UNSUPPORTED', 'HDU_NOT_FOUND', 'NOT_A_SPECTRUM', 'NO_WAVELENGTH_SCALE', 'UNKNOWN_UNIT',
  'TEXT_MALFORMED', 'LENGTH_MISMATCH', 'BAD_WAVELENGTHS', 'UNSORTED_WAVELENGTHS',
  'DUPLICATE_WAVELENGTHS', 'NO_VALID_FLUX', 'TOO_FEW_PIXELS', 'TOO_MANY_PIXELS', 'NOT_OPTICAL',
  'NO_COVERAGE',
]

/** Options of {@link readSpectrum}; every field is optional. */
export interface ReadOptions {
  /** Largest accepted file, bytes. @default 50_000_000 */
  maxBytes?: number
  /** Most pixels a spectrum may have. @default 2_000_000 */
  maxPixels?: number
  /** Fewest pixels a spectrum may have. @default 100 */
  minPixels?: number
  /** FITS extension to read: 0-based HDU index or EXTNAME (case-insensitive). @default first HDU holding a spectrum */
  hdu?: number | string
  /** Overrides what the file says: true = wavelengths are vacuum, false = air. @default what the file says, else air */
  assumeVacuum?: boolean
  /** Region that must be covered, Å (air). @default [3900, 4900] */
  classificationRegion?: readonly [number, number]
  /** Fraction of the region that valid pixels must span. @default 0.8 */
  minCoverage?: number
}

export interface ResolvedReadOptions {
  maxBytes: number
  maxPixels: number
  minPixels: number
  hdu: number | string | undefined
  assumeVacuum: boolean | undefined
  classificationRegion: readonly [number, number]
  minCoverage: number
}

export const DEFAULT_READ_OPTIONS: Omit<ResolvedReadOptions, 'hdu' | 'assumeVacuum'> = {
  maxBytes: 50_000_000,
  maxPixels: 2_000_000,
  minPixels: 100,
  classificationRegion: [3900, 4900],
  minCoverage: 0.8,
}

export type ReadSuccess = { ok: true; spectrum: ReadSpectrum; meta: ReadMeta }
export type ReadRefusal = { ok: false; code: RefusalCode; message: string }
export type ReadResult = ReadSuccess | ReadRefusal

/** The spectrum a reader returns: {@link Spectrum1D} with its wavelength axis named for what it is. */
export interface ReadSpectrum {
  /** Å, air, strictly ascending. */
  wavelengthAir: Float64Array
  flux: Float64Array
  error?: Float64Array
  /** 1 = unusable pixel; absent when all pixels are good. */
  mask?: Uint8Array
}

/** Converts a reader's result into the pipeline's {@link Spectrum1D}. */
export function toSpectrum1D(spectrum: ReadSpectrum): Spectrum1D {
  const out: Spectrum1D = { wavelength: spectrum.wavelengthAir, flux: spectrum.flux }
  if (spectrum.error) out.error = spectrum.error
  if (spectrum.mask) out.mask = spectrum.mask
  return out
}

/** Thrown inside the readers and turned into a {@link ReadRefusal} at the entry point. */
export class SpectrumReadError extends Error {
  readonly code: RefusalCode
  constructor(code: RefusalCode, message: string) {
    super(message)
    this.name = 'SpectrumReadError'
    this.code = code
  }
}

/**
 * What a format reader hands to the shared checks: wavelengths as stored (any order) in Å,
 * before the air/vacuum change.
 */
export interface RawSpectrum {
  wavelength: Float64Array
  flux: Float64Array
  error?: Float64Array
  /** Pixels the file itself flags (BLANK, zero inverse variance, …). */
  mask?: Uint8Array
  /** What the file says: true vacuum, false air, undefined silent. */
  vacuum: boolean | undefined
  vacuumSource: string
  wavelengthUnit: string
  /** True when the file gave no unit and Å was assumed (changes the hint in NOT_OPTICAL). */
  unitAssumed: boolean
  fluxUnit?: string
  header: Record<string, HeaderValue>
  notes: string[]
  hdu?: number
}

/** A reader of one file format, registered in the registry of readers. */
export interface FormatReader {
  readonly format: 'fits' | 'text'
  /** Cheap test on the first bytes (and the name, as a tie-breaker). */
  sniff(bytes: Uint8Array, fileName: string): boolean
  /** Reads the file; throws {@link SpectrumReadError} on refusal. */
  read(bytes: Uint8Array, fileName: string, options: ResolvedReadOptions): { raw: RawSpectrum; format: SpectrumFormat; hdus?: SpectrumHdu[] }
}
