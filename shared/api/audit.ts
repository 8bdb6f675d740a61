/** A figure with the number of items behind it; `value` is null when it is undefined (no items, or κ with one category). */
export interface Figure {
  value: number | null
  n: number
  smallSample: boolean
}

export interface AgreementFigures {
  /** Items both raters rated. */
  n: number
  exactType: Figure
  withinOneSubtype: Figure
  exactClass: Figure
  withinOneClass: Figure
  /** Cohen's κ on the luminosity-class codes. */
  kappaClass: Figure
  /** Weighted κ (Cohen 1968) on the numeric type scale. */
  weightedKappaTypeLinear: Figure
  weightedKappaTypeQuadratic: Figure
}

export interface RaterRef {
  kind: 'classifier' | 'suggestion'
  id: number | null
  name: string
}

export interface PairFigures extends AgreementFigures {
  a: RaterRef
  b: RaterRef
}

export interface ClassifierFigures {
  id: number
  name: string
  calls: number
  /** Mean signed offset of the classifier's calls from the consensus (positive = later type / fainter class). */
  typeOffset: Figure
  classOffset: Figure
  medianSecondsPerCall: Figure
}

export interface MatrixCell {
  count: number
  spectrumIds: number[]
}

/** Rows: the first rater's category; columns: the second's. */
export interface ConfusionMatrix {
  rowsAre: string
  columnsAre: string
  labels: string[]
  cells: MatrixCell[][]
  n: number
}

/** The four agreement fractions of a group of calls against one reference. */
export interface FourFigures {
  exactType: Figure
  withinOneSubtype: Figure
  exactClass: Figure
  withinOneClass: Figure
}

export interface GroupFigures {
  /** ISO week "2025-W03", or a library-version name. */
  key: string
  calls: number
  /** Calls against the consensus. */
  vsConsensus: FourFigures
  /** Calls against the suggestion. */
  vsSuggestion: FourFigures
}

export interface BlindFigures {
  /** Calls made with the suggestion on screen. */
  shown: { calls: number; acceptedSuggestion: Figure; agreeWithSuggestion: Figure; exactTypeVsConsensus: Figure }
  /** Calls made before the suggestion was shown. */
  blind: { calls: number; agreeWithSuggestion: Figure; exactTypeVsConsensus: Figure }
}

export interface AuditFigures {
  spectra: number
  calls: number
  classifiers: ClassifierFigures[]
  pairs: PairFigures[]
  vsSuggestion: PairFigures[]
  fleiss: { type: Figure; class: Figure; ratersPerItem: number | null }
  confusion: {
    callsVsConsensus: { type: ConfusionMatrix; class: ConfusionMatrix }
    suggestionVsConsensus: { type: ConfusionMatrix; class: ConfusionMatrix }
  }
  byWeek: GroupFigures[]
  byLibraryVersion: GroupFigures[]
  blind: BlindFigures
  notes: string[]
}

/** How often suggestions hit the decided classification. */
export interface AccuracyFigures {
  /** Decided spectra scored. */
  n: number
  exactType: Figure
  withinOneSubtype: Figure
  exactClass: Figure
  /** Mean share of the type vote that came from the instrument's own standards. */
  ownShare: Figure
}

export interface VersionAccuracy extends AccuracyFigures {
  version: { id: number; name: string; publishedAt: string | null }
  /** Its ±1-subtype and exact-class figures minus the previous version's for this instrument, in points (null for the first, or without figures). */
  change: { withinOneSubtype: number | null; exactClass: number | null }
}

/** Suggestion accuracy for the spectra of one instrument (or of none). */
export interface InstrumentAccuracy {
  instrument: { id: number | null; name: string }
  /** Per library version, in the order they were published. */
  versions: VersionAccuracy[]
  /** Per ISO week the suggestions were made, with the versions that made them. */
  byWeek: (AccuracyFigures & { week: string; versions: string[] })[]
}

/** Suggestions scored against the decided classifications, per instrument and per library version. */
export interface SuggestionAccuracy {
  instruments: InstrumentAccuracy[]
  notes: string[]
}

/** GET /api/audit: the figures of one campaign over a date range. */
export interface AuditReport extends AuditFigures {
  suggestionAccuracy: SuggestionAccuracy
  campaign: { id: number; code: string; name: string }
  from: string | null
  to: string | null
}
