import type { DecisionRecord } from './instruments'

export type StandardSource = 'model' | 'observed'

/** Where a standard promoted from a team's agreed spectrum comes from. */
export interface StandardProvenance {
  instrument: { id: number; name: string }
  spectrumId: number
  objectName: string
  snr: number
  /** Who decided, how, the calls and the date. */
  decision: DecisionRecord
  /** The gap in the instrument's type × class coverage it filled, e.g. "K0 III". */
  gap: string
  promotedBy: { id: number; name: string }
  promotedAt: string
}

/** What a promotion or a demotion changed, and why; kept with the version it published. */
export interface VersionChanges {
  action: 'promote' | 'demote'
  instrument: { id: number; name: string }
  /** The lead's note. */
  note: string
  standards: { standardId: number; spectrumId: number | null; spectralType: string; reason: string }[]
}

export interface StandardSummary {
  id: number
  source: StandardSource
  modelId: string | null
  /** Id in the shipped observed library, e.g. "miles-0892". */
  templateId: string | null
  /** Star name and the library it comes from (shipped observed standards). */
  star: string | null
  origin: string | null
  /** The uploaded spectrum behind an observed standard. */
  spectrumId: number | null
  /** MK notation with the class, e.g. "B5 IV". */
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  teff: number | null
  logg: number | null
  feh: number | null
  /** Resolution of the standard's spectrum, FWHM Å, when known. */
  resolutionFwhm: number | null
  note: string
  addedBy: number | null
  retiredAt: string | null
  createdAt: string
  /** Ids of the versions that hold this standard. */
  versionIds: number[]
  /** The instrument it was promoted for; null for standards every spectrum is matched against. */
  instrumentId: number | null
  /** Who decided it and how, for a standard promoted from an agreed spectrum. */
  provenance: StandardProvenance | null
}

/** A published (or draft) set of standards; suggestions record which one made them. */
export interface VersionSummary {
  id: number
  name: string
  description: string
  status: 'draft' | 'published'
  isActive: boolean
  publishedAt: string | null
  /** User id of the lead who published it; null for the library shipped with Lineweight. */
  publishedBy: number | null
  standardCount: number
  /** The instrument whose standards a promotion or demotion changed. */
  instrumentId: number | null
  /** The version it was made from by a promotion or demotion. */
  basedOnId: number | null
  changes: VersionChanges | null
}

/** GET /api/standards: every version and every standard (without arrays), and which version is active. */
export interface StandardsLibrary {
  activeVersionId: number | null
  versions: VersionSummary[]
  standards: StandardSummary[]
}
