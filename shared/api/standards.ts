export type StandardSource = 'model' | 'observed'

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
}

/** GET /api/standards: every version and every standard (without arrays), and which version is active. */
export interface StandardsLibrary {
  activeVersionId: number | null
  versions: VersionSummary[]
  standards: StandardSummary[]
}
