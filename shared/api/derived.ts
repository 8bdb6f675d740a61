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
  /** The server's wording of the caution that these are estimates. */
  caution: string
}
