/**
 * The desk's series payload route against the real MariaDB (issue 14: "precomputed spectra/time
 * courses for the whole run in one typed-array payload"): GET /api/runs/:id/series for the
 * assigned rater. Checks who may read it, the headers (binary, revalidated with an ETag and 304),
 * that it carries the same time courses and spectra as the components API (at float32, the
 * precision stored; IEEE 754 single rounding via Math.fround), and that it follows the study's
 * reproducibility rule: components hidden from raters are not in it, and a change of rule changes
 * its ETag.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-desk-series-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { decodeSeries } = await import('@/lib/desk/series-payload');
const seriesRoute = await import('@/app/api/runs/[id]/series/route');
const componentsRoute = await import('@/app/api/runs/[id]/components/route');

let users: Record<string, number>;
let studyId: number;
let run: Awaited<ReturnType<typeof createReadyRun>>;
const RATER = () => users['rater1@fernhollow.example'];
const OTHER_RATER = () => users['rater2@fernhollow.example'];
const LEAD = () => users['lead@fernhollow.example'];

const get = (headers: Record<string, string> = {}) =>
  callRoute(seriesRoute.GET, { url: `/api/runs/${run.runId}/series?d=${run.decompositionId}`, params: { id: String(run.runId) }, headers });

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  studyId = seeded.studyId;
  run = await createReadyRun(db, { studyId, createdBy: LEAD(), raterIds: [RATER()], size: 'tiny', seed: 11, sub: 'ds' });
});

afterAll(async () => {
  await db('studies').where({ id: studyId }).update({ low_reproducibility: 'flag' });
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('desk series payload route', () => {
  it('gives the assigned rater every component’s series as binary, the same as the components API', async () => {
    actAs(RATER());
    const res = await get();
    expect(res.status).toBe(200);
    expect(res.res.headers.get('content-type')).toBe('application/octet-stream');
    expect(res.res.headers.get('cache-control')).toBe('private, no-cache');
    const payload = decodeSeries(new Uint8Array(await res.res.arrayBuffer()));
    const api = await callRoute(componentsRoute.GET, { url: `/api/runs/${run.runId}/components`, params: { id: String(run.runId) } });
    expect(api.status).toBe(200);
    const components = api.json.components as Array<{ id: number; timecourse: number[]; spectrum: number[]; frequencies: number[] }>;
    expect(payload.count).toBe(components.length);
    expect(components.length).toBe(run.k);
    for (const c of components) {
      const got = payload.of(c.id)!;
      expect(got.timecourse.length).toBeGreaterThan(10);
      expect(got.timecourse).toEqual(c.timecourse.map(Math.fround));
      expect(got.spectrum).toEqual(c.spectrum.map(Math.fround));
      expect(got.frequencies).toEqual(c.frequencies.map(Math.fround));
    }
  });

  it('answers 304 to the same ETag', async () => {
    actAs(RATER());
    const etag = (await get()).res.headers.get('etag')!;
    expect(etag).toMatch(new RegExp(`^"d${run.decompositionId}-series-`));
    const again = await get({ 'if-none-match': etag });
    expect(again.status).toBe(304);
  });

  it('is refused to a rater not assigned to the run (404, as for any run not theirs) and to a lead (no rating right)', async () => {
    actAs(OTHER_RATER());
    const other = await get();
    expect(other.status).toBe(404);
    expect(other.json.error.message).toMatch(/not among the runs assigned to you/);
    actAs(LEAD());
    expect((await get()).status).toBe(403);
  });

  it('leaves out the components the study hides from raters, under another ETag', async () => {
    actAs(RATER());
    const before = (await get()).res.headers.get('etag');
    const comps = await db('components').where({ decomposition_id: run.decompositionId }).orderBy('idx').select('id', 'features');
    const low = comps[1]!;
    const features = { ...(typeof low.features === 'string' ? JSON.parse(low.features) : low.features), reproducibility: 0.1 };
    await db('components')
      .where({ id: low.id })
      .update({ features: JSON.stringify(features) });
    await db('studies').where({ id: studyId }).update({ low_reproducibility: 'hide', reproducibility_threshold: 0.5 });
    const res = await get();
    expect(res.status).toBe(200);
    expect(res.res.headers.get('etag')).not.toBe(before);
    const payload = decodeSeries(new Uint8Array(await res.res.arrayBuffer()));
    expect(payload.of(low.id)).toBeNull();
    expect(payload.of(comps[0]!.id)).not.toBeNull();
    expect(payload.count).toBe(
      comps.filter(
        (c) => c.id !== low.id && !((typeof c.features === 'string' ? JSON.parse(c.features) : c.features).reproducibility < 0.5),
      ).length,
    );
  });
});
