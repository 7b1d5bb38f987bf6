// Scoring a rater against reference labels lives with the other agreement statistics
// (lib/agreement/reference-score.ts); this name stays for the calibration code that imports it.
export { scoreAgainstReference, type CalibrationScore } from '@/lib/agreement/reference-score';
