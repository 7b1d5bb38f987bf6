import { AgreementError } from './errors';

export type AgreementBand = 'poor' | 'slight' | 'fair' | 'moderate' | 'substantial' | 'almost perfect';

/**
 * Verbal bands of Landis & Koch 1977 (Biometrics 33:159) for κ-type coefficients:
 * < 0 poor, 0–0.20 slight, 0.21–0.40 fair, 0.41–0.60 moderate, 0.61–0.80 substantial,
 * 0.81–1 almost perfect. The paper leaves the gaps between printed bounds open; Quorum's fixed
 * convention is: UPPER BOUNDS INCLUSIVE, i.e. poor v < 0; slight 0 ≤ v ≤ 0.20; fair 0.20 < v ≤ 0.40;
 * moderate 0.40 < v ≤ 0.60; substantial 0.60 < v ≤ 0.80; almost perfect 0.80 < v ≤ 1.
 * Null in, null out (an undefined coefficient has no band). Any negative value is poor; values
 * above 1 and non-finite values are refused.
 */
export function landisKochBand(value: number | null): AgreementBand | null {
  if (value === null) return null;
  if (!Number.isFinite(value) || value > 1 + 1e-12) {
    throw new AgreementError('bad_input', `an agreement coefficient is a finite number at most 1, got ${value}`);
  }
  if (value < 0) return 'poor';
  if (value <= 0.2) return 'slight';
  if (value <= 0.4) return 'fair';
  if (value <= 0.6) return 'moderate';
  if (value <= 0.8) return 'substantial';
  return 'almost perfect';
}
