/** An estimate with its 1σ spread. */
export interface EstimateSummary {
  value: number
  error: number
}

/** What the matcher says beyond type and class (pipeline 2 and later). */
export interface SuggestionDetails {
  /** Teff (K), log g (cgs) and [Fe/H] (dex) read off the voting standards' published values: a spectroscopic estimate. */
  parameters: { teff: EstimateSummary | null; logg: EstimateSummary | null; feh: EstimateSummary | null; standards: number }
  /** Share of the vote of each luminosity class, most likely first. */
  classShares: { luminosityClass: string; classCode: number; p: number }[]
  /** Why the class differs from the nearest standard's, when it does. */
  classNote: string | null
  /** The spectrum's resolution (as given or estimated) and the library level it was matched at, FWHM Å. */
  resolution: { fwhm: number | null; source: 'given' | 'estimated' | 'unknown'; bound: 'within' | 'sharpest' | 'coarsest' | null; level: number | null }
  /** Rms residual of the best fit and the largest that normal stars of the type show, continuum units. */
  residual: { rms: number; typical: number | null }
  /** How the suggestion was reached, in words (another level used, not a star). */
  notes: string[]
  /** Which standards decided it: the instrument's own or the general library's (absent before instruments had standards). */
  standards?: StandardsUsedSummary
}

/** Which standards decided a suggestion (server/spectra/match/instrument.ts StandardsUsed). */
export interface StandardsUsedSummary {
  /** The spectrum's instrument, when it has one. */
  instrument: { id: number; name: string } | null
  /** The instrument's own standards at the level matched; 0 when it has none. */
  instrumentStandards: number
  /** General standards left out there because the instrument's own cover their type and class. */
  covered: number
  /** Shares of the type and class votes from the instrument's own standards, 0–1. */
  instrumentShare: { type: number; class: number }
  decidedBy: 'instrument' | 'library' | 'mixed'
  /** Voting standards with at least 5 % of the type or class vote, largest first. */
  deciding: { standardId: number; spectralType: string; star: string | null; origin: string | null; set: 'instrument' | 'library'; typeShare: number; classShare: number }[]
  correction: { pairs: number; largest: number } | null
}

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
  /** Null for suggestions made before pipeline 2. */
  details: SuggestionDetails | null
  /** The instrument whose own standards took part, or null. */
  instrumentId: number | null
  createdAt: string
}

/** Suggestions as the caller may see them: withheld (`hidden`) under blind review until they have called. */
export interface SpectrumSuggestions {
  current: SuggestionSummary | null
  history: SuggestionSummary[]
  hidden: boolean
}
