/**
 * Automatic assignment (lib/runs/assign-raters.ts) over many runs against the real MariaDB: open
 * work stays balanced across the study's raters (counts differ by at most one), only active rater
 * members are used (not leads, observers, deactivated accounts or raters of other studies), and
 * certified raters come first when the study certifies.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db/knex';
import { assignRaters } from '@/lib/runs/assign-raters';
import { addMember, createStudyWithRaters, createUser, uniqueSuffix } from './helpers/factories';

afterAll(async () => {
  await closeDb();
});

/** A ready run row (no file is read by assignment). */
async function readyRun(studyId: number, createdBy: number): Promise<number> {
  const [id] = await db('runs').insert({
    study_id: studyId,
    sub: `b${uniqueSuffix()}`,
    task: 'rest',
    original_name: 'x_bold.nii.gz',
    file_key: `runs/${uniqueSuffix()}.nii.gz`,
    sha256: `${uniqueSuffix()}${uniqueSuffix()}`.padEnd(64, '0'),
    size_bytes: 1,
    status: 'ready',
    created_by: createdBy,
  });
  return Number(id);
}

async function openCounts(raterIds: number[]): Promise<number[]> {
  const rows = await db('assignments')
    .whereIn('rater_id', raterIds)
    .whereNull('submitted_at')
    .groupBy('rater_id')
    .select('rater_id')
    .count({ n: '*' });
  const by = new Map((rows as Array<{ rater_id: number; n: number | string }>).map((r) => [Number(r.rater_id), Number(r.n)]));
  return raterIds.map((id) => by.get(id) ?? 0);
}

describe('automatic assignment', () => {
  it('balances 37 runs × 2 raters over 5 raters: counts differ by at most one after every run', async () => {
    const { studyId, leadId, raterIds } = await createStudyWithRaters(db, { raters: 5, raters_per_run: 2 });
    // people who must never be chosen
    const observer = await createUser(db, { role: 'observer' });
    await addMember(db, { studyId, userId: observer, studyRole: 'observer' });
    const inactive = await createUser(db, { role: 'rater', active: false });
    await addMember(db, { studyId, userId: inactive, studyRole: 'rater' });
    const elsewhere = await createStudyWithRaters(db, { raters: 1 });

    for (let i = 0; i < 37; i++) {
      const runId = await readyRun(studyId, leadId);
      const r = await assignRaters(db, { runId });
      expect(r).toMatchObject({ outcome: 'assigned', wanted: 2, short: 0 });
      expect(new Set(r.raterIds).size).toBe(2);
      const counts = await openCounts(raterIds);
      expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(1);
    }
    expect((await openCounts(raterIds)).reduce((a, b) => a + b, 0)).toBe(74);
    expect(await db('assignments').whereIn('rater_id', [observer, inactive, leadId, ...elsewhere.raterIds])).toHaveLength(0);
  });

  it('stays balanced when raters submit: the one with least open work is chosen next', async () => {
    const { studyId, leadId, raterIds } = await createStudyWithRaters(db, { raters: 3, raters_per_run: 1 });
    for (let i = 0; i < 6; i++) await assignRaters(db, { runId: await readyRun(studyId, leadId) });
    expect(await openCounts(raterIds)).toEqual([2, 2, 2]);
    await db('assignments')
      .where({ rater_id: raterIds[2] })
      .update({ submitted_at: db.fn.now(3) });
    for (let i = 0; i < 4; i++) await assignRaters(db, { runId: await readyRun(studyId, leadId) });
    const counts = await openCounts(raterIds);
    expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(1);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(8);
  });

  it('a second call for the same run does nothing; too few raters are reported as short', async () => {
    const { studyId, leadId } = await createStudyWithRaters(db, { raters: 2, raters_per_run: 3 });
    const runId = await readyRun(studyId, leadId);
    expect(await assignRaters(db, { runId })).toMatchObject({ outcome: 'assigned', short: 1 });
    expect(await assignRaters(db, { runId })).toMatchObject({ outcome: 'already_assigned', raterIds: [] });
    const none = await createStudyWithRaters(db, { raters: 0 });
    expect(await assignRaters(db, { runId: await readyRun(none.studyId, none.leadId) })).toMatchObject({ outcome: 'no_raters' });
  });

  it('prefers certified raters when the study certifies; uncertified ones only fill the count', async () => {
    const { studyId, leadId, raterIds } = await createStudyWithRaters(db, { raters: 4, raters_per_run: 2 });
    await db('rater_certifications').insert([
      { study_id: studyId, user_id: raterIds[2], passed: true },
      { study_id: studyId, user_id: raterIds[3], passed: true },
      { study_id: studyId, user_id: raterIds[0], passed: false },
    ]);
    for (let i = 0; i < 5; i++) {
      const r = await assignRaters(db, { runId: await readyRun(studyId, leadId) });
      expect(r.raterIds.sort()).toEqual([raterIds[2], raterIds[3]].sort());
    }
    const three = await createStudyWithRaters(db, { raters: 3, raters_per_run: 2 });
    await db('rater_certifications').insert({ study_id: three.studyId, user_id: three.raterIds[1], passed: true });
    const r = await assignRaters(db, { runId: await readyRun(three.studyId, three.leadId) });
    expect(r.raterIds[0]).toBe(three.raterIds[1]);
    expect(r.raterIds).toHaveLength(2);
  });
});
