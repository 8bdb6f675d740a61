import type { SpectrumStatus } from '../status'
import type { SpectrumMeasurements } from './measurements'
import type { FinalClassification } from './review'
import type { SpectrumSuggestions } from './suggestions'

export type SpectrumFormat = 'fits-image' | 'fits-table' | 'text'

export type HeaderValue = string | number | boolean

/** One HDU that holds a spectrum, as listed in {@link ReadMeta.hdus}. */
export interface SpectrumHdu {
  index: number
  name?: string
  kind: 'image' | 'table'
}

/** What the reader learned from the file. */
export interface ReadMeta {
  format: SpectrumFormat
  /** HDU the spectrum came from (FITS only). */
  hdu?: number
  /** Every HDU that holds a spectrum (FITS only), so a user can pick another. */
  hdus?: SpectrumHdu[]
  /** True when the file's wavelengths were vacuum and have been turned into air. */
  vacuumConverted: boolean
  /** Where the air/vacuum decision came from, e.g. "CTYPE1 = 'WAVE'" or "user's choice". */
  vacuumSource: string
  /** Wavelength unit as the file gave it, or "Angstrom (assumed)". */
  wavelengthUnit: string
  fluxUnit?: string
  /** Observation keywords kept as the file has them (OBJECT, RA, DEC, DATE-OBS, EXPTIME, …). */
  header: Record<string, HeaderValue>
  pixels: number
  /** Pixels flagged in `mask`. */
  maskedPixels: number
  /** Fraction of the classification region spanned by valid pixels. */
  coverage: number
  /** True when the file stored wavelengths in descending order and they were reversed. */
  reversed: boolean
  /** Things a person may want to know (e.g. "read the first of 2 rows"). */
  notes: string[]
}

/** One row of GET /api/spectra. */
export interface SpectrumListItem {
  id: number
  objectName: string
  status: SpectrumStatus
  statusReason: string | null
  campaign: { id: number; code: string; name: string }
  submittedBy: { id: number; name: string }
  fileName: string
  obsDate: string | null
  createdAt: string
  snr: number | null
  pixels: number
  wavelengthRange: [number, number]
  dispersion: number
  raDeg: number | null
  decDeg: number | null
  /** The decided classification (agreed, settled or an accepted suggestion), when there is one. */
  classification: FinalClassification | null
}

export interface SpectrumList {
  items: SpectrumListItem[]
  total: number
  page: number
  pageSize: number
}

export interface SpectrumDetail extends SpectrumListItem {
  instrument: string
  exposureS: number | null
  resolutionFwhm: number | null
  resolvingPower: number | null
  vMag: number | null
  parallaxMas: number | null
  parallaxErrorMas: number | null
  ebv: number | null
  notes: string
  format: string
  fileSize: number
  fileSha256: string
  vacuumConverted: boolean
  read: ReadMeta
  canEdit: boolean
}

/** GET /api/spectra/:id: the spectrum with its measurements and the suggestions the caller may see. */
export interface SpectrumPage {
  spectrum: SpectrumDetail
  measurements: SpectrumMeasurements
  suggestions: SpectrumSuggestions
}

/** The outcome for one uploaded file (zip archives give one per entry). */
export type FileResult =
  | { file: string; outcome: 'accepted'; spectrumId: number; pixels: number; wavelengthRange: [number, number]; dispersion: number; snr: number | null; objectName: string; notes: string[] }
  | { file: string; outcome: 'duplicate'; spectrumId: number | null; message: string }
  | { file: string; outcome: 'refused'; code: string; message: string }

export interface SubmitReply {
  results: FileResult[]
  accepted: number
  refused: number
}

