import 'server-only';
import { db, parseJson } from '@/lib/db/knex';
import { recordAudit } from './audit';
import { AppError } from '@/lib/errors';
import type { LeadDecisionInput } from '@/lib/consensus/schema';

export type ReconcileVote = { raterId: number; raterName: string; label: string; noiseKind: string | null; confidence: number | null; note: string | null };
export type ReconcileItem = {
  componentId: number;
  idx: number;
  k: number;
  runId: number;
  run: { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null };
  decision: { label: string | null; noiseKind: string | null; method: string; reason: string | null; decidedBy: string | null; version: number };
  votes: ReconcileVote[];
  /** The study's model in use (null without one or before scoring): for sorting by disagreement. */
  suggestion: { label: string; pNoise: number } | null;
};

/**
 * The lead's reconcile queue for a study: components of current decompositions whose decision is
 * pending after every assigned rater has submitted (or all decided components with include='all',
 * for overrides), optionally for one run or for components any rater called a given noise kind.
 */
export async function listReconcileItems({ studyId, runId, noiseKind, include }: { studyId: number; runId?: number; noiseKind?: string; include: 'pending' | 'all' }): Promise<ReconcileItem[]> {
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
    .whereIn('v.component_id', rows.map((r) => r.componentId))
    .select('v.component_id as componentId', 'v.rater_id as raterId', 'u.name as raterName', 'v.label', 'v.noise_kind as noiseKind', 'v.confidence', 'v.note')
    .orderBy('u.name');
  const byComponent = new Map<number, ReconcileVote[]>();
  for (const v of votes) {
    const list = byComponent.get(v.componentId) ?? [];
    list.push({ raterId: v.raterId, raterName: v.raterName, label: v.label, noiseKind: v.noiseKind, confidence: v.confidence, note: v.note });
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

export type DecisionConflict = { conflict: { label: string | null; noiseKind: string | null; method: string; decidedBy: string | null } };
type RecordedDecision = { componentId: number; method: string; label: string; noiseKind: string | null };

/**
 * Records a lead's decision on a component of their study (reconciled when it was pending, an
 * override of an automatic decision otherwise), with the reason, in one transaction with its audit
 * entry. Releases keep the decisions they froze; a change after a release needs a new release.
 * With `baseVersion`, a decision that changed since the lead saw it is not touched: the attempt is
 * audited (decision.conflict) and the current decision returned as `conflict`.
 */
export async function recordLeadDecision({ studyId, leadId, input }: { studyId: number; leadId: number; input: LeadDecisionInput }): Promise<RecordedDecision | DecisionConflict> {
  return db.transaction(async (trx): Promise<RecordedDecision | DecisionConflict> => {
    const ctx = await trx('components as c')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .join('runs as r', 'r.id', 'd.run_id')
      .join('studies as s', 's.id', 'r.study_id')
      .where({ 'c.id': input.componentId, 'r.study_id': studyId, 'd.is_current': true })
      .first('r.id as runId', 'c.idx', 's.label_set as labelSet', 's.noise_kinds as noiseKinds');
    if (!ctx) throw new AppError('not_found', 'That component is not part of this study (or its decomposition was replaced).');
    const labels = parseJson<string[]>(ctx.labelSet, []) ?? [];
    const kinds = parseJson<string[]>(ctx.noiseKinds, []) ?? [];
    if (!labels.includes(input.label)) {
      throw new AppError('validation', `"${input.label}" is not one of this study's labels (${labels.join(', ')}).`, { label: ['Choose one of the study’s labels.'] });
    }
    const noiseKind = input.label === 'noise' ? input.noiseKind ?? null : null;
    if (noiseKind && !kinds.includes(noiseKind)) {
      throw new AppError('validation', `"${noiseKind}" is not one of this study's noise kinds.`, { noiseKind: ['Choose one of the study’s noise kinds.'] });
    }
    const existing = await trx('decisions as x')
      .leftJoin('users as u', 'u.id', 'x.decided_by')
      .where({ 'x.component_id': input.componentId })
      .forUpdate()
      .first('x.id', 'x.method', 'x.label', 'x.noise_kind as noiseKind', 'x.version', 'u.name as decidedBy');
    if (input.baseVersion !== undefined && (existing?.version ?? 0) !== input.baseVersion) {
      // another lead (or a changed vote) got there first: refuse, and keep the attempt in the audit log
      const current = { label: existing?.label ?? null, noiseKind: existing?.noiseKind ?? null, method: existing?.method ?? 'pending', decidedBy: existing?.decidedBy ?? null };
      await recordAudit(
        {
          actorId: leadId,
          action: 'decision.conflict',
          targetType: 'component',
          targetId: input.componentId,
          studyId,
          detail: { runId: ctx.runId, index: ctx.idx, baseVersion: input.baseVersion, version: existing?.version ?? 0, current, refused: { label: input.label, noiseKind, reason: input.reason } },
        },
        trx,
      );
      return { conflict: current };
    }
    const method = !existing || existing.method === 'pending' ? 'reconciled' : existing.method === 'reconciled' ? 'reconciled' : 'override';
    const row = { label: input.label, noise_kind: noiseKind, method, decided_by: leadId, reason: input.reason, decided_at: trx.fn.now(3) };
    if (existing) await trx('decisions').where({ id: existing.id }).update({ ...row, version: trx.raw('version + 1') });
    else await trx('decisions').insert({ component_id: input.componentId, run_id: ctx.runId, ...row, version: 1 });
    await recordAudit(
      {
        actorId: leadId,
        action: method === 'override' ? 'decision.override' : 'decision.reconcile',
        targetType: 'component',
        targetId: input.componentId,
        studyId,
        detail: { runId: ctx.runId, index: ctx.idx, before: existing ? { label: existing.label, noiseKind: existing.noiseKind, method: existing.method } : null, label: input.label, noiseKind, reason: input.reason },
      },
      trx,
    );
    return { componentId: input.componentId, method, label: input.label, noiseKind };
  });
}
