/**
 * Uploads against the real MariaDB and a temporary storage root: a good run becomes a row with its
 * job queued; every file of the bad-upload corpus (tests/fixtures/uploads, made by make-corpus.ts)
 * is refused with a 4xx AppError whose message says what is wrong, and leaves no file and no row.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';

/** Each run file moved into storage, and whether its row already existed (uncommitted) at that moment. */
const moves = vi.hoisted(() => ({ seen: [] as { key: string; rowWritten: boolean }[] }));
vi.mock('@/lib/storage', async (importOriginal) => {
  const real = await importOriginal<typeof import('@/lib/storage')>();
  return {
    ...real,
    async moveIntoStore(tempFile: string, key: string) {
      if (key.startsWith('runs/')) {
        const { db: conn } = await import('@/lib/db/knex');
        const row = await conn.transaction((t) => t('runs').where({ file_key: key }).first('id'), { isolationLevel: 'read uncommitted' });
        moves.seen.push({ key, rowWritten: Boolean(row) });
      }
      return real.moveIntoStore(tempFile, key);
    },
  };
});
import { readFileSync } from 'node:fs';
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import { db } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { createStudy } from '@/lib/studies/create-study';
import { STUDY_DEFAULTS } from '@/lib/studies/schema';
import { attachMask, attachMotion, uploadRun, type RawBody } from '@/lib/runs/upload';
import { queueRun } from '@/lib/runs/actions';
import { runUploadQuerySchema } from '@/lib/runs/schema';
import { createUser, useTempUploads } from './helpers/factories';

const FIXTURES = path.resolve('tests/fixtures/uploads');
const fixture = (name: string) => readFileSync(path.join(FIXTURES, name));

/** A request body as the browser sends it: the bytes in chunks, with or without Content-Length. */
function rawBody(bytes: Uint8Array, opts: { chunk?: number; length?: boolean; failAfter?: number } = {}): RawBody {
  const chunk = opts.chunk ?? 64;
  let offset = 0;
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (opts.failAfter !== undefined && offset >= opts.failAfter) {
        controller.error(new Error('aborted'));
        return;
      }
      if (offset >= bytes.length) {
        controller.close();
        return;
      }
      controller.enqueue(bytes.subarray(offset, offset + chunk));
      offset += chunk;
    },
  });
  return { body, contentLength: opts.length === false ? null : bytes.length };
}

async function filesUnder(dir: string): Promise<string[]> {
  const out: string[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true, recursive: true }).catch(() => [])) {
    if (entry.isFile()) out.push(path.join(entry.parentPath, entry.name));
  }
  return out;
}

let uploads: Awaited<ReturnType<typeof useTempUploads>>;
let lead: { id: number; role: 'lead' };
let studyId: number;

const query = (name: string, extra: Record<string, string> = {}) =>
  runUploadQuerySchema.parse({ name, sub: '07', ses: '2', task: 'rest', run: '1', ...extra });

/** Expects an AppError with a 4xx status and a message matching `pattern`; returns it. */
async function refused(promise: Promise<unknown>, status: number, pattern: RegExp): Promise<AppError> {
  const err = await promise.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err, 'the upload should have been refused').toBeInstanceOf(AppError);
  const app = err as AppError;
  expect(app.status, app.message).toBe(status);
  expect(app.message).toMatch(pattern);
  return app;
}

beforeAll(async () => {
  uploads = await useTempUploads();
  lead = { id: await createUser(db, { role: 'lead' }), role: 'lead' };
  studyId = await createStudy({ user: lead, values: { ...STUDY_DEFAULTS, name: `Uploads ${Date.now()}`, dropVolumes: 4 } });
});

afterAll(async () => {
  await uploads.cleanup();
  await db.destroy();
});

