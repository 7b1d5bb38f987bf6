/**
 * The calibration set through the real route handlers, against the real MariaDB: a lead marks a
 * ready run as a calibration run, adopts its decisions as reference labels, assigns a new rater,
 * the rater's submitted votes are scored against the reference (hand-computed κ, AC1, percent
 * agreement and noise sensitivity/specificity on a constructed case), the lead certifies them, and
 * every step is audited. Refusals: no session, a rater, a lead of another study, adopting while
 * decisions are pending, assigning before references exist or twice.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb, parseJson, toJson } = await import('@/lib/db/knex');
const { createStudyWithRaters, createUser, uniqueSuffix } = await import('./helpers/factories');
const overviewRoute = await import('@/app/api/studies/[id]/calibration/route');
const runsRoute = await import('@/app/api/studies/[id]/calibration/runs/route');
const referencesRoute = await import('@/app/api/studies/[id]/calibration/runs/[runId]/references/route');
const ratersRoute = await import('@/app/api/studies/[id]/calibration/runs/[runId]/raters/route');
const certRoute = await import('@/app/api/studies/[id]/calibration/certifications/route');
const meRoute = await import('@/app/api/studies/[id]/calibration/me/route');
const { loadStudyRatings } = await import('@/lib/db/queries/agreement');

let s: { leadId: number; studyId: number; raterIds: number[] };
let other: { leadId: number; studyId: number; raterIds: number[] };
let admin: number;

/** The constructed case: the reference (the run's decisions) and the new rater's labels, component by component. */
const REFERENCE = ['noise', 'noise', 'noise', 'signal', 'signal', 'signal'];
const NEW_RATER = ['noise', 'noise', 'signal', 'signal', 'signal', 'uncertain'];

/** A ready run with a current decomposition of k components, the given raters assigned, and decisions (null = pending). */
async function run(studyId: number, createdBy: number, raterIds: number[], decisions: Array<string | null>) {
  const [runId] = await db('runs').insert({
    study_id: studyId,
    sub: `cal${uniqueSuffix()}`,
    ses: '1',
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    created_by: createdBy,
  });
  const [decompositionId] = await db('decompositions').insert({
    run_id: runId,
    parameters: toJson({}),
    k: decisions.length,
    is_current: true,
  });
  const componentIds: number[] = [];
  for (let i = 0; i < decisions.length; i++) {
    const [id] = await db('components').insert({
      decomposition_id: decompositionId,
      idx: i + 1,
      variance_explained: 0.1,
      features: toJson({}),
    });
    componentIds.push(Number(id));
    const label = decisions[i];
    await db('decisions').insert({
      component_id: id,
      run_id: runId,
      label,
      noise_kind: label === 'noise' ? 'motion' : null,
      method: label ? 'majority' : 'pending',
    });
  }
  for (const r of raterIds) await db('assignments').insert({ run_id: runId, rater_id: r, submitted_at: db.fn.now(3) });
  return { runId: Number(runId), componentIds };
}

const p = (studyId: number, runId?: number): Record<string, string> =>
  runId ? { id: String(studyId), runId: String(runId) } : { id: String(studyId) };
const overview = (studyId: number) => callRoute(overviewRoute.GET, { url: `/api/studies/${studyId}/calibration`, params: p(studyId) });
const mark = (studyId: number, runId: number) =>
  callRoute(runsRoute.POST, { method: 'POST', url: `/api/studies/${studyId}/calibration/runs`, params: p(studyId), body: { runId } });
const reference = (studyId: number, runId: number, body: unknown) =>
  callRoute(referencesRoute.POST, {
    method: 'POST',
    url: `/api/studies/${studyId}/calibration/runs/${runId}/references`,
    params: p(studyId, runId),
    body,
  });
const assign = (studyId: number, runId: number, raterId: number) =>
  callRoute(ratersRoute.POST, {
    method: 'POST',
    url: `/api/studies/${studyId}/calibration/runs/${runId}/raters`,
    params: p(studyId, runId),
    body: { raterId },
  });
const certify = (studyId: number, userId: number, passed: boolean) =>
  callRoute(certRoute.POST, {
    method: 'POST',
    url: `/api/studies/${studyId}/calibration/certifications`,
    params: p(studyId),
    body: { userId, passed },
  });
const me = (studyId: number) => callRoute(meRoute.GET, { url: `/api/studies/${studyId}/calibration/me`, params: p(studyId) });
const audit = (studyId: number, action: string) => db('audit_log').where({ study_id: studyId, action }).orderBy('id');

