/**
 * Cross-validation folds by subject: every component of a subject (the BIDS `sub` entity) lies in the
 * same fold, so no subject is in both the training and the test part of any split. Components of one
 * subject are not independent (same head, same scanner session, same motion), and a split that mixes
 * them overstates accuracy on new subjects (common practice, no source).
 *
 * Subjects are shuffled with a seeded generator and dealt round-robin into k folds (k is lowered to the
 * number of subjects when there are fewer).
 */
import { createRng } from '@/lib/random';

/** fold[i] ∈ 0..k−1 for each row; rows with the same subject share a fold. */
export function subjectFolds(subjects: readonly string[], k: number, seed = 1): { fold: number[]; k: number } {
  const unique = [...new Set(subjects)].sort();
  const folds = Math.max(1, Math.min(k, unique.length));
  const rng = createRng(seed, 'golden-xor'); // the folds stored model evaluations were made with
  for (let i = unique.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [unique[i], unique[j]] = [unique[j]!, unique[i]!];
  }
  const foldOf = new Map<string, number>();
  unique.forEach((s, i) => foldOf.set(s, i % folds));
  return { fold: subjects.map((s) => foldOf.get(s)!), k: folds };
}
