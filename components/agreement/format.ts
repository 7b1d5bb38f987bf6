import type { StatResult } from '@/lib/agreement';

/** A statistic for the page: three decimals, or an em dash with the reason as a tooltip. */
export function formatStat(s: StatResult | null | undefined, digits = 3): string {
  return s?.value == null ? '—' : s.value.toFixed(digits);
}

export function formatCI(ci: { lower: number | null; upper: number | null } | null | undefined): string {
  if (!ci || ci.lower == null || ci.upper == null) return 'no interval';
  return `95% CI ${ci.lower.toFixed(3)} – ${ci.upper.toFixed(3)}`;
}

/** Background for a heatmap cell: the accent at an opacity that follows the value (−1…1 → 0…1). */
export function heat(value: number | null): string {
  if (value == null) return 'transparent';
  const a = Math.max(0, Math.min(1, value));
  return `rgba(79, 184, 176, ${0.1 + 0.75 * a})`;
}

/** "1 component", "3 components": a count with its noun (regular English plural). */
export function countOf(n: number, noun: string): string {
  return `${n} ${n === 1 ? noun : `${noun}s`}`;
}