beforeAll(async () => {
  s = await createStudyWithRaters(db, { raters: 3, raters_per_run: 2, consensus_rule: 'majority' });
  other = await createStudyWithRaters(db, { raters: 1 });
  admin = await createUser(db, { role: 'admin' });
});
afterAll(async () => {
  actAs(null);
  await closeDb();
});

describe('the calibration flow', () => {
  it('mark → adopt references → assign → the rater submits → scored against the reference → certified, all audited', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!, s.raterIds[1]!], REFERENCE);
    const newRater = s.raterIds[2]!;
    actAs(s.leadId);
    expect((await overview(s.studyId)).json.candidates.map((c: { runId: number }) => c.runId)).toContain(r.runId);

    expect((await mark(s.studyId, r.runId)).status).toBe(200);
    expect(Boolean((await db('runs').where({ id: r.runId }).first('is_calibration')).is_calibration)).toBe(true);
    // a calibration run no longer counts for the study's agreement
    const ratings = await loadStudyRatings({ studyId: s.studyId });
    expect(ratings.decisions.filter((d) => d.runId === r.runId)).toHaveLength(0);

    // no reference yet → assigning is refused
    expect((await assign(s.studyId, r.runId, newRater)).status).toBe(409);
    const adopted = await reference(s.studyId, r.runId, { adopt: true });
    expect(adopted.status).toBe(200);
    expect(adopted.json).toMatchObject({ referenced: 6 });
    const refs = await db('reference_labels')
      .whereIn('component_id', r.componentIds)
      .orderBy('component_id')
      .select('label', 'noise_kind', 'set_by');
    expect(refs.map((x) => x.label)).toEqual(REFERENCE);
    expect(refs[0]).toMatchObject({ noise_kind: 'motion', set_by: s.leadId });

    // one component's reference set by hand (then back), validated against the label set
    expect((await reference(s.studyId, r.runId, { componentId: r.componentIds[3], label: 'bogus' })).status).toBe(422);
    expect((await reference(s.studyId, r.runId, { componentId: r.componentIds[3], label: 'signal', noiseKind: 'motion' })).status).toBe(
      422,
    );
    expect((await reference(s.studyId, r.runId, { componentId: r.componentIds[3], label: 'uncertain' })).status).toBe(200);
    expect((await reference(s.studyId, r.runId, { componentId: r.componentIds[3], label: 'signal' })).status).toBe(200);

    expect((await assign(s.studyId, r.runId, newRater)).status).toBe(200);
    expect(await db('assignments').where({ run_id: r.runId, rater_id: newRater }).first('assigned_by')).toMatchObject({
      assigned_by: s.leadId,
    });
    expect((await assign(s.studyId, r.runId, newRater)).status).toBe(409);
    expect((await assign(s.studyId, r.runId, other.raterIds[0]!)).status).toBe(422);

    // not submitted yet: nothing is scored, passing is refused
    for (let i = 0; i < 6; i++)
      await db('votes').insert({ component_id: r.componentIds[i], run_id: r.runId, rater_id: newRater, label: NEW_RATER[i] });
    expect((await certify(s.studyId, newRater, true)).status).toBe(409);
    await db('assignments')
      .where({ run_id: r.runId, rater_id: newRater })
      .update({ submitted_at: db.fn.now(3) });

    // Hand computation, rows = rater (signal, noise, uncertain), columns = reference:
    //   signal [2 1 0] · noise [0 2 0] · uncertain [1 0 0]; N = 6, p_o = 4/6,
    //   κ: p_e = (3·3 + 2·3 + 1·0)/36 = 15/36 → κ = (24 − 15)/(36 − 15) = 3/7;
    //   AC1: π = (6/12, 5/12, 1/12), p_e = Σπ(1−π)/2 = 41/144 → AC1 = (96 − 41)/(144 − 41) = 55/103;
    //   noise: TP 2, FN 1, FP 0, TN 3 → sensitivity 2/3, specificity 1.
    const o = await overview(s.studyId);
    expect(o.status).toBe(200);
    const cr = o.json.runs.find((x: { runId: number }) => x.runId === r.runId);
    expect(cr).toMatchObject({ total: 6, referenced: 6, pending: 0 });
    expect(cr.assignments.find((a: { raterId: number }) => a.raterId === newRater)).toMatchObject({ labelled: 6 });
    const rater = o.json.raters.find((x: { id: number }) => x.id === newRater);
    expect(rater.submittedRuns).toBe(1);
    expect(rater.score.n).toBe(6);
    expect(rater.score.percentAgreement.value).toBeCloseTo(4 / 6, 12);
    expect(rater.score.cohenKappa.value).toBeCloseTo(3 / 7, 12);
    expect(rater.score.gwetAC1.value).toBeCloseTo(55 / 103, 12);
    expect(rater.score.noise).toMatchObject({ tp: 2, fn: 1, fp: 0, tn: 3 });
    expect(rater.score.noise.sensitivity.value).toBeCloseTo(2 / 3, 12);
    expect(rater.score.noise.specificity.value).toBe(1);
    expect(rater.certification).toBeNull();

    // the rater reads their own score
    actAs(newRater);
    const mine = await me(s.studyId);
    expect(mine.status).toBe(200);
    expect(mine.json.score.cohenKappa.value).toBeCloseTo(3 / 7, 12);

    actAs(s.leadId);
    const c = await certify(s.studyId, newRater, true);
    expect(c.status).toBe(200);
    const row = await db('rater_certifications').where({ study_id: s.studyId, user_id: newRater }).first();
    expect(Boolean(row.passed)).toBe(true);
    expect(row.certified_by).toBe(s.leadId);
    expect(row.certified_at).not.toBeNull();
    expect(parseJson<{ cohenKappa: { value: number } }>(row.scores)?.cohenKappa.value).toBeCloseTo(3 / 7, 12);

    for (const [action, target] of [
      ['calibration.run_marked', String(r.runId)],
      ['calibration.reference_set', String(r.runId)],
      ['calibration.assigned', String(r.runId)],
      ['calibration.certified', String(newRater)],
    ] as const) {
      const entries = await audit(s.studyId, action);
      expect(entries.length, action).toBeGreaterThan(0);
      expect(entries[0]).toMatchObject({ actor_id: s.leadId, target_id: target });
    }
    expect(await audit(s.studyId, 'calibration.reference_set')).toHaveLength(3); // adopt + 2 single labels
    // an admin may act too (and certify "not passed")
    actAs(admin);
    expect((await certify(s.studyId, newRater, false)).status).toBe(200);
    expect(Boolean((await db('rater_certifications').where({ study_id: s.studyId, user_id: newRater }).first('passed')).passed)).toBe(
      false,
    );
  });
});

