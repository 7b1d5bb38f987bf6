import 'server-only';
/**
 * Uploads of runs, brain masks and motion tables (one file per request, raw body). Each function
 * checks that the caller may change the study or run (in the query's WHERE clause), validates the
 * name and the content, moves the temporary file to a server-generated storage key and only then
 * writes the row. A refusal leaves no file and no row behind.
 */
import { createWriteStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { assertFourD, assertSameGrid, readNiftiHeaderFile, type NiftiHeader } from '@/lib/nifti';
import { MotionFileError, parseMotionFile } from '@/lib/decomposition/motion';
import { moveIntoStore, newKey, pathFor, removeKey, tempPath } from '@/lib/storage';
import { bidsName } from '@/lib/bids';
import { AppError, forbidden, notFound } from '@/lib/errors';
import { studyWithAccess } from '@/lib/studies/study-with-access';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { findManagedRun, findRunBySha, type RunListItem, type RunRecord } from '@/lib/db/queries/runs';
import { listRunsForStudy } from './list-study-runs';
import { recordAudit } from '@/lib/db/queries/audit';
import { findRunStudyId, insertRun, setRunMask, setRunMotion } from '@/lib/db/queries/run-changes';
import { inTransaction, type Trx } from '@/lib/db/transaction';
import type { UserRow } from '@/lib/db/queries/users';
import { asRefusal, interrupted, receiveNifti, tooLarge } from './receive';
import { queueDecomposition } from './queue-job';
import { MAX_MOTION_BYTES, MOTION_ORDER_COLUMNS, maxUploadBytes, type RunUploadQuery } from './schema';

type Actor = Pick<UserRow, 'id' | 'role'>;
export type RawBody = { body: ReadableStream<Uint8Array> | null; contentLength: number | null; signal?: AbortSignal };

/** The Content-Length of a request as a number, or null. */
export function contentLengthOf(req: Request): number | null {
  const v = req.headers.get('content-length');
  if (v === null || v === '') return null;
  const n = Number(v);
  return Number.isFinite(n) && n >= 0 ? n : null;
}

/** The study when the user may upload to it; otherwise 403 (a member without the lead study role) or 404. */
async function studyForUpload(user: Actor, studyId: number) {
  const access = await studyWithAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!access.canManage) throw forbidden('uploading to this study: only its leads and the facility admin may');
  return access.study;
}

/** A run the user may change; otherwise 403 (they can see it) or 404. */
export async function runForChange(user: Actor, runId: number, trx?: Trx): Promise<RunRecord> {
  const run = await findManagedRun({ user, runId }, trx);
  if (run) return run;
  const studyId = await findRunStudyId({ runId });
  if (studyId !== null && (await findStudyAccess({ user, studyId }))) {
    throw forbidden("changing this run: only the study's leads and the facility admin may");
  }
  throw notFound('The run');
}

function refuseDuplicate(existing: RunRecord): never {
  throw new AppError(
    'conflict',
    `This exact file is already in the study as run #${existing.id} ${bidsName(existing)} (uploaded as ${existing.originalName}). ` +
      'Nothing was added. Delete that run first if you mean to replace it.',
  );
}

/** Enough volumes: more than drop_volumes + 10, so at least 10 remain after the initial ones are dropped. */
function checkRunHeader(header: NiftiHeader, dropVolumes: number) {
  assertFourD(header, 2);
  const nt = header.dims[3];
  const need = dropVolumes + 11;
  if (nt < need) {
    throw new AppError(
      'validation',
      `The run has too few volumes: ${nt}. This study drops the first ${dropVolumes} and needs more than 10 after that, so at least ${need}. ` +
        'Upload a longer run, or lower "initial volumes to drop" in the study settings.',
      { file: ['Too few volumes.'] },
    );
  }
}

/** POST /api/studies/:id/runs — a new run from one NIfTI file. Returns the run as a table row. */
export async function uploadRun({
  user,
  studyId,
  query,
  raw,
}: {
  user: Actor;
  studyId: number;
  query: RunUploadQuery;
  raw: RawBody;
}): Promise<RunListItem> {
  const study = await studyForUpload(user, studyId);
  const received = await receiveNifti(raw.body, {
    maxBytes: maxUploadBytes(),
    contentLength: raw.contentLength,
    signal: raw.signal,
    what: 'run',
    checkHeader: (h) => checkRunHeader(h, study.dropVolumes),
  });
  const key = newKey('runs', received.gzip ? '.nii.gz' : '.nii');
  let moved = false;
  try {
    const existing = await findRunBySha({ studyId, sha256: received.sha256 });
    if (existing) refuseDuplicate(existing);
    if (raw.signal?.aborted) throw interrupted();
    const h = received.header;
    const runId = await inTransaction(async (trx) => {
      const id = await insertRun(trx, {
        studyId,
        sub: query.sub,
        ses: query.ses || null,
        task: query.task || null,
        acq: query.acq || null,
        runLabel: query.run || null,
        originalName: query.name,
        fileKey: key,
        sha256: received.sha256,
        sizeBytes: received.sizeBytes,
        dims: h.dims.slice(0, 4),
        voxelSize: h.pixdim.slice(1, 4).map((v) => Math.abs(v)),
        trSeconds: h.trSeconds,
        volumes: h.dims[3],
        datatype: h.datatype,
        createdBy: user.id,
      });
      await recordAudit(
        {
          actorId: user.id,
          action: 'run.upload',
          targetType: 'run',
          targetId: id,
          studyId,
          detail: { name: query.name, sha256: received.sha256, bytes: received.sizeBytes },
        },
        trx,
      );
      if (query.queue) await queueDecomposition(trx, { runId: id, createdBy: user.id });
      // the file goes into storage only once its row is written, inside the same transaction: a
      // failed move rolls the row back, a failed commit removes the file (catch below)
      await moveIntoStore(received.tempFile, key);
      moved = true;
      return id;
    });
    const [row] = await listRunsForStudy({ user, studyId, runId });
    return row;
  } catch (err) {
    await rm(received.tempFile, { force: true });
    if (moved) await removeKey(key);
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY') {
      const existing = await findRunBySha({ studyId, sha256: received.sha256 });
      if (existing) refuseDuplicate(existing);
    }
    throw err;
  }
}

