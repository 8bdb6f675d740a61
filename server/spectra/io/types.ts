import type { Spectrum1D } from '../../../shared/spectrum'
import type { FlagSet } from './quality'
import type { HeaderValue, ReadDecisions, ReadMask, ReadMeta, SpectrumFormat, SpectrumHdu } from '../../../shared/api/spectra'

export type { HeaderValue, ReadDecisions, ReadMask, ReadMeta, SpectrumFormat, SpectrumHdu }

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
  | 'APERTURE_NOT_FOUND'

/** Every refusal code, for tests and for clients that list them. */
// prettier-ignore
export const REFUSAL_CODES: readonly RefusalCode[] = [
  'EMPTY_FILE', 'FILE_TOO_LARGE', 'UNKNOWN_FORMAT', 'FITS_MALFORMED', 'FITS_TRUNCATED',
  'FITS_UNSUPPORTED', 'HDU_NOT_FOUND', 'NOT_A_SPECTRUM', 'NO_WAVELENGTH_SCALE', 'UNKNOWN_UNIT',
  'TEXT_MALFORMED', 'LENGTH_MISMATCH', 'BAD_WAVELENGTHS', 'UNSORTED_WAVELENGTHS',
  'DUPLICATE_WAVELENGTHS', 'NO_VALID_FLUX', 'TOO_FEW_PIXELS', 'TOO_MANY_PIXELS', 'NOT_OPTICAL',
  'NO_COVERAGE', 'APERTURE_NOT_FOUND',
]

/** Options of {@link readSpectrum}; every field is optional. */
export interface ReadOptions {
  /** Largest accepted file, bytes. @default 50_000_000 */
  maxBytes?: number
  /** Most pixels a spectrum may have. @default 2_000_000 */
  maxPixels?: number
  /** Fewest pixels a spectrum may have. @default 100 */
  minPixels?: number
  /** FITS extension to read: 0-based HDU index or EXTNAME (case-insensitive). @default the first HDU holding a spectrum that covers the classification region */
  hdu?: number | string
  /** Aperture, order or row to read when a file holds several, counted from 1. @default the first that covers the classification region, else echelle orders merged */
  aperture?: number
  /** Overrides what the file says: true = wavelengths are vacuum, false = air. @default what the file says, else air */
  assumeVacuum?: boolean
  /** Overrides the file's wavelength unit (any unit {@link angstromsPerUnit} knows, e.g. "nm"). @default the file's, else Å */
  wavelengthUnit?: string
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
  aperture: number | undefined
  assumeVacuum: boolean | undefined
  /** Å per unit of the observer's unit, when they gave one. */
  unitFactor: { unit: string; factor: number } | undefined
  classificationRegion: readonly [number, number]
  minCoverage: number
}

export const DEFAULT_READ_OPTIONS: Omit<ResolvedReadOptions, 'hdu' | 'aperture' | 'assumeVacuum' | 'unitFactor'> = {
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

/** One piece of evidence about air or vacuum, with how much it weighs. */
export interface MediumEvidence {
  vacuum: boolean
  /** What said so, e.g. "AIRORVAC = 'air'". */
  source: string
  /**
   * 3: an explicit statement (VACUUM, AIRORVAC, CTYPE AWAV, a wave_vac/wave_air column);
   * 2: words in the header or file text; 1.5: the convention of the layout (survey log10 λ);
   * 1: the generic CTYPE WAVE that many writers put on air wavelengths too.
   */
  strength: number
  /** A layout's convention rather than a statement: overruling it is no contradiction. */
  inferred?: boolean
}

/**
 * What a format reader hands to the shared checks: wavelengths as stored (any order) in Å,
 * before the air/vacuum change, with what the reader decided on the way.
 */
export interface RawSpectrum {
  wavelength: Float64Array
  flux: Float64Array
  error?: Float64Array
  /** Pixels that are unusable whatever the conventions (BLANK, zero inverse variance …). */
  mask?: Uint8Array
  /** Quality flags read by a convention; finalize applies each set unless it would leave nothing usable. */
  flagSets?: FlagSet[]
  /** Everything the file says about air or vacuum, strongest first where the reader knows. */
  medium: MediumEvidence[]
  wavelengthUnit: string
  /** Where the unit came from ("CUNIT1", "TUNIT1", "your choice", "assumed: the file names none"). */
  unitSource: string
  /** True when the file gave no unit and Å was assumed (changes the hint in NOT_OPTICAL). */
  unitAssumed: boolean
  fluxUnit?: string
  header: Record<string, HeaderValue>
  notes: string[]
  hdu?: number
  hduName?: string
  hduWhy?: string
  source: string
  solution: string
  aperture?: ReadDecisions['aperture']
  errorSource?: string
  masks: ReadMask[]
  ignored: string[]
  warnings: string[]
  /** Added to a NO_COVERAGE refusal: what else the file holds that the observer could pick. */
  coverageHint?: string
}

/** A reader of one file format, registered in the registry of readers. */
export interface FormatReader {
  readonly format: 'fits' | 'text'
  /** Cheap test on the first bytes (and the name, as a tie-breaker). */
  sniff(bytes: Uint8Array, fileName: string): boolean
  /** Reads the file; throws {@link SpectrumReadError} on refusal. */
  read(bytes: Uint8Array, fileName: string, options: ResolvedReadOptions): { raw: RawSpectrum; format: SpectrumFormat; hdus?: SpectrumHdu[] }
}