describe('refusals', () => {
  it('no session → 401; a rater → 403; a lead of another study → 404; nothing changes', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!], REFERENCE);
    actAs(null);
    expect((await overview(s.studyId)).status).toBe(401);
    expect((await mark(s.studyId, r.runId)).status).toBe(401);
    actAs(s.raterIds[0]!);
    expect((await overview(s.studyId)).status).toBe(403);
    expect((await mark(s.studyId, r.runId)).status).toBe(403);
    expect((await reference(s.studyId, r.runId, { adopt: true })).status).toBe(403);
    expect((await assign(s.studyId, r.runId, s.raterIds[1]!)).status).toBe(403);
    expect((await certify(s.studyId, s.raterIds[0]!, true)).status).toBe(403);
    actAs(other.leadId);
    expect((await overview(s.studyId)).status).toBe(404);
    expect((await mark(s.studyId, r.runId)).status).toBe(404);
    // through their own study's address the run is not found either (scoped by study)
    expect((await mark(other.studyId, r.runId)).status).toBe(404);
    expect((await reference(other.studyId, r.runId, { adopt: true })).status).toBe(404);
    expect((await certify(s.studyId, s.raterIds[0]!, true)).status).toBe(404);
    expect((await me(s.studyId)).status).toBe(403); // a lead has no votes.write
    expect(Boolean((await db('runs').where({ id: r.runId }).first('is_calibration')).is_calibration)).toBe(false);
    expect(
      await db('audit_log')
        .where({ target_type: 'run', target_id: String(r.runId) })
        .andWhere('action', 'like', 'calibration.%'),
    ).toHaveLength(0);
  });

  it('adopting references while decisions are pending → 409 naming them; a run not marked → 409', async () => {
    const r = await run(s.studyId, s.leadId, [s.raterIds[0]!], ['signal', null, 'noise', null]);
    actAs(s.leadId);
    const early = await reference(s.studyId, r.runId, { adopt: true });
    expect(early.status).toBe(409);
    expect(early.json.error.message).toMatch(/not a calibration run/);
    expect((await mark(s.studyId, r.runId)).status).toBe(200);
    const res = await reference(s.studyId, r.runId, { adopt: true });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/2 of 4 components .* no decision yet \(components 2, 4\)/);
    expect(await db('reference_labels').whereIn('component_id', r.componentIds)).toHaveLength(0);
  });
});
