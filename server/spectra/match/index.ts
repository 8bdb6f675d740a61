export {
  scaledChiSquare,
  depthScaledChiSquareRows,
  depthScaledChiSquareSelected,
  depthScaledPairChiSquare,
  smoothPairChiSquare,
  type PairChiSquare,
  type SmoothPairChiSquare,
  DEPTH_SCALE_BOUNDS,
  parabolaVertex,
  type ScaledChiSquare,
} from './chi2'
export { CRITERIA, criterionValue, criterionNoise, type Criterion } from './criteria'
export {
  prepareMatchLibrary,
  replaceModelsByObserved,
  resolutionLadder,
  levelFor,
  type LibraryLevel,
  type MatchLibraryOptions,
  type MatchStandardInfo,
  type MatchStandardInput,
  modelMatchInputs,
  type ModelLibraryLike,
  observedMatchInputs,
  type ObservedLibraryLike,
  type PreparedMatchLibrary,
} from './library'
export { matchSpectrum, windowMode } from './classify'
export { classText, type Candidate, type Estimate, type MatchInput, type MatchOptions, type MatchResult, type ParameterEstimate, type SuggestionFlag, type Vote } from './types'
export { hasBalmerEmission, mayShowEmission, notStarEvidence, type NotStarEvidence } from './flags'
export { estimateResolution, type ResolutionEstimate } from './resolution'
export { standardOnGrid } from './reference'
