import type { LineFamily, WavelengthRange } from '../../../shared/lines'

/** Why a line was not measured. */
export type NotMeasuredReason = 'outside-coverage' | 'masked-pixels' | 'low-snr' | 'no-continuum'

/** A Voigt-profile fit to a Balmer line (Gaussian σ and Lorentzian γ in Å). */
export interface VoigtFit {
  /** Line centre, Å. */
  centre: number
  /** Gaussian standard deviation, Å (instrumental, thermal and turbulent broadening together). */
  sigma: number
  /** Lorentzian half width at half maximum, Å (the pressure-broadening, luminosity signal). */
  gamma: number
  gaussianFwhm: number
  lorentzianFwhm: number
  /** Voigt FWHM, Olivero & Longbothum (1977), Å. */
  fwhm: number
  /** Equivalent width of the fitted profile (its area below the fitted continuum level), Å. */
  equivalentWidth: number
  /** Fitted continuum level (≈ 1 on a rectified spectrum). */
  level: number
  /** 1σ errors from the covariance, scaled by √χ²ᵣ when χ²ᵣ > 1. */
  errors: { centre: number; sigma: number; gamma: number; equivalentWidth: number }
  reducedChiSquare: number
  converged: boolean
  /** Levenberg–Marquardt iterations and model evaluations used. */
  iterations: number
  evaluations: number
  /** Range fitted, Å. */
  window: WavelengthRange
}

interface LineIdentity {
  id: string
  name: string
  /** Rest wavelength, Å (air). */
  wavelength: number
  family: LineFamily
}

export interface MeasuredLine extends LineIdentity {
  measured: true
  /** Equivalent width over the window against the side-band continuum, Å (positive for absorption). */
  equivalentWidth: number
  /** 1σ error of the equivalent width, Å; null when neither errors nor an S/N are known. */
  equivalentWidthError: number | null
  /**
   * Central depth 1 − F/C at the deepest point (three-point parabola); for molecular bands the mean
   * depth over the window (equivalent width / window width).
   */
  depth: number
  depthError: number | null
  /** Full width at half depth, Å; null when the profile does not fall to half depth on both sides. */
  fwhm: number | null
  /** Depth-weighted mean wavelength, Å; null when the window has no net absorption. */
  centroid: number | null
  /** Continuum levels at the side-band midpoints. */
  continuum: { blue: number; red: number }
  /** S/N used for the floor, or null when unknown. */
  snr: number | null
  /** Balmer lines only: the Voigt fit, or null with the reason in `voigtReason`. */
  voigt?: VoigtFit | null
  voigtReason?: string
}

export interface UnmeasuredLine extends LineIdentity {
  measured: false
  reason: NotMeasuredReason
  /** Human-readable detail, e.g. "window 3926–3941 Å lies outside 4000–7000 Å". */
  detail: string
}

export type LineMeasurement = MeasuredLine | UnmeasuredLine

export interface LineRatio {
  id: string
  name: string
  quantity: 'ew' | 'depth'
  /** null when a line it needs was not measured or the denominator is not positive. */
  value: number | null
  error: number | null
  reason?: string
}
