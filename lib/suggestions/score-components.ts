/** P(noise) and the suggested label of components under an exported model (pure; the score job uses it). */
import type { RawFeatures } from './feature-vector';
import { predictNoise, type SuggestionModelJson } from './model';

export function scoreComponents<T extends { features: RawFeatures }>(
  model: SuggestionModelJson,
  rows: readonly T[],
): (T & { pNoise: number; label: 'noise' | 'signal' })[] {
  const p = predictNoise(
    model,
    rows.map((r) => r.features),
  );
  return rows.map((r, i) => ({ ...r, pNoise: p[i]!, label: p[i]! >= model.threshold ? 'noise' : 'signal' }));
}
