import { z } from 'zod'
import { mkFields } from './common'

/** Quality flags a suggestion can carry (the pipeline's matcher raises them; the screens explain each). */
export const SUGGESTION_FLAGS = ['low-snr', 'emission', 'poor-fit', 'outside-grid', 'possible-composite', 'not-mk', 'not-star'] as const
export type SuggestionFlag = (typeof SUGGESTION_FLAGS)[number]

/** An estimate with its 1σ spread. */
export const EstimateSummary = z.object({ value: z.number(), error: z.number() })
export type EstimateSummary = z.infer<typeof EstimateSummary>

/** Which standards decided a suggestion (server/spectra/match/instrument.ts StandardsUsed). */
export const StandardsUsedSummary = z
  .object({
    /** The spectrum's instrument, when it has one. */
    instrument: z.object({ id: z.number().int(), name: z.string() }).nullable(),
    /** The instrument's own standards at the level matched; 0 when it has none. */
    instrumentStandards: z.number().int(),
    /** General standards left out there because the instrument's own cover their type and class. */
    covered: z.number().int(),
    /** Shares of the type and class votes from the instrument's own standards, 0–1. */
    instrumentShare: z.object({ type: z.number(), class: z.number() }),
    decidedBy: z.enum(['instrument', 'library', 'mixed']),
    /** Voting standards with at least 5 % of the type or class vote, largest first. */
    deciding: z.array(
      z.object({
        standardId: z.number().int(),
        spectralType: z.string(),
        star: z.string().nullable(),
        origin: z.string().nullable(),
        set: z.enum(['instrument', 'library']),
        typeShare: z.number(),
        classShare: z.number(),
      }),
    ),
    correction: z.object({ pairs: z.number().int(), largest: z.number() }).nullable(),
  })
  .meta({ id: 'StandardsUsed' })
export type StandardsUsedSummary = z.infer<typeof StandardsUsedSummary>

/** What the matcher says beyond type and class (pipeline 2 and later). */
export const SuggestionDetails = z
  .object({
    /** Teff (K), log g (cgs) and [Fe/H] (dex) read off the voting standards' published values: a spectroscopic estimate. */
    parameters: z.object({ teff: EstimateSummary.nullable(), logg: EstimateSummary.nullable(), feh: EstimateSummary.nullable(), standards: z.number() }),
    /** Share of the vote of each luminosity class, most likely first. */
    classShares: z.array(z.object({ luminosityClass: z.string(), classCode: z.number(), p: z.number() })),
    /** Why the class differs from the nearest standard's, when it does. */
    classNote: z.string().nullable(),
    /** The spectrum's resolution (as given or estimated) and the library level it was matched at, FWHM Å. */
    resolution: z.object({
      fwhm: z.number().nullable(),
      source: z.enum(['given', 'estimated', 'unknown']),
      bound: z.enum(['within', 'sharpest', 'coarsest']).nullable(),
      level: z.number().nullable(),
    }),
    /** Wavelength range the spectrum was matched over, Å (absent before it was recorded). */
    region: z.tuple([z.number(), z.number()]).optional(),
    /** Rms residual of the best fit and the largest that normal stars of the type show, continuum units. */
    residual: z.object({ rms: z.number(), typical: z.number().nullable() }),
    /** How the suggestion was reached, in words (another level used, not a star). */
    notes: z.array(z.string()),
    /** Which standards decided it: the instrument's own or the general library's (absent before instruments had standards). */
    standards: StandardsUsedSummary.optional(),
  })
  .meta({ id: 'SuggestionDetails' })
export type SuggestionDetails = z.infer<typeof SuggestionDetails>

/** A stored suggestion, as the API returns it; candidates, votes and probabilities are stored JSON. */
export const SuggestionSummary = z
  .object({
    id: z.number().int(),
    spectrumId: z.number().int(),
    measurementId: z.number().int(),
    libraryVersionId: z.number().int(),
    pipelineVersion: z.string(),
    isCurrent: z.boolean(),
    ...mkFields,
    uncertainty: z.object({ subtypes: z.number(), classes: z.number() }),
    bestStandardId: z.number().int().nullable(),
    candidates: z.array(z.unknown()),
    votes: z.array(z.unknown()),
    flags: z.array(z.string()),
    probabilities: z.array(z.unknown()),
    /** Null for suggestions made before pipeline 2. */
    details: SuggestionDetails.nullable(),
    /** The instrument whose own standards took part, or null. */
    instrumentId: z.number().int().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'SuggestionSummary' })
export type SuggestionSummary = z.infer<typeof SuggestionSummary>

/** Suggestions as the caller may see them: withheld (`hidden`) under blind review until they have called. */
export const SpectrumSuggestions = z.object({ current: SuggestionSummary.nullable(), history: z.array(SuggestionSummary), hidden: z.boolean() }).meta({ id: 'SpectrumSuggestions' })
export type SpectrumSuggestions = z.infer<typeof SpectrumSuggestions>
