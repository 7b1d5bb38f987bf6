import { AgreementError, studyAgreement, type StudyAgreement, type StatResult } from '@/lib/agreement';
import { bidsName, type BidsEntities } from '@/lib/bids';
import { sentence } from '@/lib/text';

export type RatingsInput = {
  categories: string[];
  noiseKinds: string[];
  votes: {
    componentId: number;
    runId: number;
    raterId: number;
    raterName: string;
    label: string;
    noiseKind: string | null;
    updatedAt: Date;
  }[];
  decisions: { componentId: number; runId: number; label: string | null; noiseKind: string | null; method: string }[];
  runs: (BidsEntities & { id: number })[];
};

export type AgreementReport = {
  summary: StudyAgreement | null;
  /** Why there is no summary (e.g. fewer than two raters have submitted). */
  unavailable?: string;
  raters: { id: number; name: string; votes: number }[];
  runs: { runId: number; name: string; items: number; raters: number; krippendorffAlpha: StatResult; percentAgreement: StatResult }[];
  weeks: { week: string; items: number; krippendorffAlpha: StatResult; percentAgreement: StatResult }[];
  byNoiseKind: { noiseKind: string; items: number; percentAgreement: StatResult }[];
  decisions: { total: number; pending: number; unanimous: number; majority: number; reconciled: number; override: number };
};

/** ISO-8601 week (e.g. "2026-W49") of a date, in UTC. */
export function isoWeek(d: Date): string {
  const t = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()));
  const day = t.getUTCDay() || 7;
  t.setUTCDate(t.getUTCDate() + 4 - day);
  const yearStart = Date.UTC(t.getUTCFullYear(), 0, 1);
  const week = Math.ceil(((t.getTime() - yearStart) / 86400000 + 1) / 7);
  return `${t.getUTCFullYear()}-W${String(week).padStart(2, '0')}`;
}

/**
 * Builds the agreement report of a study (or of some runs) from its submitted votes and decisions:
 * the study statistics with bootstrap CIs (lib/agreement), per run, by week of the last vote on a
 * component, and by the decided noise kind. Raters are keyed by their account id; names are added.
 */
/** `resamples: 0` skips the bootstrap (no intervals), for quick per-run figures. */
export function buildAgreementReport(input: RatingsInput, opts: { resamples?: number; seed?: number } = {}): AgreementReport {
  const byComponent = new Map<number, { runId: number; votes: Record<string, string>; last: Date }>();
  const raterNames = new Map<number, { name: string; votes: number }>();
  for (const v of input.votes) {
    const item = byComponent.get(v.componentId) ?? { runId: v.runId, votes: {}, last: v.updatedAt };
    item.votes[String(v.raterId)] = v.label;
    if (v.updatedAt > item.last) item.last = v.updatedAt;
    byComponent.set(v.componentId, item);
    const r = raterNames.get(v.raterId) ?? { name: v.raterName, votes: 0 };
    r.votes += 1;
    raterNames.set(v.raterId, r);
  }
  const decisionOf = new Map(input.decisions.map((d) => [d.componentId, d]));
  const items = [...byComponent.entries()].map(([id, it]) => ({
    id: String(id),
    runId: String(it.runId),
    votes: it.votes,
    decision: decisionOf.get(id)?.label ?? null,
  }));
  const raters = [...raterNames.entries()].map(([id, r]) => ({ id, name: r.name, votes: r.votes }));
  const decisionCounts = { total: input.decisions.length, pending: 0, unanimous: 0, majority: 0, reconciled: 0, override: 0 };
  for (const d of input.decisions) {
    if (d.method in decisionCounts) decisionCounts[d.method as keyof typeof decisionCounts] += 1;
  }
  const empty: AgreementReport = { summary: null, raters, runs: [], weeks: [], byNoiseKind: [], decisions: decisionCounts };
  if (raters.length < 2 || items.length < 2) {
    return { ...empty, unavailable: 'Agreement needs at least two raters who have submitted the same runs.' };
  }
  let summary: StudyAgreement;
  try {
    summary = studyAgreement({
      categories: input.categories,
      items,
      bootstrap: opts.resamples === 0 ? false : { resamples: opts.resamples ?? 1000, seed: opts.seed ?? 1 },
    });
  } catch (err) {
    if (!(err instanceof AgreementError)) throw err;
    return { ...empty, unavailable: sentence(`Agreement cannot be computed yet: ${err.message}`) };
  }
  const runName = new Map(input.runs.map((r) => [String(r.id), bidsName(r)]));
  const runs = summary.runs.map((r) => ({ ...r, runId: Number(r.runId), name: runName.get(r.runId) ?? `run ${r.runId}` }));

  const subset = (keep: (id: number) => boolean) => {
    const chosen = items.filter((it) => keep(Number(it.id)));
    try {
      const s = studyAgreement({ categories: input.categories, items: chosen, bootstrap: false });
      return { items: chosen.length, krippendorffAlpha: s.overall.krippendorffAlpha, percentAgreement: s.overall.percentAgreement };
    } catch (err) {
      if (!(err instanceof AgreementError)) throw err;
      const none: StatResult = { value: null, reason: err.message, n: chosen.length };
      return { items: chosen.length, krippendorffAlpha: none, percentAgreement: none };
    }
  };
  const weekOf = new Map([...byComponent.entries()].map(([id, it]) => [id, isoWeek(it.last)]));
  const weeks = [...new Set(weekOf.values())].sort().map((week) => {
    const s = subset((id) => weekOf.get(id) === week);
    return { week, items: s.items, krippendorffAlpha: s.krippendorffAlpha, percentAgreement: s.percentAgreement };
  });
  const byNoiseKind = input.noiseKinds
    .map((kind) => {
      const s = subset((id) => decisionOf.get(id)?.noiseKind === kind);
      return { noiseKind: kind, items: s.items, percentAgreement: s.percentAgreement };
    })
    .filter((k) => k.items > 0);
  return { summary, raters, runs, weeks, byNoiseKind, decisions: decisionCounts };
}
