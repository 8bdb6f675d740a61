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

/** A pixel mask the reader applied, with the convention it followed. */
export interface ReadMask {
  /** Where the flags came from, e.g. "DATAQUAL column", "DQ extension", "IVAR = 0". */
  source: string
  /** The convention applied and why, e.g. "0 = bad (the column comment says 1=good, 0=bad)". */
  rule: string
  /** Pixels it flagged. */
  pixels: number
}

/** The reader's decisions, shown with the upload result and on the spectrum page. */
export interface ReadDecisions {
  /** Where the spectrum came from, e.g. "HDU 2 (BLUE), image" or "text table, 2 columns". */
  source: string
  /** HDU read and why (FITS only). */
  hdu?: { index: number; name?: string; why: string }
  /** Aperture, order or row read when the file holds several (or "merged" for echelle orders). */
  aperture?: { number: number | 'merged'; of: number; why: string }
  /** How the wavelengths were obtained, e.g. "linear: CRVAL1 + CDELT1 (p − CRPIX1)". */
  wavelengthSolution: string
  /** Unit of the file's wavelengths and where it came from. */
  unit: { unit: string; why: string }
  /** Air or vacuum, why, and what contradicted it. */
  medium: { vacuum: boolean; why: string; conflict?: string }
  /** Where the 1σ errors came from, when there are any. */
  errors?: string
  masks: ReadMask[]
  /** Parts of the file not used, each with why. */
  ignored: string[]
  /** What the observer should check (contradictions, masks not applied, merged orders). */
  warnings: string[]
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
  /** The reader's decisions (absent on spectra read before they were recorded). */
  decisions?: ReadDecisions
}

/** How the observer asked for a file to be read; every field is optional ("as the file says"). */
export interface ReadChoices {
  medium?: 'air' | 'vacuum'
  /** Wavelength unit to use instead of the file's, e.g. "nm". */
  unit?: string
  hdu?: number
  /** Aperture, order or row, counted from 1. */
  aperture?: number
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
  /** The instrument setup as the observer or the file header wrote it. */
  instrument: string
  /** The campaign's instrument record it was taken with. */
  instrumentRecord: { id: number; name: string; resolutionFwhm: number | null } | null
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
  /** How the observer asked for the file to be read. */
  readChoices: ReadChoices
  canEdit: boolean
  /** The submitter, before any call. */
  canWithdraw: boolean
  /** Whether reading choices and resolution may be changed (re-read and re-process): the submitter before any call, or a lead. */
  canReread: boolean
}

/** GET /api/spectra/:id: the spectrum with its measurements and the suggestions the caller may see. */
export interface SpectrumPage {
  spectrum: SpectrumDetail
  measurements: SpectrumMeasurements
  suggestions: SpectrumSuggestions
}

/** The outcome for one uploaded file (zip archives give one per entry). */
export type FileResult =
  | { file: string; outcome: 'accepted'; spectrumId: number; pixels: number; wavelengthRange: [number, number]; dispersion: number; snr: number | null; objectName: string; notes: string[]; decisions: ReadDecisions }
  | { file: string; outcome: 'duplicate'; spectrumId: number | null; message: string }
  | { file: string; outcome: 'refused'; code: string; message: string }

export interface SubmitReply {
  results: FileResult[]
  accepted: number
  refused: number
}