describe('a good upload', () => {
  it('becomes a run row with entities, geometry and sha256, and its decompose job is queued', async () => {
    const bytes = fixture('good-run.nii.gz');
    const run = await uploadRun({
      user: lead,
      studyId,
      query: query('sub-07_ses-2_task-rest_run-1_bold.nii.gz', { queue: 'true' }),
      raw: rawBody(bytes),
    });
    expect(run).toMatchObject({
      sub: '07',
      ses: '2',
      task: 'rest',
      runLabel: '1',
      volumes: 40,
      trSeconds: 2,
      status: 'queued',
      dims: [6, 5, 4, 40],
    });
    expect(run.job).toMatchObject({ status: 'queued', stage: 'queued' });
    const row = await db('runs').where({ id: run.id }).first();
    expect(row.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(row.file_key).toMatch(/^runs\/\d{4}-\d{2}\/[0-9a-f-]+\.nii\.gz$/);
    expect(row.original_name).toBe('sub-07_ses-2_task-rest_run-1_bold.nii.gz');
    expect(readFileSync(path.join(uploads.dir, row.file_key)).equals(bytes)).toBe(true);
    const jobs = await db('jobs').where({ run_id: run.id });
    expect(jobs).toHaveLength(1);
    expect(jobs[0]).toMatchObject({ kind: 'decompose', status: 'queued', study_id: studyId, created_by: lead.id });
    expect(await filesUnder(path.join(uploads.dir, 'tmp'))).toEqual([]);
    // the file went into storage only after its row was written (issue 13 item 10)
    expect(moves.seen.find((m) => m.key === row.file_key)).toEqual({ key: row.file_key, rowWritten: true });
  });

  it('takes a mask on the grid and a motion table, then queues on request', async () => {
    const run = await uploadRun({
      user: lead,
      studyId,
      query: query('sub-08_task-rest_bold.nii', { sub: '08' }),
      raw: rawBody(fixture('good-run-b.nii'), { length: false, chunk: 1000 }),
    });
    expect(run.status).toBe('uploaded');
    await attachMask({ user: lead, runId: run.id, name: 'sub-08_mask.nii.gz', raw: rawBody(fixture('good-mask.nii.gz')) });
    await attachMotion({
      user: lead,
      runId: run.id,
      query: { name: 'sub-08_motion.tsv', order: 'trans-first', units: 'radians' },
      raw: rawBody(fixture('good-motion.tsv')),
    });
    const row = await db('runs').where({ id: run.id }).first();
    expect(row.mask_key).toMatch(/^masks\//);
    expect(row.motion_key).toMatch(/^motion\//);
    expect(row).toMatchObject({ motion_order: 'tx,ty,tz,rx,ry,rz', motion_rotation_units: 'radians' });
    const queued = await queueRun({ user: lead, runId: run.id });
    expect(queued.status).toBe('queued');
    expect(queued).toMatchObject({ hasMask: true, hasMotion: true });
  });
});

describe('the bad-upload corpus', () => {
  let before: { runs: number; files: string[] };
  beforeEach(async () => {
    before = { runs: Number((await db('runs').count({ n: '*' }))[0].n), files: await filesUnder(uploads.dir) };
  });
  async function nothingLeft() {
    expect(Number((await db('runs').count({ n: '*' }))[0].n)).toBe(before.runs);
    expect(await filesUnder(uploads.dir)).toEqual(before.files);
  }
  const upload = (file: string, name = 'sub-09_task-rest_bold.nii.gz', opts: Parameters<typeof rawBody>[1] & { bytes?: Buffer } = {}) =>
    uploadRun({ user: lead, studyId, query: query(name, { sub: '09' }), raw: rawBody(opts.bytes ?? fixture(file), opts) });

  it('refuses a file that is not NIfTI (plain and gzip)', async () => {
    await refused(upload('not-nifti.nii', 'sub-09_task-rest_bold.nii'), 422, /not a NIfTI file/);
    await refused(upload('not-nifti.nii.gz'), 422, /not a NIfTI file/);
    await nothingLeft();
  });

  it('refuses a .gz holding far more than its header describes, without inflating the rest (issue 13 item 10)', async () => {
    // a small valid header and data, then 64 MiB of zeros: about 64 KiB compressed
    const raw = gunzipSync(fixture('good-run.nii.gz'));
    const bomb = gzipSync(Buffer.concat([raw, Buffer.alloc(64 * 1024 * 1024)]), { level: 1 });
    expect(bomb.length).toBeLessThan(1024 * 1024);
    const err = await refused(
      upload('x', undefined, { bytes: bomb, chunk: 16 * 1024 }),
      422,
      /holds more data than its header describes \(6 × 5 × 4 × 40 int16/,
    );
    expect(err.fields).toBeDefined();
    await nothingLeft();
  });

  it('refuses an image whose header implies more than the limit before inflating it (413)', async () => {
    const raw = gunzipSync(fixture('good-run.nii.gz'));
    const header = Buffer.from(raw);
    header.writeInt16LE(30000, 48); // dim[4]: 30000 volumes, 7.2 MB of int16 implied; the data stays small
    const saved = process.env.QUORUM_MAX_IMAGE_MB;
    process.env.QUORUM_MAX_IMAGE_MB = '1';
    try {
      await refused(
        upload('x', undefined, { bytes: gzipSync(header) }),
        413,
        /larger than this facility's limit of 1(\.0)? MB: its header describes a 6 × 5 × 4 × 30000 int16 image/,
      );
    } finally {
      if (saved === undefined) delete process.env.QUORUM_MAX_IMAGE_MB;
      else process.env.QUORUM_MAX_IMAGE_MB = saved;
    }
    await nothingLeft();
  });

  it('refuses truncated files by counting the (decompressed) data', async () => {
    const gz = await refused(upload('truncated.nii.gz'), 422, /^The file is truncated: /);
    expect(gz.message).toMatch(/6 × 5 × 4 × 40 int16/);
    await refused(upload('truncated.nii', 'sub-09_task-rest_bold.nii'), 422, /^The file is truncated: .*only \d+ bytes arrived/);
    await nothingLeft();
  });

  it('refuses a 3D image and a run with too few volumes for the study', async () => {
    await refused(upload('three-d.nii.gz'), 422, /The image is 3D/);
    await refused(upload('few-volumes.nii.gz'), 422, /too few volumes: 8\. This study drops the first 4 .* at least 15/);
    await nothingLeft();
  });

  it('refuses a file over the size limit (Content-Length, and while streaming without it)', async () => {
    const previous = process.env.QUORUM_MAX_UPLOAD_MB;
    process.env.QUORUM_MAX_UPLOAD_MB = String(2000 / (1024 * 1024)); // 2000 bytes
    try {
      await refused(upload('good-run-b.nii', 'sub-09_task-rest_bold.nii'), 413, /larger than this facility's upload limit/);
      await refused(upload('good-run-b.nii', 'sub-09_task-rest_bold.nii', { length: false }), 413, /QUORUM_MAX_UPLOAD_MB/);
    } finally {
      if (previous === undefined) delete process.env.QUORUM_MAX_UPLOAD_MB;
      else process.env.QUORUM_MAX_UPLOAD_MB = previous;
    }
    await nothingLeft();
  });

  it('refuses an exact duplicate in the same study, naming the existing run', async () => {
    await refused(
      upload('good-run.nii.gz'),
      409,
      /already in the study as run #\d+ sub-07_ses-2_task-rest_run-1 \(uploaded as sub-07_ses-2_task-rest_run-1_bold\.nii\.gz\)/,
    );
    // the same bytes one at a time (gzip detection and header across chunk borders) and without Content-Length
    await refused(upload('good-run.nii.gz', 'copy.nii.gz', { chunk: 1, length: false }), 409, /already in the study as run #\d+/);
    await nothingLeft();
  });

  it('refuses file names with path separators or odd characters before reading the body', () => {
    for (const name of [
      '../../etc/sub-01_bold.nii.gz',
      'sub-01\\bold.nii.gz',
      'sub 01 bold.nii.gz',
      'sub-01_bold\u0000.nii.gz',
      '.hidden.nii',
      'sub-01_bold.nii.gz;rm',
      'notes.txt',
    ]) {
      const result = runUploadQuerySchema.safeParse({ name, sub: '01' });
      expect(result.success, name).toBe(false);
      expect(result.error!.issues[0].message, name).toMatch(/path separator|characters other than|does not end in \.nii/);
    }
  });

  it('refuses an interrupted upload (the client goes away mid-body) and keeps nothing', async () => {
    const bytes = fixture('good-run-b.nii');
    await refused(upload('good-run-b.nii', 'sub-09_task-rest_bold.nii', { failAfter: 4096 }), 400, /interrupted/);
    // a body that simply ends early (Content-Length says more)
    await refused(
      uploadRun({
        user: lead,
        studyId,
        query: query('sub-09_task-rest_bold.nii', { sub: '09' }),
        raw: { ...rawBody(bytes.subarray(0, 5000)), contentLength: bytes.length },
      }),
      400,
      /interrupted/,
    );
    await nothingLeft();
  });

  it('refuses a mask on another grid and motion tables with the wrong shape', async () => {
    const [run] = await db('runs').where({ study_id: studyId, sub: '08' }).select('id');
    await db('runs').where({ id: run.id }).update({ status: 'ready' });
    const maskBefore = await db('runs').where({ id: run.id }).first('mask_key', 'motion_key');
    await refused(
      attachMask({ user: lead, runId: run.id, name: 'm.nii.gz', raw: rawBody(fixture('wrong-grid-mask.nii.gz')) }),
      422,
      /different grids: 6 × 5 × 4 voxels versus 7 × 5 × 4/,
    );
    await refused(
      attachMask({ user: lead, runId: run.id, name: 'm.nii.gz', raw: rawBody(fixture('good-run.nii.gz')) }),
      422,
      /a brain mask is one 3D volume/,
    );
    await refused(
      attachMotion({
        user: lead,
        runId: run.id,
        query: { name: 'm.tsv', order: 'rot-first', units: 'degrees' },
        raw: rawBody(fixture('wrong-motion-rows.tsv')),
      }),
      422,
      /has 39 rows but the run has 40 volumes/,
    );
    await refused(
      attachMotion({
        user: lead,
        runId: run.id,
        query: { name: 'm.tsv', order: 'rot-first', units: 'degrees' },
        raw: rawBody(fixture('wrong-motion-cols.tsv')),
      }),
      422,
      /has 5 columns, expected 6/,
    );
    expect(await db('runs').where({ id: run.id }).first('mask_key', 'motion_key')).toEqual(maskBefore);
    await nothingLeft();
  });
});
