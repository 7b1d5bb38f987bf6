/**
 * The calibration threshold gates live work (real MariaDB): with AC1 ≥ 0.8 and noise sensitivity
 * ≥ 0.85 required, a rater who matches the reference gets live runs, a rater who misses the noise
 * and a rater with no calibration run get none — automatic assignment leaves them out, and a
 * lead's manual assignment is refused with the reason. Scores are hand-computable: 6 components,
 * reference noise ×3 / signal ×3; rater A agrees on all (AC1 1, sensitivity 1); rater B calls every
 * component signal (sensitivity 0/3 = 0).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb, toJson, parseJson } = await import('@/lib/db/knex');
const { createStudyWithRaters, uniqueSuffix } = await import('./helpers/factories');
const { assignRaters } = await import('@/lib/runs/assign-raters');
const { addRaterToRun } = await import('@/lib/assignments/add-rater');
const thresholdRoute = await import('@/app/api/studies/[id]/calibration/threshold/route');

const REFERENCE = ['noise', 'noise', 'noise', 'signal', 'signal', 'signal'];
let s: { leadId: number; studyId: number; raterIds: number[] };

async function readyRun(isCalibration: boolean, k = REFERENCE.length) {
  const [runId] = await db('runs').insert({
    study_id: s.studyId,
    sub: `g${uniqueSuffix()}`,
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    is_calibration: isCalibration,
    created_by: s.leadId,
  });
  const [decompositionId] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k, is_current: true });
  const ids: number[] = [];
  for (let i = 0; i < k; i++)
    ids.push(
      Number(
        (
          await db('components').insert({ decomposition_id: decompositionId, idx: i + 1, variance_explained: 0.1, features: toJson({}) })
        )[0],
      ),
    );
  return { runId: Number(runId), ids };
}

beforeAll(async () => {
  s = await createStudyWithRaters(db, { raters: 3, raters_per_run: 3 });
  const [a, b] = s.raterIds as [number, number, number];
  const cal = await readyRun(true);
  // reference kinds: two motion components and one noise component without a kind
  for (const [i, id] of cal.ids.entries())
    await db('reference_labels').insert({ component_id: id, label: REFERENCE[i], noise_kind: i < 2 ? 'motion' : null, set_by: s.leadId });
  for (const [rater, labels] of [
    [a, REFERENCE],
    [b, REFERENCE.map(() => 'signal')],
  ] as const) {
    await db('assignments').insert({ run_id: cal.runId, rater_id: rater, submitted_at: db.fn.now(3) });
    for (const [i, id] of cal.ids.entries())
      await db('votes').insert({ component_id: id, run_id: cal.runId, rater_id: rater, label: labels[i] });
  }
});
afterAll(async () => closeDb());

describe('calibration threshold', () => {
  it('a lead sets it; a value outside 0–1 is refused with a message', async () => {
    actAs(s.leadId);
    const bad = await callRoute(thresholdRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(s.studyId) },
      body: { minAc1: 1.5, minSensitivity: null },
    });
    expect(bad.status).toBe(422);
    const ok = await callRoute(thresholdRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(s.studyId) },
      body: { minAc1: 0.8, minSensitivity: 0.85 },
    });
    expect(ok.json).toEqual({ minAc1: 0.8, minSensitivity: 0.85, setName: null, recalibrationWeeks: null });
    actAs(s.raterIds[0]!);
    expect(
      (
        await callRoute(thresholdRoute.PUT, {
          method: 'PUT',
          url: '/',
          params: { id: String(s.studyId) },
          body: { minAc1: 0, minSensitivity: 0 },
        })
      ).status,
    ).toBe(403);
  });

  it('automatic assignment gives a live run only to the rater who reached it', async () => {
    const live = await readyRun(false, 3);
    const r = await assignRaters(db, { runId: live.runId });
    expect(r.outcome).toBe('assigned');
    expect(r.raterIds).toEqual([s.raterIds[0]]);
  });

  it('a manual assignment of a rater under the threshold is refused and says why', async () => {
    const live = await readyRun(false, 3);
    const lead = { id: s.leadId, role: 'lead' as const, name: 'Lead' };
    await expect(addRaterToRun({ user: lead as never, runId: live.runId, raterId: s.raterIds[1]! })).rejects.toThrow(
      /noise sensitivity 0\.00 is below 0\.85/,
    );
    await expect(addRaterToRun({ user: lead as never, runId: live.runId, raterId: s.raterIds[2]! })).rejects.toThrow(
      /has not submitted a calibration run/,
    );
    await expect(addRaterToRun({ user: lead as never, runId: live.runId, raterId: s.raterIds[0]! })).resolves.toMatchObject({
      raterId: s.raterIds[0],
    });
  });

  it('the lead’s overview shows each rater’s gate and noise sensitivity per reference kind', async () => {
    const { listCalibration } = await import('@/lib/calibration/list-calibration');
    const o = await listCalibration({ user: { id: s.leadId, role: 'lead' } as never, studyId: s.studyId });
    expect(o.threshold).toEqual({ minAc1: 0.8, minSensitivity: 0.85, setName: null });
    expect(o.recalibrationWeeks).toBeNull();
    const b = o.raters.find((r) => r.id === s.raterIds[1])!;
    expect(b.gate).toMatchObject({ gated: true, passes: false });
    expect(b.byKind).toEqual([
      { kind: 'motion', n: 2, detected: 0, sensitivity: { value: 0, n: 2 } },
      { kind: 'unspecified', n: 1, detected: 0, sensitivity: { value: 0, n: 1 } },
    ]);
    expect(o.raters.find((r) => r.id === s.raterIds[0])!.gate).toEqual({ gated: true, passes: true, reason: null });
  });

  it('a rater sees their result on a submitted calibration run component by component, with the lead’s reason; not before submitting', async () => {
    const { calibrationResult } = await import('@/lib/db/queries/calibration');
    const cal = await db('runs').where({ study_id: s.studyId, is_calibration: true }).first('id');
    const comps = await db('components as c')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .where('d.run_id', cal.id)
      .orderBy('c.idx')
      .select('c.id');
    await db('decisions').insert({
      component_id: comps[0].id,
      run_id: cal.id,
      label: 'noise',
      noise_kind: 'motion',
      method: 'reconciled',
      reason: 'ring at the brain outline',
    });
    const r = await calibrationResult({ studyId: s.studyId, runId: cal.id, raterId: s.raterIds[1]! });
    expect(r!.components).toHaveLength(6);
    expect(r!.components[0]).toMatchObject({
      idx: 1,
      myLabel: 'signal',
      referenceLabel: 'noise',
      referenceKind: 'motion',
      reason: 'ring at the brain outline',
    });
    // rater C has no submitted assignment on it: no result, so no reference labels leak
    expect(await calibrationResult({ studyId: s.studyId, runId: cal.id, raterId: s.raterIds[2]! })).toBeNull();
  });

  it('unmarking the calibration run keeps its references and votes, records the scores, and the run stops counting', async () => {
    const unmarkRoute = await import('@/app/api/studies/[id]/calibration/runs/[runId]/route');
    const cal = await db('runs').where({ study_id: s.studyId, is_calibration: true }).first('id');
    const params = { id: String(s.studyId), runId: String(cal.id) };
    actAs(s.raterIds[0]!);
    expect((await callRoute(unmarkRoute.DELETE, { method: 'DELETE', url: '/', params })).status).toBe(403);
    actAs(s.leadId);
    expect((await callRoute(unmarkRoute.DELETE, { method: 'DELETE', url: '/', params })).json).toEqual({ runId: cal.id, unmarked: true });
    expect((await callRoute(unmarkRoute.DELETE, { method: 'DELETE', url: '/', params })).status).toBe(409);
    expect(
      Number(
        (
          await db('reference_labels as rl')
            .join('components as c', 'c.id', 'rl.component_id')
            .join('decompositions as d', 'd.id', 'c.decomposition_id')
            .where('d.run_id', cal.id)
            .count({ n: '*' })
            .first()
        )?.n,
      ),
    ).toBe(6);
    const audit = await db('audit_log').where({ action: 'calibration.run_unmarked', target_id: cal.id }).first('detail');
    const detail = parseJson<{ scoresBefore: { raterId: number; gwetAC1: number | null }[] }>(audit.detail)!;
    expect(detail.scoresBefore.find((x) => x.raterId === s.raterIds[0])!.gwetAC1).toBe(1);
    // the run no longer counts: rater A has no calibration score left, so the gate (still 0.8 / 0.85) now refuses them
    const { calibrationGate } = await import('@/lib/db/queries/calibration-gate');
    expect((await calibrationGate({ studyId: s.studyId, raterId: s.raterIds[0]! })).reason).toMatch(/has not submitted/);
  });

  it('without a threshold every rater is eligible again', async () => {
    actAs(s.leadId);
    await callRoute(thresholdRoute.PUT, {
      method: 'PUT',
      url: '/',
      params: { id: String(s.studyId) },
      body: { minAc1: null, minSensitivity: null },
    });
    const live = await readyRun(false, 3);
    expect((await assignRaters(db, { runId: live.runId })).raterIds).toHaveLength(3);
  });
});