/** Attachments may change only before decomposition starts (or after it ends): not while queued or processing. */
function assertAttachable(run: RunRecord, what: string) {
  if (run.status === 'queued' || run.status === 'processing') {
    throw new AppError('conflict', `The run is ${run.status}; cancel its decomposition before changing the ${what}.`);
  }
}

/** PUT /api/runs/:id/mask — a brain mask on the run's grid (3D, same dimensions and affine). */
export async function attachMask({
  user,
  runId,
  name,
  raw,
}: {
  user: Actor;
  runId: number;
  name: string;
  raw: RawBody;
}): Promise<{ maskName: string }> {
  const run = await runForChange(user, runId);
  assertAttachable(run, 'mask');
  const runHeader = await readNiftiHeaderFile(pathFor(run.fileKey));
  const received = await receiveNifti(raw.body, {
    maxBytes: maxUploadBytes(),
    contentLength: raw.contentLength,
    signal: raw.signal,
    what: 'mask',
    checkHeader: (h) => {
      if (h.dims.length >= 4 && h.dims.slice(3).some((d) => d > 1)) {
        throw new AppError(
          'validation',
          `The mask has ${h.dims[3]} volumes; a brain mask is one 3D volume (non-zero inside the brain). Upload a 3D mask.`,
          { file: ['Not 3D.'] },
        );
      }
      try {
        assertSameGrid(runHeader, h);
      } catch (err) {
        throw asRefusal(err);
      }
    },
  });
  const key = newKey('masks', received.gzip ? '.nii.gz' : '.nii');
  try {
    await moveIntoStore(received.tempFile, key);
    await inTransaction(async (trx) => {
      await setRunMask(trx, { runId, maskKey: key });
      await recordAudit(
        { actorId: user.id, action: 'run.mask', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { name } },
        trx,
      );
    });
  } catch (err) {
    await rm(received.tempFile, { force: true });
    await removeKey(key);
    throw err;
  }
  await removeKey(run.maskKey).catch(() => undefined);
  return { maskName: name };
}

/** Reads a small text body (motion table) into a string, refusing more than `maxBytes`. */
async function readSmallText(raw: RawBody, maxBytes: number): Promise<string> {
  if (raw.contentLength !== null && raw.contentLength > maxBytes) throw tooLarge(maxBytes, raw.contentLength);
  if (!raw.body || raw.contentLength === 0)
    throw new AppError('bad_request', 'The request holds no file. Send the motion table as the request body.');
  const reader = raw.body.getReader();
  const parts: Buffer[] = [];
  let total = 0;
  try {
    for (;;) {
      let chunk: ReadableStreamReadResult<Uint8Array>;
      try {
        chunk = await reader.read();
      } catch {
        throw interrupted();
      }
      if (chunk.done) break;
      total += chunk.value.byteLength;
      if (total > maxBytes) {
        await reader.cancel().catch(() => undefined);
        throw tooLarge(maxBytes);
      }
      parts.push(Buffer.from(chunk.value));
    }
  } finally {
    reader.releaseLock();
  }
  if (raw.signal?.aborted || (raw.contentLength !== null && total < raw.contentLength)) throw interrupted();
  const buf = Buffer.concat(parts);
  if (buf.includes(0))
    throw new AppError(
      'validation',
      'The motion file is not text (it holds binary bytes). Upload a plain-text table with 6 numbers per row.',
      { file: ['Not text.'] },
    );
  return buf.toString('utf8');
}

/** PUT /api/runs/:id/motion — a T × 6 motion table with the stated column order and rotation units. */
export async function attachMotion({
  user,
  runId,
  query,
  raw,
}: {
  user: Actor;
  runId: number;
  query: { name: string; order: 'trans-first' | 'rot-first'; units: 'radians' | 'degrees' };
  raw: RawBody;
}): Promise<{ motionName: string; rows: number }> {
  const run = await runForChange(user, runId);
  assertAttachable(run, 'motion file');
  const text = await readSmallText(raw, MAX_MOTION_BYTES);
  try {
    parseMotionFile(text, { order: query.order, rotationUnits: query.units, expectedRows: run.volumes ?? undefined });
  } catch (err) {
    if (err instanceof MotionFileError) throw new AppError('validation', err.message, { file: [err.message] });
    throw err;
  }
  const temp = await tempPath('.tsv');
  const key = newKey('motion', '.tsv');
  try {
    await new Promise<void>((resolve, reject) => {
      const w = createWriteStream(temp);
      w.once('error', reject);
      w.end(text, () => resolve());
    });
    await moveIntoStore(temp, key);
    await inTransaction(async (trx) => {
      await setRunMotion(trx, { runId, motionKey: key, order: MOTION_ORDER_COLUMNS[query.order], units: query.units });
      await recordAudit(
        {
          actorId: user.id,
          action: 'run.motion',
          targetType: 'run',
          targetId: runId,
          studyId: run.studyId,
          detail: { name: query.name, order: query.order, units: query.units },
        },
        trx,
      );
    });
  } catch (err) {
    await rm(temp, { force: true });
    await removeKey(key);
    throw err;
  }
  await removeKey(run.motionKey).catch(() => undefined);
  return { motionName: query.name, rows: run.volumes ?? 0 };
}
