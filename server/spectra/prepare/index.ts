export { assertSpectrum, isGoodPixel } from './guards'
export { maskSpectrumBadPixels, countMaskedPixels, type MaskOptions } from './mask'
export { estimateSpectrumSnr, estimateSpectrumSnrByWindow, type SnrOptions, type SnrByWindowOptions } from './snr'
export { rebinSpectrumToLogGrid, rebinNoiseCorrelation, type RebinOptions } from './rebin'
export { smoothSpectrumToFwhm, type SmoothOptions } from './smooth'
export { fitSpectrumContinuum, type ContinuumOptions, type ContinuumResult } from './continuum'
export {
  measureSpectrumRadialVelocity,
  shiftSpectrumToRest,
  type RadialVelocityOptions,
  type RadialVelocityResult,
  type ShiftOptions,
} from './rv'
