/** BIDS entities of a run (sub, ses, task, acq, run), the way Quorum stores them. */
export type BidsEntities = { sub: string; ses?: string | null; task?: string | null; acq?: string | null; runLabel?: string | null };

const ENTITY = /(?:^|_)(sub|ses|task|acq|run)-([A-Za-z0-9]+)/g;

/** Parses BIDS entities from a file name such as `sub-07_ses-2_task-rest_run-1_bold.nii.gz`. */
export function parseBidsName(fileName: string): BidsEntities | null {
  const base = fileName.split(/[\\/]/).pop() ?? '';
  const found: Record<string, string> = {};
  for (const m of base.matchAll(ENTITY)) found[m[1]] ??= m[2];
  if (!found.sub) return null;
  return { sub: found.sub, ses: found.ses ?? null, task: found.task ?? null, acq: found.acq ?? null, runLabel: found.run ?? null };
}

/** The BIDS-style stem `sub-…_ses-…_task-…_acq-…_run-…` for a run (entities in BIDS order). */
export function bidsName(e: BidsEntities): string {
  return [
    `sub-${e.sub}`,
    e.ses ? `ses-${e.ses}` : null,
    e.task ? `task-${e.task}` : null,
    e.acq ? `acq-${e.acq}` : null,
    e.runLabel ? `run-${e.runLabel}` : null,
  ]
    .filter(Boolean)
    .join('_');
}

/**
 * Names for a list of runs that a person can tell apart: a BIDS stem shared by two runs of a
 * study (two uploads with the same entities) gets the run's number appended, "… (run #12)".
 */
export function distinctRunNames<T extends { runId: number; name: string }>(runs: T[]): T[] {
  const count = new Map<string, number>();
  for (const r of runs) count.set(r.name, (count.get(r.name) ?? 0) + 1);
  return runs.map((r) => ((count.get(r.name) ?? 0) > 1 ? { ...r, name: `${r.name} (run #${r.runId})` } : r));
}
