/** A stored suggestion, as the API returns it; candidates, votes and probabilities are stored JSON. */
export interface SuggestionSummary {
  id: number
  spectrumId: number
  measurementId: number
  libraryVersionId: number
  pipelineVersion: string
  isCurrent: boolean
  /** MK notation with the class, e.g. "B5 Ib". */
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  uncertainty: { subtypes: number; classes: number }
  bestStandardId: number | null
  candidates: unknown[]
  votes: unknown[]
  flags: string[]
  probabilities: unknown[]
  createdAt: string
}

/** Suggestions as the caller may see them: withheld (`hidden`) under blind review until they have called. */
export interface SpectrumSuggestions {
  current: SuggestionSummary | null
  history: SuggestionSummary[]
  hidden: boolean
}
