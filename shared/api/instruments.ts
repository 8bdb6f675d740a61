import type { CoverageCell } from '../coverage'
import type { PersonRef } from './review'

export type { CoverageCell }

/** An instrument of a campaign, as GET /api/instruments lists it. */
export interface InstrumentSummary {
  id: number
  campaign: { id: number; code: string; name: string }
  name: string
  /** Resolution, FWHM Å; a spectrum that gives none is matched at it. */
  resolutionFwhm: number | null
  /** Wavelength coverage, Å. */
  wavelengthRange: [number, number] | null
  /** S/N a decided spectrum needs to be proposed as one of its standards. */
  candidateMinSnr: number
  notes: string
  /** Spectra taken with it. */
  spectra: number
  /** Its own standards in the active library version. */
  standards: number
  createdAt: string
  updatedAt: string
}

/** How a spectrum came to be decided, as a candidate standard needs it. */
export interface DecisionRecord {
  classificationId: number
  /** 'agreed': every call the same, by at least two classifiers; 'settled': a lead settled a dispute. */
  how: 'agreed' | 'settled'
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  decidedAt: string
  /** The lead who settled it; for an agreement, the classifier whose call completed it. */
  decidedBy: PersonRef | null
  /** The standing calls. */
  calls: { callId: number; classifier: PersonRef; spectralType: string; at: string }[]
}

/** A decided spectrum of the instrument that may be promoted as one of its standards. */
export interface InstrumentCandidate {
  spectrumId: number
  objectName: string
  snr: number
  decision: DecisionRecord
  /** The suggestion it has now (without quality flags, or it would not be a candidate). */
  suggestion: { id: number; spectralType: string; libraryVersionId: number }
  /** The gap in type × class coverage it fills. */
  cell: CoverageCell
  /** The best candidate of its cell (highest S/N); promoting several for one cell at once is refused. */
  firstInCell: boolean
}

/** GET /api/instruments/:id/candidates */
export interface InstrumentCandidates {
  instrument: InstrumentSummary
  activeVersionId: number | null
  /** Cells the instrument's standards of the active version fill. */
  coverage: CoverageCell[]
  candidates: InstrumentCandidate[]
  /** Spectra of the instrument not proposed, counted by why. */
  passedOver: { reason: string; count: number }[]
}
