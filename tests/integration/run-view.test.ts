/**
 * The read-only run view against the real MariaDB: who may open a run (the study's leads and
 * observers, admins; not its raters, not outsiders), and the votes a lead sees (only those of raters
 * who have submitted the run: work in progress stays blinded).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { db, closeDb, toJson } from '@/lib/db/knex';
import { submittedVotesOfRun } from '@/lib/db/queries/run-view';
import { loadRunForViewing } from '@/lib/runs/load-run-for-viewing';
import { addMember, createRun, createStudyWithRaters, createUser } from './helpers/factories';

let studyId: number;
let leadId: number;
let raters: number[];
let runId: number;
let decompositionId: number;
let components: number[];

beforeAll(async () => {
  const s = await createStudyWithRaters(db, { raters: 2, raters_per_run: 2, consensus_rule: 'majority' });
  ({ studyId, leadId } = s);
  raters = s.raterIds;
  runId = await createRun(db, {
    studyId,
    createdBy: leadId,
    file: { fileKey: 'runs/2026-12/run-view-test.nii.gz', sha256: randomBytes(32).toString('hex'), sizeBytes: 1 },
    sub: '01',
  });
  await db('runs').where({ id: runId }).update({ status: 'ready' });
  [decompositionId] = await db('decompositions').insert({ run_id: runId, parameters: toJson({}), k: 2, is_current: true });
  components = [];
  for (let idx = 1; idx <= 2; idx++) {
    const [id] = await db('components').insert({ decomposition_id: decompositionId, idx, variance_explained: 0.1, features: toJson({}) });
    components.push(Number(id));
  }
  for (const r of raters) await db('assignments').insert({ run_id: runId, rater_id: r });
  await db('votes').insert({ component_id: components[0], run_id: runId, rater_id: raters[0], label: 'signal' });
  await db('votes').insert({ component_id: components[0], run_id: runId, rater_id: raters[1], label: 'noise', noise_kind: 'motion' });
});

afterAll(closeDb);

describe('loadRunForViewing', () => {
  it('opens for the study lead, an observer member and an admin; not for its raters or outsiders', async () => {
    const observer = await createUser(db, { role: 'observer' });
    await addMember(db, { studyId, userId: observer, studyRole: 'observer' });
    const admin = await createUser(db, { role: 'admin' });
    const outsider = await createUser(db, { role: 'lead' });
    expect((await loadRunForViewing({ user: { id: leadId, role: 'lead' }, runId }))?.role).toBe('lead');
    expect((await loadRunForViewing({ user: { id: observer, role: 'observer' }, runId }))?.role).toBe('observer');
    expect((await loadRunForViewing({ user: { id: admin, role: 'admin' }, runId }))?.role).toBe('lead');
    expect(await loadRunForViewing({ user: { id: raters[0], role: 'rater' }, runId })).toBeNull();
    expect(await loadRunForViewing({ user: { id: outsider, role: 'lead' }, runId })).toBeNull();
    expect(await loadRunForViewing({ user: { id: leadId, role: 'lead' }, runId: 99_999_999 })).toBeNull();
    const loaded = await loadRunForViewing({ user: { id: leadId, role: 'lead' }, runId });
    expect(loaded?.components.map((c) => c.idx)).toEqual([1, 2]);
  });
});

describe('submittedVotesOfRun', () => {
  it('shows only the votes of raters who have submitted', async () => {
    expect(await submittedVotesOfRun({ runId, decompositionId })).toEqual({ assigned: 2, submitted: 0, votes: [] });
    await db('assignments').where({ run_id: runId, rater_id: raters[1] }).update({ submitted_at: db.fn.now() });
    const seen = await submittedVotesOfRun({ runId, decompositionId });
    expect(seen.submitted).toBe(1);
    expect(seen.votes.map((v) => [v.componentId, v.label, v.noiseKind])).toEqual([[components[0], 'noise', 'motion']]);
  });
});
