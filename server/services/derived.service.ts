import type { SuggestionDetails } from '../../shared/api/suggestions'
import { deriveParameters, type DerivedInput, type DerivedParameters } from '../../shared/derived'
import { parseMK } from '../../shared/mk'
import { notFound } from '../lib/http-error'
import { Classification, Spectrum, Suggestion } from '../models'
import type { ClassificationBasis, DerivedView, ObserverInputs } from '../../shared/api/derived'

export type { ClassificationBasis, DerivedView, ObserverInputs }

/** Shown beside every derived value. */
export const DERIVED_CAUTION = 'Calibration estimates, not measurements: derived from the MK type and class with published calibrations.'

/** The least uncertainty of a decided type or class: half a step, the resolution of the notation. */
export const MIN_TYPE_UNCERTAINTY = 0.5
export const MIN_CLASS_UNCERTAINTY = 0.5

/**
 * The uncertainty of a decided classification: half the spread of the calls it rests on, or the
 * suggestion's own uncertainty when the suggestion was accepted, never below half a subtype and
 * half a class.
 */
export function decisionUncertainty(
  c: Pick<Classification, 'source' | 'typeSpread' | 'classSpread'>,
  suggestion: Pick<Suggestion, 'uncertaintySubtypes' | 'uncertaintyClasses'> | null,
): { type: number; class: number } {
  const fromSuggestion = c.source === 'accepted-suggestion' && suggestion
  return {
    type: Math.max(MIN_TYPE_UNCERTAINTY, fromSuggestion ? suggestion.uncertaintySubtypes : (c.typeSpread ?? 0) / 2),
    class: Math.max(MIN_CLASS_UNCERTAINTY, fromSuggestion ? suggestion.uncertaintyClasses : (c.classSpread ?? 0) / 2),
  }
}

/** Observer values as the calibration takes them (a parallax only when positive). */
export function derivedInput(basis: ClassificationBasis, inputs: ObserverInputs): DerivedInput {
  const input: DerivedInput = { typeUncertainty: basis.typeUncertainty, classUncertainty: basis.classUncertainty }
  if (inputs.vMag !== null) input.apparentMagnitudeV = inputs.vMag
  if (inputs.ebv !== null) input.ebv = inputs.ebv
  if (inputs.parallaxMas !== null && inputs.parallaxMas > 0) {
    input.parallaxMas = inputs.parallaxMas
    if (inputs.parallaxErrorMas !== null) input.parallaxErrorMas = inputs.parallaxErrorMas
  }
  return input
}

/** Derived parameters of a classification, or the "outside the MK grid" flag when the type has no calibration. */
export function estimatesFor(basis: ClassificationBasis, inputs: ObserverInputs): DerivedParameters {
  const parsed = parseMK(basis.spectralType)
  if (!parsed.ok) return { ok: false, flag: 'outside the MK grid', reason: `the type "${basis.spectralType}" does not parse: ${parsed.reason}` }
  return deriveParameters(parsed.value, derivedInput(basis, inputs))
}

/** The basis for derived values: the decided classification, else the current suggestion. */
export async function basisFor(spectrumId: number, options: { suggestion?: boolean } = {}): Promise<ClassificationBasis | null> {
  const decision = await Classification.findOne({ where: { spectrumId }, order: [['id', 'DESC']] })
  if (decision) {
    const suggestion = decision.suggestionId ? await Suggestion.findByPk(decision.suggestionId, { attributes: ['id', 'uncertaintySubtypes', 'uncertaintyClasses'] }) : null
    const u = decisionUncertainty(decision, suggestion)
    return { source: 'classification', spectralType: decision.spectralType, typeUncertainty: u.type, classUncertainty: u.class }
  }
  if (options.suggestion === false) return null
  const s = await Suggestion.findOne({ where: { spectrumId, isCurrent: true }, order: [['id', 'DESC']], attributes: ['id', 'spectralType', 'uncertaintySubtypes', 'uncertaintyClasses'] })
  if (!s) return null
  return {
    source: 'suggestion',
    spectralType: s.spectralType,
    typeUncertainty: Math.max(MIN_TYPE_UNCERTAINTY, s.uncertaintySubtypes),
    classUncertainty: Math.max(MIN_CLASS_UNCERTAINTY, s.uncertaintyClasses),
  }
}

export const observerInputs = (s: Pick<Spectrum, 'vMag' | 'ebv' | 'parallaxMas' | 'parallaxErrorMas'>): ObserverInputs => ({
  vMag: s.vMag,
  ebv: s.ebv,
  parallaxMas: s.parallaxMas,
  parallaxErrorMas: s.parallaxErrorMas,
})

/**
 * Teff, M_V, BC, L, R and distances of a spectrum the caller may see (checked by the caller), with
 * the caution. `suggestion: false` leaves an undecided spectrum underived, for callers from whom
 * blind review withholds the suggestion.
 */
export async function derivedFor(spectrumId: number, spectrum?: Spectrum, options: { suggestion?: boolean } = {}): Promise<DerivedView> {
  const s = spectrum ?? (await Spectrum.findByPk(spectrumId))
  if (!s) throw notFound('The spectrum')
  const basis = await basisFor(s.id, options)
  const inputs = observerInputs(s)
  const current = options.suggestion === false ? null : await Suggestion.findOne({ where: { spectrumId: s.id, isCurrent: true }, attributes: ['id', 'details'] })
  const details = current?.details ? (JSON.parse(current.details) as SuggestionDetails) : null
  const spectroscopic = details && details.parameters.standards > 0 ? details.parameters : null
  return { spectrumId: s.id, basis, inputs, estimates: basis ? estimatesFor(basis, inputs) : null, spectroscopic, caution: DERIVED_CAUTION }
}
