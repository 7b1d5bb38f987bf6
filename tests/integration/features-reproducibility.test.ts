/**
 * Features as stored and as the desk serves them, against the real MariaDB: undefined features
 * are JSON null in the components table (never 0), reproducibility is stored as a feature (null
 * without restarts), and the study's rule for low reproducibility (flag / last / hide) decides
 * what the rater's desk lists and what submission asks for; hidden components wait for the lead.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';

vi.mock('server-only', () => ({}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-features-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb, parseJson, toJson } = await import('@/lib/db/knex');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { createStudyWithRaters } = await import('./helpers/factories');
const { loadDeskComponents } = await import('@/lib/runs/load-desk-components');
const { submitRun } = await import('@/lib/runs/submit-run');
const { saveVote } = await import('@/lib/votes/save-vote');
const { listReconcileItems } = await import('@/lib/db/queries/reconcile');

let study: Awaited<ReturnType<typeof createStudyWithRaters>>;
let run: Awaited<ReturnType<typeof createReadyRun>>;

beforeAll(async () => {
  study = await createStudyWithRaters(db, { raters: 1 });
  run = await createReadyRun(db, {
    studyId: study.studyId,
    createdBy: study.leadId,
    raterIds: study.raterIds,
    size: 'tiny',
    seed: 7,
    components: 6,
    withMotion: false,
  });
});

afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

/** Sets the stored reproducibility of components (as a decomposition with restarts would store it). */
async function setReproducibility(values: number[]) {
  for (let i = 0; i < run.componentIds.length; i++) {
    const row = await db('components').where({ id: run.componentIds[i] }).first('features');
    const f = parseJson<Record<string, number | null>>(row.features, {})!;
    await db('components')
      .where({ id: run.componentIds[i] })
      .update({ features: toJson({ ...f, reproducibility: values[i] }) });
  }
}

describe('stored features', () => {
  it('undefined features are JSON null in the components table; every feature key is present', async () => {
    const rows = await db('components').whereIn('id', run.componentIds).orderBy('idx').select('features');
    for (const r of rows) {
      const f = parseJson<Record<string, unknown>>(r.features, {})!;
      for (const key of ['reproducibility', 'edgeFraction', 'clusterCount', 'mapThresholdZ', 'stepScore', 'trendR2', 'motionCorrelation'])
        expect(f, key).toHaveProperty(key);
      // the default decomposition runs restarts, so every component has its index (0–1); a run
      // without restarts stores null (tests/unit/decomposition-cli.test.ts, --restarts 1)
      expect(typeof f.reproducibility).toBe('number');
      expect(f.reproducibility as number).toBeGreaterThanOrEqual(0);
      expect(f.reproducibility as number).toBeLessThanOrEqual(1);
      expect(f.motionCorrelation).toBeNull(); // no motion table
      expect(typeof f.trendR2).toBe('number');
      // a spatial feature is either a number with its threshold, or null together with it
      expect(f.edgeFraction === null).toBe(f.mapThresholdZ === null);
      for (const v of Object.values(f)) expect(v === null || Number.isFinite(v)).toBe(true);
    }
  });
});

describe('low reproducibility on the desk (study protocol)', () => {
  const rater = () => ({ id: study.raterIds[0]! });
  const low = [0.99, 0.42, 0.95, 0.61, 0.9, 0.85]; // components 2 and 4 below 0.8

  it('flag (default): every component in order, the rule travels with the run', async () => {
    await setReproducibility(low);
    const desk = await loadDeskComponents({ user: rater(), runId: run.runId });
    expect(desk.components.map((c) => c.idx)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(desk.run.reproducibility).toEqual({ threshold: 0.8, policy: 'flag', hidden: 0 });
    expect(desk.components[1]!.features.reproducibility).toBeCloseTo(0.42, 12);
  });

  it('last: low ones at the end', async () => {
    await db('studies').where({ id: study.studyId }).update({ low_reproducibility: 'last' });
    const desk = await loadDeskComponents({ user: rater(), runId: run.runId });
    expect(desk.components.map((c) => c.idx)).toEqual([1, 3, 5, 6, 2, 4]);
  });

  it('hide: low ones are not listed, submission does not ask for them, and they wait for the lead in Reconcile', async () => {
    await db('studies').where({ id: study.studyId }).update({ low_reproducibility: 'hide', reproducibility_threshold: 0.8 });
    const desk = await loadDeskComponents({ user: rater(), runId: run.runId });
    expect(desk.components.map((c) => c.idx)).toEqual([1, 3, 5, 6]);
    expect(desk.run).toMatchObject({ k: 6, reproducibility: { threshold: 0.8, policy: 'hide', hidden: 2 } });
    for (const c of desk.components.slice(0, 3)) {
      await saveVote({ user: rater(), runId: run.runId, componentId: c.id, change: { label: 'signal', baseVersion: 0 } });
    }
    await expect(submitRun({ user: rater(), runId: run.runId })).rejects.toThrow(/1 of 6 components are not labelled yet \(6\)/);
    await saveVote({
      user: rater(),
      runId: run.runId,
      componentId: desk.components[3]!.id,
      change: { label: 'noise', noiseKind: 'motion', baseVersion: 0 },
    });
    const submitted = await submitRun({ user: rater(), runId: run.runId });
    expect(submitted.submittedAt).toBeTruthy();
    const pending = await listReconcileItems({ studyId: study.studyId, runId: run.runId, include: 'pending' });
    expect(pending.map((p) => p.idx)).toEqual([2, 4]);
    expect(pending.every((p) => p.votes.length === 0)).toBe(true);
  });
});
