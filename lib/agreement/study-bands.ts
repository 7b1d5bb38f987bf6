import { landisKochBand, type AgreementBand } from './bands';

/** Landis & Koch band of a κ-type value, or null when undefined (used for display). */
export function bandOrNull(value: number | null): AgreementBand | null {
  return value === null || value > 1 + 1e-12 ? null : landisKochBand(value);
}
