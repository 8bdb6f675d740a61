import { z } from 'zod'
import { idParams } from './common'
import { endpoint } from './endpoint'
import { SuggestionDetails } from './suggestions'

/** A derived value with its uncertainty (1σ, same unit). */
export const Estimate = z.object({
  value: z.number(),
  /** Quadrature sum of the two parts below. */
  uncertainty: z.number(),
  /** Spread from the classification's uncertainty (half the change over type ± Δ, class ± Δ, in quadrature). */
  fromClassification: z.number(),
  /** Adopted calibration scatter, propagated. */
  calibrationScatter: z.number(),
})
export type Estimate = z.infer<typeof Estimate>

/** Physical parameters derived from an MK classification with published calibrations (shared/derived.ts). */
export const DerivedParameters = z
  .discriminatedUnion('ok', [
    z.object({
      ok: z.literal(true),
      /** Calibrations used, by quantity. */
      sources: z.object({ teff: z.string(), absoluteMagnitudeV: z.string(), bolometricCorrectionV: z.string() }),
      teff: Estimate,
      absoluteMagnitudeV: Estimate,
      bolometricCorrectionV: Estimate,
      absoluteBolometricMagnitude: Estimate,
      luminositySolar: Estimate,
      radiusSolar: Estimate,
      /** Spectroscopic-parallax distance, pc (when an apparent magnitude is given). */
      spectroscopicDistancePc: Estimate.optional(),
      /** Distance from the trigonometric parallax, pc (1/ϖ; when a parallax is given). */
      parallaxDistancePc: z.object({ value: z.number(), uncertainty: z.number() }).optional(),
      /** A(V) used, mag. */
      av: z.number(),
    }),
    z.object({ ok: z.literal(false), flag: z.literal('outside the MK grid'), reason: z.string() }),
  ])
  .meta({ id: 'DerivedParameters' })
export type DerivedParameters = z.infer<typeof DerivedParameters>

/** What derived estimates rest on: the decided classification, else the current suggestion. */
export const ClassificationBasis = z.object({
  source: z.enum(['classification', 'suggestion']),
  spectralType: z.string(),
  /** Subtypes. */
  typeUncertainty: z.number(),
  /** Classes. */
  classUncertainty: z.number(),
})
export type ClassificationBasis = z.infer<typeof ClassificationBasis>

/** What the observer supplied about the star. */
export const ObserverInputs = z.object({ vMag: z.number().nullable(), ebv: z.number().nullable(), parallaxMas: z.number().nullable(), parallaxErrorMas: z.number().nullable() })
export type ObserverInputs = z.infer<typeof ObserverInputs>

export const DerivedView = z
  .object({
    spectrumId: z.number().int(),
    /** What the estimates rest on; null when the spectrum has neither a decision nor a suggestion. */
    basis: ClassificationBasis.nullable(),
    inputs: ObserverInputs,
    estimates: DerivedParameters.nullable(),
    /**
     * Teff, log g and [Fe/H] read off the published values of the standards nearest the spectrum (the
     * current suggestion's), beside the calibration estimates; null without a suggestion, or when blind
     * review withholds it.
     */
    spectroscopic: SuggestionDetails.shape.parameters.nullable(),
    /** The server's wording of the caution that these are estimates. */
    caution: z.string(),
  })
  .meta({ id: 'DerivedView' })
export type DerivedView = z.infer<typeof DerivedView>

export const derivedApi = {
  get: endpoint({
    method: 'get',
    path: '/spectra/:id/derived',
    tag: 'Spectra',
    summary: 'Physical parameters derived from the classification (estimates from published calibrations)',
    params: idParams,
    response: z.object({ derived: DerivedView }),
  }),
}
