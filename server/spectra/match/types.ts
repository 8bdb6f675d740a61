import type { SuggestionFlag } from '../../../shared/api/suggestions'
import type { LineMeasurement } from '../measure/types'

export type { SuggestionFlag }

/** What the matcher needs of a prepared spectrum (see analyseSpectrum's `prepared`). */
export interface MatchInput {
  /** Continuum-normalised flux on the library grid; NaN where masked. */
  rectified: ArrayLike<number>
  /** Its 1σ error, when known. */
  rectifiedError?: ArrayLike<number>
  /** 1 = pixel not usable. */
  mask?: ArrayLike<number>
  /** S/N per pixel, used for the weights when no errors are given. */
  snr: number | null
  /** Resolution the spectrum has been brought to, FWHM Å: it is matched at the library level for it. */
  fwhm?: number
  /** Line measurements (for the emission flag). */
  lines?: readonly LineMeasurement[]
}

export interface MatchOptions {
  /** Classification region, Å. @default DEFAULT_CLASSIFICATION_REGION (3850–5000) */
  region?: readonly [number, number]
  /**
   * Fractional error added in quadrature to each pixel's noise, so that at high S/N the fit is not
   * ruled by the standards' own imperfections. @default 0.01
   */
  modelError?: number
  /** Standards that vote on type and class: the best this many by χ². @default 16 */
  neighbours?: number
  /**
   * At levels of `coarseFwhm` Å and coarser, only the best this many of them vote on the type (all
   * still vote on the class): once the metal lines blend, χ² tells neighbouring types apart only
   * weakly, and a wide vote drifts toward the types the library has most of. @default 5
   */
  coarseTypeNeighbours?: number
  /** FWHM, Å, from which {@link coarseTypeNeighbours} applies. @default 12 */
  coarseFwhm?: number
  /**
   * Width of the vote weights, w = exp(−(χ²/χ²_min − 1)/temperature): standards whose χ² is
   * within a factor (1 + temperature) of the best still carry weight e⁻¹. A temperature tied to
   * the best fit rather than to the photon noise, because among real stars the published types
   * scatter by about a subtype around what their spectra show (see bench/accuracy.ts).
   * @default 1.5
   */
  temperature?: number
  /**
   * Power of the correction for how many standards each class has at the level: each vote is
   * divided by (standards of its class)^classBalance, so that a library rich in dwarfs does not
   * pull rare giants and supergiants toward class V. @default 0.5
   */
  classBalance?: number
  /** S/N below which 'low-snr' is set. @default 20 */
  lowSnr?: number
  /**
   * Subtypes by which the local model of the voters (localModelFit: linear in type, class and
   * [Fe/H]) must differ from the vote before its type is taken instead. Chosen from 1.5, 2, 3 and 4
   * on the tuning half of the MILES stars (bench/accuracy.ts); on the held-out half it took ±1
   * subtype from 79.4 to 80.2 %. @default 3
   */
  typeModelLead?: number
  /** Full χ² for every standard instead of screening on every `coarseStep`-th pixel first. @default false */
  exhaustive?: boolean
  /** Standards refined with the full χ² after screening (at least twice `neighbours`). @default 48 */
  refineCount?: number
  /** Ids of standards left out, e.g. every spectrum of the star being classified when measuring accuracy. @default none */
  exclude?: ReadonlySet<number>
}

/** One of the standards nearest the spectrum. */
export interface Candidate {
  standardId: number
  spectralType: string
  typeCode: number
  luminosityClass: string
  source: 'model' | 'observed'
  /** Star name of an observed standard. */
  star: string | null
  /** Library the spectrum comes from. */
  origin: string | null
  chi2: number
  reducedChi2: number
  /** Line-depth scale of the best fit. */
  scale: number
  /** Share of the type and class vote. */
  probability: number
}

export interface Vote {
  criterion: string
  name: string
  /** Value measured on the spectrum. */
  value: number | null
  /** Class this criterion prefers, or null when it does not apply or cannot be measured. */
  vote: string | null
  /** Value each class's standards have at the suggested type. */
  standards?: Record<string, number>
  note?: string
}

/** An estimate with its 1σ spread. */
export interface Estimate {
  value: number
  error: number
}

/** Atmospheric parameters read off the voting standards' published values. */
export interface ParameterEstimate {
  teff: Estimate | null
  logg: Estimate | null
  feh: Estimate | null
  /** Voting standards that had the parameter. */
  standards: number
}

export interface MatchResult {
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  uncertainty: { subtypes: number; classes: number }
  bestStandardId: number
  candidates: Candidate[]
  votes: Vote[]
  flags: SuggestionFlag[]
  /** Share of the vote of each (type, class) point (points below 1e-4 left out), summing to about 1. */
  probabilities: { typeCode: number; classCode: number; luminosityClass: string; p: number }[]
  /** Class shares of the vote, most likely first. */
  classShares: { luminosityClass: string; classCode: number; p: number }[]
  /** Why the class differs from the best candidate's, when it does. */
  classNote: string | null
  /** Why the type differs from the vote of the nearest standards, when it does. */
  typeNote: string | null
  /** Teff, log g, [Fe/H] from the voting standards' published parameters (a spectroscopic estimate). */
  parameters: ParameterEstimate
  libraryVersion: { id: number; name: string }
  /** Resolution level used, FWHM Å. */
  levelFwhm: number
  /** Wavelength range matched over, Å (the region asked for). */
  region: readonly [number, number]
  reducedChi2: number
  /** Rms residual of the best fit in the region (continuum units), and what is usual for a normal star of this type. */
  residual: { rms: number; typical: number | null }
  /** The standards that voted, best fit first, with their shares of the type vote and of the class vote. */
  voters: { standardId: number; typeShare: number; classShare: number }[]
}

/** Class codes and their text; half steps are the intermediate classes. */
const CLASS_TEXT: Record<string, string> = { '1': 'Ia', '1.5': 'Iab', '2': 'Ib', '2.5': 'Ib-II', '3': 'II', '3.5': 'II-III', '4': 'III', '4.5': 'III-IV', '5': 'IV', '5.5': 'IV-V', '6': 'V' }
export const classText = (code: number): string => CLASS_TEXT[String(code)] ?? String(code)
