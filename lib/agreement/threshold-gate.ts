/**
 * A study's calibration threshold as a gate on live work: a rater passes when their score against
 * the reference labels (lib/calibration/score.ts, pooled over the calibration runs they submitted)
 * reaches every threshold that is set. An undefined statistic (no submitted calibration run, no reference noise)
 * does not pass — it is not taken as 0 or as 1, the reason says what is missing.
 */
import type { StatResult } from './result';

/** The part of a calibration score the gate reads (lib/calibration/score.ts CalibrationScore fits). */
type GateScore = { n: number; gwetAC1: StatResult; noise: { sensitivity: StatResult } };

/** setName: the lead's name for the study's calibration set (reasons name it); optional, null = unnamed. */
export type CalibrationThreshold = { minAc1: number | null; minSensitivity: number | null; setName?: string | null };

export type GateVerdict = { gated: boolean; passes: boolean; reason: string | null };

export function isGated(t: CalibrationThreshold): boolean {
  return t.minAc1 !== null || t.minSensitivity !== null;
}

export function gateVerdict(score: GateScore | null, t: CalibrationThreshold): GateVerdict {
  if (!isGated(t)) return { gated: false, passes: true, reason: null };
  const set = t.setName ? `the calibration set “${t.setName}”` : null;
  if (!score || score.n === 0) {
    return {
      gated: true,
      passes: false,
      reason: set ? `has not submitted a run of ${set} yet` : 'has not submitted a calibration run with reference labels yet',
    };
  }
  const misses: string[] = [];
  if (t.minAc1 !== null) {
    const v = score.gwetAC1.value;
    if (v === null) misses.push(`AC1 is undefined (${score.gwetAC1.reason ?? 'too few components'}), threshold ${t.minAc1.toFixed(2)}`);
    else if (v < t.minAc1) misses.push(`AC1 ${v.toFixed(2)} is below ${t.minAc1.toFixed(2)}`);
  }
  if (t.minSensitivity !== null) {
    const v = score.noise.sensitivity.value;
    if (v === null)
      misses.push(
        `noise sensitivity is undefined (${score.noise.sensitivity.reason ?? 'no reference noise'}), threshold ${t.minSensitivity.toFixed(2)}`,
      );
    else if (v < t.minSensitivity) misses.push(`noise sensitivity ${v.toFixed(2)} is below ${t.minSensitivity.toFixed(2)}`);
  }
  if (!misses.length) return { gated: true, passes: true, reason: null };
  return { gated: true, passes: false, reason: set ? `${misses.join('; ')} on ${set}` : misses.join('; ') };
}
