export { scaledChiSquare, depthScaledChiSquareRows, depthScaledChiSquareSelected, depthScaledPairChiSquare, smoothPairChiSquare, type PairChiSquare, type SmoothPairChiSquare, DEPTH_SCALE_BOUNDS, parabolaVertex, type ScaledChiSquare } from './chi2'
export { CRITERIA, criterionValue, criterionNoise, type Criterion } from './criteria'
export {
  prepareMatchLibrary,
  replaceModelsByObserved,
  nearestLevel,
  type GridPoints,
  type LibraryLevel,
  type MatchLibraryOptions,
  type MatchStandardInfo,
  type MatchStandardInput,
  modelMatchInputs,
  type ModelLibraryLike,
  type PreparedMatchLibrary,
} from './library'
export { hasBalmerEmission, matchSpectrum, type Candidate, type MatchInput, type MatchOptions, type MatchResult, type SuggestionFlag, type Vote } from './classify'
export { standardOnGrid } from './reference'
