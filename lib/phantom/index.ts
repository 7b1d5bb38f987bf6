// Synthetic fMRI phantom with known sources (invented data for tests, benchmarks and the demo).
export { generatePhantom, smooth3, THERMAL_NOISE_FRACTION } from './generate';
export { headModel, voxelToMm, BASELINE, TISSUE, BRAIN_SEMI_AXES_MM, type HeadModel } from './head-model';
export { phantomToNiftiInput, truthMapsToNiftiInput, truthSummary, type PhantomNiftiOptions } from './nifti-input';
export { normalQuantileTable } from './normal-quantiles';
export { PHANTOM_SIZES, sizeSpec, type PhantomSizeSpec } from './sizes';
export { NETWORKS, MAP_FLOOR } from './sources';
export { bandLimitedNoise, zscore } from './time-courses';
export { simulateMotion, rimTimecourse, type MotionParameters } from './motion';
export {
  buildRealisticSources,
  REALISTIC_NETWORKS,
  REALISTIC_AMPLITUDE,
  REALISTIC_NOISE_FRACTION,
  NOISE_AR1,
  gaussianKernel,
  smoothSeparable,
} from './realistic';
export type { PhantomModel, Phantom, PhantomOptions, PhantomSize, PhantomSource, PhantomTruth, PhantomNoiseKind } from './types';
