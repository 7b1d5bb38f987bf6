/**
 * The structural underlay (issue 14): a study lead attaches one 3D image already on the run's grid;
 * it is stored gzipped under a server key and reaches the assigned rater's desk payload and file
 * route. Anything else — a 4D image, other dimensions, another voxel-to-world transform, a header
 * describing more than the limit, a caller who does not lead the study — is refused with a message
 * saying what differs and what to do, and leaves the run's underlay and storage as they were.
 * Real NIfTI files: the run and its mean image are the phantom's, written by the worker's own code.
 * "Same grid" = equal nx, ny, nz and equal voxel→world affine (NIfTI-1 standard, nifti1.h: dim[1..3],
 * srow_x/y/z); the tolerance of 1e-3 mm is the one the mask upload uses (common practice, no source).
 */
import { readFileSync } from 'node:fs';
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { pathFor } from '@/lib/storage';
import { attachStructural } from '@/lib/runs/attach-structural';
import type { RawBody } from '@/lib/runs/upload';
import { findRunFileKey } from '@/lib/runs/find-run-file';
import { loadDeskComponents } from '@/lib/runs/load-desk-components';
import { createReadyRun } from '../e2e/helpers/ready-run';
import { createStudyWithRaters, useTempUploads } from './helpers/factories';

function rawBody(bytes: Uint8Array): RawBody {
  let sent = false;
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent) return controller.close();
      sent = true;
      controller.enqueue(bytes);
    },
  });
  return { body, contentLength: bytes.length };
}

async function refused(p: Promise<unknown>, status: number, message: RegExp) {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(AppError);
  expect((err as AppError).status).toBe(status);
  expect((err as AppError).message).toMatch(message);
}

let uploads: Awaited<ReturnType<typeof useTempUploads>>;
let lead: { id: number; role: 'lead' };
let rater: { id: number; role: 'rater' };
let runId: number;
let meanGz: Buffer;

async function storedStructural() {
  const all = await readdir(path.join(uploads.dir, 'structural'), { recursive: true }).catch(() => [] as string[]);
  return all.filter((f) => f.endsWith('.nii.gz')).sort();
}

beforeAll(async () => {
  uploads = await useTempUploads();
  const s = await createStudyWithRaters(db, { raters: 1 });
  lead = { id: s.leadId, role: 'lead' };
  rater = { id: s.raterIds[0]!, role: 'rater' };
  const ready = await createReadyRun(db, {
    studyId: s.studyId,
    createdBy: s.leadId,
    raterIds: s.raterIds,
    size: 'tiny',
    seed: 11,
    components: 4,
  });
  runId = ready.runId;
  const d = await db('decompositions').where({ id: ready.decompositionId }).first('mean_key');
  // the run's mean image as the worker wrote it: a real 3D NIfTI on the run's grid
  meanGz = readFileSync(pathFor(d.mean_key));
});

afterAll(async () => {
  await uploads.cleanup();
});

