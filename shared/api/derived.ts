import type { SuggestionDetails } from './suggestions'
import type { DerivedParameters } from '../derived'

/** What derived estimates rest on: the decided classification, else the current suggestion. */
export interface ClassificationBasis {
  source: 'classification' | 'suggestion'
  spectralType: string
  /** Subtypes. */
  typeUncertainty: number
  /** Classes. */
  classUncertainty: number
}

/** What the observer supplied about the star. */
export interface ObserverInputs {
  vMag: number | null
  ebv: number | null
  parallaxMas: number | null
  parallaxErrorMas: number | null
}

/** GET /api/spectra/:id/derived. */
export interface DerivedView {
  spectrumId: number
  /** What the estimates rest on; null when the spectrum has neither a decision nor a suggestion. */
  basis: ClassificationBasis | null
  inputs: ObserverInputs
  estimates: DerivedParameters | null
  /**
   * Teff, log g and [Fe/H] read off the published values of the standards nearest the spectrum (the
   * current suggestion's), beside the calibration estimates; null without a suggestion, or when blind
   * review withholds it.
   */
  spectroscopic: SuggestionDetails['parameters'] | null
  /** The server's wording of the caution that these are estimates. */
  caution: string
}
