// Inter-rater agreement for component labels: framework-free, typed arrays, no NaN to callers.
export { AgreementError, type AgreementErrorCode } from './errors';
export { type StatResult } from './result';
export {
  MISSING,
  ratingsTableFromMatrix,
  ratingsTableFromVotes,
  itemCounts,
  raterIndex,
  type RatingsTable,
  type ItemSelection,
  type MatrixInput,
  type Vote,
  type VotesInput,
} from './table';
export { percentAgreement, specificAgreement } from './percent-agreement';
export { fleissKappa } from './fleiss-kappa';
export { krippendorffAlpha } from './krippendorff-alpha';
export { gwetAC1 } from './gwet-ac1';
export { pabak, pabakFromAgreement } from './pabak';
export {
  cohenKappa,
  weightedKappa,
  pairPercentAgreement,
  pairGwetAC1,
  cohenKappaFromFlat,
  weightedKappaFromFlat,
  pairGwetAC1FromFlat,
  pairPercentAgreementFromFlat,
  type KappaWeights,
} from './cohen-kappa';
export { pairConfusion, referenceConfusion, detection, type ConfusionMatrix, type Detection } from './confusion';
export {
  bootstrapCI,
  bootstrapMany,
  bootstrapVector,
  bootstrapTableStat,
  DEFAULT_RESAMPLES,
  DEFAULT_SEED,
  type BootstrapOptions,
  type ConfidenceInterval,
  type ResampleEvaluator,
} from './bootstrap';
export { landisKochBand, type AgreementBand } from './bands';
export { studyAgreement, type StudyAgreement, type StudyAgreementInput, type StudyItem, type StatWithCI } from './study';
export { parseRatingsText, parseDelimited, detectFormat, type RatingsFileFormat } from './ratings-file';
