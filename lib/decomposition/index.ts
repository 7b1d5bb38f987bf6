// Decomposition of an fMRI run: mask → temporal PCA (+ dimensionality) → spatial FastICA →
// oriented z-maps, time courses, spectra and features (DESIGN.md §4).
export { decomposeRun, type DecomposeInput, type DecomposeOptions, type DecompositionResult, type ProgressCallback } from './pipeline';
export { DecompositionError, type DecompositionErrorCode } from './errors';
export {
  chooseDimension,
  minkaDimension,
  minkaLogEvidence,
  informationCriterionDimension,
  varianceFractionDimension,
  numericalRank,
  logGamma,
  type DimMethod,
  type DimensionChoice,
} from './dimensionality';
export { estimateSmoothness, type SmoothnessEstimate } from './smoothness';
export { temporalCovariance, type TemporalCovariance } from './covariance';
export { temporalPca, type TemporalPca } from './pca';
export { whiten, whitenedCovariance, type Whitened } from './whitening';
export { fastIca, symmetricDecorrelation, type Contrast, type FastIcaOptions, type FastIcaResult } from './fastica';
export { amariIndex } from './amari';
export { orientComponents, type OrientedComponents } from './orient';
export { buildDataMatrix, meanImage, type DataMatrix, type RunImage } from './data-matrix';
export { KernelPool, sharedFloat32, sharedFloat64, splitRange } from './worker-pool';
export {
  componentFeatures,
  componentSpectra,
  componentTimecourse,
  decompositionSummary,
  featuresTsv,
  mapsVolume,
  spectraTsv,
  timecoursesTsv,
} from './component-outputs';
