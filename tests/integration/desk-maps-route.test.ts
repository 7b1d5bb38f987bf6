/**
 * The desk's map payload routes against the real MariaDB and real NIfTI files (issue 14):
 * GET /api/runs/:id/maps/:part for the assigned rater, GET /api/runs/:id/view/maps/:part for the
 * study's leads and observers, GET /api/reconcile/runs/:runId/maps/:part for its leads (Reconcile). Checks who may read them, the headers (binary, not compressed on the
 * fly, private cache, ETag and 304), the bounds of a range, and that the maps decode to the stored
 * components.nii.gz (read with the project's NIfTI reader, checked against nibabel in
 * nifti-reader.test.ts) within the 16-bit quantisation bound max|z| / 65534 (half a step of 65535
 * levels; common practice, no source). The payload file is made when the decomposition is stored
 * and remade on request when it is missing.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-desk-maps-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { readNiftiFile } = await import('@/lib/nifti');
const { pathFor } = await import('@/lib/storage');
const { deskMapsKey } = await import('@/lib/desk/map-store');
const { decodeLayout, decodeMaps, expandMap } = await import('@/lib/desk/map-payload');
const deskRoute = await import('@/app/api/runs/[id]/maps/[part]/route');
const viewRoute = await import('@/app/api/runs/[id]/view/maps/[part]/route');
const reconcileRoute = await import('@/app/api/reconcile/runs/[runId]/maps/[part]/route');

let users: Record<string, number>;
let run: Awaited<ReturnType<typeof createReadyRun>>;
let componentsKey: string;
const RATER = () => users['rater1@fernhollow.example'];
const OTHER_RATER = () => users['rater2@fernhollow.example'];
const LEAD = () => users['lead@fernhollow.example'];
const OBSERVER = () => users['observer@fernhollow.example'];

const get = (route: typeof deskRoute, part: string, headers: Record<string, string> = {}) =>
  callRoute(route.GET, {
    url: `/api/runs/${run.runId}/maps/${part}?d=${run.decompositionId}`,
    params: { id: String(run.runId), part },
    headers,
  });
const bytesOf = async (res: Response) => new Uint8Array(await res.arrayBuffer());

beforeAll(async () => {
  const seeded = await seedDemo(db);
  users = seeded.users;
  run = await createReadyRun(db, { studyId: seeded.studyId, createdBy: LEAD(), raterIds: [RATER()], size: 'tiny', seed: 9, sub: 'dm' });
  componentsKey = (await db('decompositions').where({ id: run.decompositionId }).first('components_key')).components_key;
});

afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('desk map payload routes', () => {
  it('the assigned rater gets the layout and maps as binary with cache headers; they decode to the stored NIfTI maps', async () => {
    actAs(RATER());
    const layoutRes = await get(deskRoute, 'layout');
    expect(layoutRes.status).toBe(200);
    expect(layoutRes.res.headers.get('content-type')).toBe('application/octet-stream'); // not in the compressible types: no gzip on the fly
    expect(layoutRes.res.headers.get('cache-control')).toBe('private, max-age=86400');
    expect(layoutRes.res.headers.get('etag')).toBe(`"d${run.decompositionId}-maps-layout"`);
    const layout = decodeLayout(await bytesOf(layoutRes.res));
    const stored = await readNiftiFile(pathFor(componentsKey));
    expect(layout.k).toBe(run.k);
    expect(layout.dims).toEqual([stored.nx, stored.ny, stored.nz]);

    const last = Math.min(run.k, 16);
    const mapsRes = await get(deskRoute, `1-${last}`);
    expect(mapsRes.status).toBe(200);
    const body = await bytesOf(mapsRes.res);
    expect(mapsRes.res.headers.get('content-length')).toBe(String(body.byteLength));
    const maps = decodeMaps(body);
    expect([maps.from, maps.count]).toEqual([1, last]);
    for (let c = 0; c < last; c++) {
      const original = stored.readVolume(c);
      const back = expandMap(layout, maps, c);
      let max = 0;
      for (const v of original) max = Math.max(max, Math.abs(v));
      let worst = 0;
      for (let i = 0; i < original.length; i++) worst = Math.max(worst, Math.abs(back[i]! - original[i]!));
      expect(worst, `map ${c + 1}`).toBeLessThanOrEqual(max / 65534 + max * 1e-6);
    }
    // a later single map is the same as within the range
    const one = decodeMaps(await bytesOf((await get(deskRoute, `${last}-${last}`)).res));
    expect(Array.from(expandMap(layout, one, 0))).toEqual(Array.from(expandMap(layout, maps, last - 1)));
  });

  it('answers 304 to a browser that holds the same part', async () => {
    actAs(RATER());
    const etag = (await get(deskRoute, '1-1')).res.headers.get('etag')!;
    const again = await get(deskRoute, '1-1', { 'if-none-match': etag });
    expect(again.status).toBe(304);
    expect(await again.res.arrayBuffer()).toHaveProperty('byteLength', 0);
  });

  it('refuses ranges it does not serve with a clear message', async () => {
    actAs(RATER());
    for (const part of ['0-1', '1-0x', 'all', '1-2-3', `${'9'.repeat(20)}`]) {
      const r = await get(deskRoute, part);
      expect(r.status, part).toBe(422);
      expect(r.json.error.message, part).toMatch(/or a component range such as 1-8|16/);
    }
    const backwards = await get(deskRoute, '3-2');
    expect(backwards.status).toBe(422);
    expect(backwards.json.error.message).toMatch(/1 to 16 components/);
    expect((await get(deskRoute, '1-17')).status).toBe(422);
    const beyond = await get(deskRoute, `${run.k + 1}-${run.k + 1}`);
    expect(beyond.status).toBe(404);
    expect(beyond.json.error.message).toContain(`has ${run.k} components`);
  });

  it('keeps the access rules: the assigned rater on the desk route; leads and observers on the view route; leads on Reconcile', async () => {
    const reconcile = (part: string) =>
      callRoute(reconcileRoute.GET, {
        url: `/api/reconcile/runs/${run.runId}/maps/${part}?d=${run.decompositionId}`,
        params: { runId: String(run.runId), part },
      });
    for (const [who, desk, view, rec] of [
      [RATER(), 200, 404, 403],
      [OTHER_RATER(), 404, 404, 403],
      [LEAD(), 403, 200, 200],
      [OBSERVER(), 403, 200, 403],
      [null, 401, 401, 401],
    ] as const) {
      actAs(who);
      expect((await get(deskRoute, 'layout')).status, `desk route as ${who}`).toBe(desk);
      expect((await get(viewRoute, '1-1')).status, `view route as ${who}`).toBe(view);
      expect((await reconcile('1-1')).status, `reconcile route as ${who}`).toBe(rec);
    }
    // the lead's Reconcile payload is the rater's: same bytes for the same part
    actAs(RATER());
    const fromDesk = await bytesOf((await get(deskRoute, '1-2')).res);
    actAs(LEAD());
    expect(await bytesOf((await reconcile('1-2')).res)).toEqual(fromDesk);
  });

  it('remakes a missing payload file from the stored NIfTI maps, byte for byte', async () => {
    actAs(RATER());
    const before = await bytesOf((await get(deskRoute, '1-1')).res);
    await rm(pathFor(deskMapsKey(componentsKey)));
    const after = await get(deskRoute, '1-1');
    expect(after.status).toBe(200);
    expect(await bytesOf(after.res)).toEqual(before);
    expect((await stat(pathFor(deskMapsKey(componentsKey)))).size).toBeGreaterThan(before.byteLength);
  });

  it('says the maps are missing from storage (404, no internals) when the components file is gone', async () => {
    actAs(RATER());
    const moved = `${pathFor(componentsKey)}.away`;
    const { rename } = await import('node:fs/promises');
    await rm(pathFor(deskMapsKey(componentsKey)));
    await rename(pathFor(componentsKey), moved);
    try {
      const r = await get(deskRoute, 'layout');
      expect(r.status).toBe(404);
      expect(r.json.error.message).toMatch(/missing from storage/);
      expect(r.json.error.message).not.toContain(uploads);
    } finally {
      await rename(moved, pathFor(componentsKey));
    }
  });
});
