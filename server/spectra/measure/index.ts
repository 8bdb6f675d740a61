export { measureSpectrumLine, type LineOptions } from './line'
export { measureSpectrumLines, measureLineRatios, type LinesOptions, type RatiosOptions } from './lines'
export { fitSpectrumVoigtLine, type VoigtFitOptions, type VoigtFitResult } from './voigt-fit'
export {
  faddeeva,
  voigtProfile,
  voigtWithDerivatives,
  gaussianFwhm,
  voigtFwhmApproximation,
  voigtFwhmNumeric,
  type Complex4,
  type VoigtDerivatives,
} from './voigt'
export { fitLevenbergMarquardt, type LeastSquaresModel, type LevenbergMarquardtOptions, type LevenbergMarquardtResult } from './lm'
export type { LineMeasurement, MeasuredLine, UnmeasuredLine, NotMeasuredReason, VoigtFit, LineRatio } from './types'
