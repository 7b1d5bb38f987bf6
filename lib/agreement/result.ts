/**
 * The one result shape of every agreement statistic. `value` is a finite number, or null when the
 * statistic is undefined for the data (then `reason` says why, in words a study lead can read).
 * `n` is the number of items (components) the value was computed from. No statistic ever hands
 * NaN or ±Infinity to a caller.
 */
export type StatResult = {
  value: number | null;
  reason?: string;
  n: number;
};

/** A defined result; a non-finite value is turned into an undefined one (defence in depth). */
export function defined(value: number, n: number): StatResult {
  if (!Number.isFinite(value)) return { value: null, reason: 'the computation was not finite', n };
  return { value, n };
}

/** An undefined result with its reason. */
export function undefinedStat(reason: string, n: number): StatResult {
  return { value: null, reason, n };
}

export const REASON_FEW_ITEMS = 'fewer than 2 items with at least 2 votes';
export const REASON_ONE_CATEGORY = 'only one category was used, so chance agreement is 1 and the chance-corrected coefficient is undefined';