describe('structural underlay upload', () => {
  it('takes a 3D image on the run grid from the lead and gives it to the rater desk', async () => {
    await expect(attachStructural({ user: lead, runId, name: 'sub-01_T1w_on-bold.nii.gz', raw: rawBody(meanGz) })).resolves.toEqual({
      structuralName: 'sub-01_T1w_on-bold.nii.gz',
    });
    const row = await db('runs').where({ id: runId }).first('structural_key', 'structural_name');
    expect(row.structural_key).toMatch(/^structural\/.+\.nii\.gz$/);
    expect(row.structural_name).toBe('sub-01_T1w_on-bold.nii.gz');
    expect(readFileSync(pathFor(row.structural_key)).equals(meanGz)).toBe(true);
    const audit = await db('audit_log').where({ action: 'run.structural', target_id: runId }).first('actor_id');
    expect(audit.actor_id).toBe(lead.id);

    const desk = await loadDeskComponents({ user: rater, runId });
    expect(desk.run.structural?.name).toBe('sub-01_T1w_on-bold.nii.gz');
    expect(desk.run.structural?.version).toMatch(/^[0-9a-f-]{8,16}$/);
    expect((await findRunFileKey({ user: rater, runId, file: 'structural.nii.gz' })).key).toBe(row.structural_key);
  });

  it('stores an uncompressed .nii gzipped, replacing the earlier one', async () => {
    const before = (await db('runs').where({ id: runId }).first('structural_key')).structural_key;
    await attachStructural({ user: lead, runId, name: 'plain.nii', raw: rawBody(gunzipSync(meanGz)) });
    const after = (await db('runs').where({ id: runId }).first('structural_key')).structural_key;
    expect(after).not.toBe(before);
    const stored = readFileSync(pathFor(after));
    expect([stored[0], stored[1]]).toEqual([0x1f, 0x8b]); // gzip magic (RFC 1952)
    expect(gunzipSync(stored).equals(gunzipSync(meanGz))).toBe(true);
    expect(await storedStructural()).toHaveLength(1); // the replaced file is gone
  });

  it('refuses other grids, 4D images, oversized headers and callers who do not lead the study, changing nothing', async () => {
    const before = await db('runs').where({ id: runId }).first('structural_key', 'structural_name');
    const filesBefore = await storedStructural();
    const mean = decodeNifti(new Uint8Array(meanGz));
    const [nx, ny, nz] = mean.header.dims;
    const vol = mean.readVolume(0);
    const affine = mean.header.affine.map((r) => [...r]);
    const pixdim = mean.header.pixdim.slice(1, 4);

    // another voxel-to-world transform: the same voxels shifted 2 mm along x
    const shifted = affine.map((r, i) => (i === 0 ? [r[0], r[1], r[2], r[3] + 2] : r));
    await refused(
      attachStructural({
        user: lead,
        runId,
        name: 's.nii',
        raw: rawBody(encodeNifti1({ dims: [nx, ny, nz], pixdim, affine: shifted, datatype: 'float32', data: vol })),
      }),
      422,
      /has the run's dimensions but another voxel-to-world transform \(largest difference 2\.00 mm\)\. Resample it to the run's grid/,
    );
    // other dimensions: one slice fewer
    await refused(
      attachStructural({
        user: lead,
        runId,
        name: 's.nii',
        raw: rawBody(
          encodeNifti1({ dims: [nx, ny, nz - 1], pixdim, affine, datatype: 'float32', data: vol.subarray(0, nx * ny * (nz - 1)) }),
        ),
      }),
      422,
      new RegExp(`is ${nx} × ${ny} × ${nz - 1} voxels; this run's grid is ${nx} × ${ny} × ${nz}\\. Resample`),
    );
    // a 4D image: the run itself
    const runKey = (await db('runs').where({ id: runId }).first('file_key')).file_key;
    await refused(
      attachStructural({ user: lead, runId, name: 'bold.nii.gz', raw: rawBody(readFileSync(pathFor(runKey))) }),
      422,
      /holds \d+ volumes; the underlay is one 3D volume/,
    );
    // a header that describes more than 64 MB (300 × 300 × 200 float32 = 72 MB), refused before the data are read
    const big = Buffer.from(encodeNifti1({ dims: [2, 2, 2], pixdim, affine, datatype: 'float32', data: new Float32Array(8) }));
    big.writeInt16LE(300, 42);
    big.writeInt16LE(300, 44);
    big.writeInt16LE(200, 46); // dim[1..3] at byte offsets 42, 44, 46 (nifti1.h)
    const bigErr = await attachStructural({ user: lead, runId, name: 'big.nii', raw: rawBody(big) }).catch((e: unknown) => e);
    expect(bigErr).toBeInstanceOf(AppError);
    expect([413, 422]).toContain((bigErr as AppError).status);
    expect((bigErr as AppError).message).toMatch(/64\.0 MB/);
    // a rater of the study may not change the run
    await refused(
      attachStructural({ user: rater, runId, name: 'r.nii.gz', raw: rawBody(meanGz) }),
      403,
      /only the study's leads and the facility admin/,
    );

    expect(await db('runs').where({ id: runId }).first('structural_key', 'structural_name')).toEqual(before);
    expect(await storedStructural()).toEqual(filesBefore);
  });
});
