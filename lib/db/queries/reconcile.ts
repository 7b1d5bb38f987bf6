import 'server-only';
import { db, parseJson } from '@/lib/db/knex';
import type { Knex } from 'knex';

export type ReconcileVote = {
  raterId: number;
  raterName: string;
  label: string;
  noiseKind: string | null;
  confidence: number | null;
  note: string | null;
};
export type ReconcileItem = {
  componentId: number;
  idx: number;
  k: number;
  runId: number;
  run: { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null };
  decision: {
    label: string | null;
    noiseKind: string | null;
    method: string;
    reason: string | null;
    decidedBy: string | null;
    version: number;
  };
  votes: ReconcileVote[];
  /** The study's model in use (null without one or before scoring): for sorting by disagreement. */
  suggestion: { label: string; pNoise: number } | null;
};

/**
 * The lead's reconcile queue for a study: components of current decompositions whose decision is
 * pending after every assigned rater has submitted (or all decided components with include='all',
 * for overrides), optionally for one run or for components any rater called a given noise kind.
 */
export async function listReconcileItems({
  studyId,
  runId,
  noiseKind,
  include,
}: {
  studyId: number;
  runId?: number;
  noiseKind?: string;
  include: 'pending' | 'all';
}): Promise<ReconcileItem[]> {
  const q = db('decisions as x')
    .join('components as c', 'c.id', 'x.component_id')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .leftJoin('users as u', 'u.id', 'x.decided_by')
    .join('studies as s', 's.id', 'r.study_id')
    .leftJoin('suggestions as g', function () {
      this.on('g.component_id', 'c.id').andOn('g.model_id', 's.suggestion_model_id');
    })
    .where({ 'r.study_id': studyId, 'd.is_current': true, 'r.is_calibration': false }) // calibration runs certify raters; their references are set apart
    // only runs whose assigned raters have all submitted
    .whereNotExists(db('assignments as a').whereRaw('a.run_id = r.id').whereNull('a.submitted_at'))
    .select(
      'c.id as componentId',
      'c.idx',
      'd.k',
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'x.label',
      'x.noise_kind as noiseKind',
      'x.method',
      'x.reason',
      'x.version',
      'u.name as decidedBy',
      'g.label as suggestionLabel',
      'g.p_noise as pNoise',
    )
    .orderBy([{ column: 'r.id' }, { column: 'c.idx' }]);
  if (include === 'pending') q.where('x.method', 'pending');
  if (runId) q.where('r.id', runId);
  if (noiseKind) q.whereExists(db('votes as vk').whereRaw('vk.component_id = c.id').where('vk.noise_kind', noiseKind));
  const rows = await q.limit(500);
  if (!rows.length) return [];
  const votes = await db('votes as v')
    .join('users as u', 'u.id', 'v.rater_id')
    .join('assignments as a', function () {
      this.on('a.run_id', 'v.run_id').andOn('a.rater_id', 'v.rater_id');
    })
    .whereIn(
      'v.component_id',
      rows.map((r) => r.componentId),
    )
    .select(
      'v.component_id as componentId',
      'v.rater_id as raterId',
      'u.name as raterName',
      'v.label',
      'v.noise_kind as noiseKind',
      'v.confidence',
      'v.note',
    )
    .orderBy('u.name');
  const byComponent = new Map<number, ReconcileVote[]>();
  for (const v of votes) {
    const list = byComponent.get(v.componentId) ?? [];
    list.push({
      raterId: v.raterId,
      raterName: v.raterName,
      label: v.label,
      noiseKind: v.noiseKind,
      confidence: v.confidence,
      note: v.note,
    });
    byComponent.set(v.componentId, list);
  }
  return rows.map((r) => ({
    componentId: r.componentId,
    idx: r.idx,
    k: r.k,
    runId: r.runId,
    run: { sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel },
    decision: { label: r.label, noiseKind: r.noiseKind, method: r.method, reason: r.reason, decidedBy: r.decidedBy, version: r.version },
    votes: byComponent.get(r.componentId) ?? [],
    suggestion: r.pNoise == null ? null : { label: r.suggestionLabel, pNoise: Number(r.pNoise) },
  }));
}

/** The component's run, index and its study's labels and noise kinds, when it is in the study's current decomposition. */
export async function findDecisionContext(
  trx: Knex.Transaction,
  { studyId, componentId }: { studyId: number; componentId: number },
): Promise<{ runId: number; idx: number; labels: string[]; kinds: string[] } | null> {
  const ctx = await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .where({ 'c.id': componentId, 'r.study_id': studyId, 'd.is_current': true })
    .first('r.id as runId', 'c.idx', 's.label_set as labelSet', 's.noise_kinds as noiseKinds');
  if (!ctx) return null;
  return {
    runId: ctx.runId,
    idx: ctx.idx,
    labels: parseJson<string[]>(ctx.labelSet, []) ?? [],
    kinds: parseJson<string[]>(ctx.noiseKinds, []) ?? [],
  };
}

export type StoredDecision = {
  id: number;
  method: string;
  label: string | null;
  noiseKind: string | null;
  version: number;
  decidedBy: string | null;
};

/** The component's decision row, locked for the caller's transaction. */
export async function lockDecision(trx: Knex.Transaction, { componentId }: { componentId: number }): Promise<StoredDecision | undefined> {
  return trx('decisions as x')
    .leftJoin('users as u', 'u.id', 'x.decided_by')
    .where({ 'x.component_id': componentId })
    .forUpdate()
    .first('x.id', 'x.method', 'x.label', 'x.noise_kind as noiseKind', 'x.version', 'u.name as decidedBy');
}

/** Writes a lead's decision: updates the row (raising its version) or inserts version 1. */
export async function writeLeadDecision(
  trx: Knex.Transaction,
  {
    existingId,
    componentId,
    runId,
    label,
    noiseKind,
    method,
    leadId,
    reason,
  }: {
    existingId: number | null;
    componentId: number;
    runId: number;
    label: string;
    noiseKind: string | null;
    method: string;
    leadId: number;
    reason: string;
  },
): Promise<void> {
  const row = { label, noise_kind: noiseKind, method, decided_by: leadId, reason, decided_at: trx.fn.now(3) };
  if (existingId != null)
    await trx('decisions')
      .where({ id: existingId })
      .update({ ...row, version: trx.raw('version + 1') });
  else await trx('decisions').insert({ component_id: componentId, run_id: runId, ...row, version: 1 });
}
