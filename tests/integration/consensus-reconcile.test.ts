/**
 * Consensus and reconcile against the real MariaDB: votes become decisions in the same
 * transaction, the lead's queue holds exactly the disagreements of submitted runs, a lead's
 * decision needs a reason, is audited, and survives later vote recomputation; the agreement
 * report is built from submitted votes only.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { db, closeDb, toJson } from '@/lib/db/knex';
import { recomputeDecision, recomputeRunDecisions } from '@/lib/consensus/recompute';
import { listReconcileItems } from '@/lib/db/queries/reconcile';
import { recordLeadDecision } from '@/lib/consensus/record-lead-decision';
import { loadStudyRatings } from '@/lib/db/queries/agreement';
import { buildAgreementReport } from '@/lib/reports/agreement-report';
import { listRunsForStudy } from '@/lib/runs/list-study-runs';
import { createRun, createStudyWithRaters } from './helpers/factories';
import { markSubmitted } from './helpers/submitted';

let studyId: number;
let leadId: number;
let raters: number[];
let runId: number;
let components: number[];

async function vote(raterId: number, componentId: number, label: string, noiseKind: string | null = null) {
  await db.transaction(async (trx) => {
    await trx('votes')
      .insert({ component_id: componentId, run_id: runId, rater_id: raterId, label, noise_kind: noiseKind })
      .onConflict(['component_id', 'rater_id'])
      .merge({ label, noise_kind: noiseKind });
    await recomputeDecision(trx, { componentId });
  });
}

const decisionOf = (componentId: number) =>
  db('decisions').where({ component_id: componentId }).first('label', 'noise_kind as noiseKind', 'method', 'reason');

beforeAll(async () => {
  const s = await createStudyWithRaters(db, { raters: 3, raters_per_run: 3, consensus_rule: 'majority' });
  ({ studyId, leadId } = s);
  raters = s.raterIds;
  runId = await createRun(db, {
    studyId,
    createdBy: leadId,
    file: { fileKey: 'runs/2026-12/consensus-test.nii.gz', sha256: randomBytes(32).toString('hex'), sizeBytes: 1 },
    sub: '01',
  });
  await db('runs').where({ id: runId }).update({ status: 'ready' });
  const [decompositionId] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k: 4, is_current: true });
  components = [];
  for (let idx = 1; idx <= 4; idx++) {
    const [id] = await db('components').insert({ decomposition_id: decompositionId, idx, variance_explained: 0.1, features: toJson({}) });
    components.push(Number(id));
  }
  for (const r of raters) await db('assignments').insert({ run_id: runId, rater_id: r });
});

afterAll(closeDb);

describe('votes to decisions (majority rule, 3 raters)', () => {
  it('is pending until every assigned rater has voted, then follows the majority', async () => {
    await vote(raters[0], components[0], 'noise', 'motion');
    await vote(raters[1], components[0], 'noise', 'motion');
    expect(await decisionOf(components[0])).toMatchObject({ method: 'pending', label: null });
    await vote(raters[2], components[0], 'signal');
    expect(await decisionOf(components[0])).toMatchObject({ method: 'majority', label: 'noise', noiseKind: 'motion' });
  });

  it('unanimous, a three-way split, and a changed vote are recomputed in the vote transaction', async () => {
    for (const r of raters) await vote(r, components[1], 'signal');
    expect(await decisionOf(components[1])).toMatchObject({ method: 'unanimous', label: 'signal' });
    await vote(raters[0], components[2], 'signal');
    await vote(raters[1], components[2], 'noise', 'csf');
    await vote(raters[2], components[2], 'uncertain');
    expect(await decisionOf(components[2])).toMatchObject({ method: 'pending' });
    for (const r of raters) await vote(r, components[3], 'uncertain');
    await vote(raters[2], components[3], 'noise', 'vascular');
    expect(await decisionOf(components[3])).toMatchObject({ method: 'majority', label: 'uncertain' });
  });
});

describe('reconcile', () => {
  it('shows nothing before every rater has submitted, then exactly the disagreement', async () => {
    expect(await listReconcileItems({ studyId, include: 'pending' })).toEqual([]);
    await markSubmitted(db, { runId });
    const items = await listReconcileItems({ studyId, include: 'pending' });
    expect(items.map((i) => i.idx)).toEqual([3]);
    expect(items[0].votes.map((v) => v.label).sort()).toEqual(['noise', 'signal', 'uncertain']);
    expect(await listReconcileItems({ studyId, include: 'pending', noiseKind: 'motion' })).toEqual([]);
    expect((await listReconcileItems({ studyId, include: 'pending', noiseKind: 'csf' })).map((i) => i.idx)).toEqual([3]);
  });

  it('records the lead decision with its reason and audit entry, and keeps it when votes change', async () => {
    const result = await recordLeadDecision({
      studyId,
      leadId,
      input: { componentId: components[2], label: 'noise', noiseKind: 'csf', reason: 'Ventricular pattern, 0.2 Hz peak' },
    });
    expect(result).toMatchObject({ method: 'reconciled' });
    expect(await decisionOf(components[2])).toMatchObject({
      method: 'reconciled',
      label: 'noise',
      noiseKind: 'csf',
      reason: 'Ventricular pattern, 0.2 Hz peak',
    });
    const audit = await db('audit_log')
      .where({ action: 'decision.reconcile', target_id: String(components[2]) })
      .first();
    expect(audit).toMatchObject({ actor_id: leadId, study_id: studyId, target_type: 'component' });
    expect(audit.created_at).toBeInstanceOf(Date);
    await vote(raters[0], components[2], 'noise', 'csf');
    expect(await decisionOf(components[2])).toMatchObject({ method: 'reconciled', label: 'noise' });
    expect(await listReconcileItems({ studyId, include: 'pending' })).toEqual([]);
  });

  it('an override of an automatic decision is recorded as such', async () => {
    const result = await recordLeadDecision({
      studyId,
      leadId,
      input: { componentId: components[1], label: 'noise', noiseKind: 'scanner', reason: 'Slice pattern visible in mosaic' },
    });
    expect(result).toMatchObject({ method: 'override' });
    expect(
      await db('audit_log')
        .where({ action: 'decision.override', target_id: String(components[1]) })
        .first(),
    ).toBeTruthy();
  });

  it('refuses labels and kinds outside the study, and components of other studies', async () => {
    await expect(
      recordLeadDecision({ studyId, leadId, input: { componentId: components[0], label: 'artefact', reason: 'test reason' } }),
    ).rejects.toMatchObject({ code: 'validation' });
    await expect(
      recordLeadDecision({
        studyId,
        leadId,
        input: { componentId: components[0], label: 'noise', noiseKind: 'eyes', reason: 'test reason' },
      }),
    ).rejects.toMatchObject({ code: 'validation' });
    const other = await createStudyWithRaters(db, { raters: 1 });
    await expect(
      recordLeadDecision({
        studyId: other.studyId,
        leadId: other.leadId,
        input: { componentId: components[0], label: 'noise', reason: 'test reason' },
      }),
    ).rejects.toMatchObject({ code: 'not_found' });
  });
});

describe('agreement report from the database', () => {
  it('counts submitted votes and the decisions', async () => {
    const report = buildAgreementReport(await loadStudyRatings({ studyId }), { resamples: 100 });
    expect(report.raters).toHaveLength(3);
    expect(report.summary?.items).toBe(4);
    expect(report.decisions).toMatchObject({ total: 4, pending: 0, override: 1, reconciled: 1, majority: 2 });
    expect(report.summary?.overall.percentAgreement.value).toBeGreaterThan(0);
    expect(report.summary?.overall.percentAgreement.value).toBeLessThan(1);
  });
});

describe('per-run agreement in the runs table', () => {
  it('is shown to the lead and never to a rater (blinding)', async () => {
    const [asLead] = await listRunsForStudy({ user: { id: leadId, role: 'lead' }, studyId });
    expect(asLead.agreement).not.toBeNull();
    const [asRater] = await listRunsForStudy({ user: { id: raters[0], role: 'rater' }, studyId });
    expect(asRater.id).toBe(runId);
    expect(asRater.agreement).toBeNull();
  });
});

describe('a rater removed from the run', () => {
  it('keeps their votes in the database, but they no longer decide', async () => {
    // component 1: noise, noise, signal → majority noise; without the third rater: unanimous noise
    await db('assignments').where({ run_id: runId, rater_id: raters[2] }).delete();
    await db.transaction((trx) => recomputeRunDecisions(trx, { runId }));
    expect(await decisionOf(components[0])).toMatchObject({ method: 'unanimous', label: 'noise' });
    expect(await db('votes').where({ rater_id: raters[2], run_id: runId }).count({ n: '*' }).first()).toMatchObject({ n: 4 });
  });
});
