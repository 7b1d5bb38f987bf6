/**
 * Test helper: creates a run that is ready for rating, the way the worker's `decompose` job does —
 * a synthetic phantom run is decomposed with lib/decomposition's decomposeRun and stored with the
 * worker's own code (lib/runs/ingest-decomposition: files, decomposition and component rows), then
 * assigned to the given raters (instead of the automatic assignment).
 * Used by the integration tests (imported) and the browser tests (through create-ready-run.ts).
 * It writes with its own knex instance so it runs outside Next.js.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Knex } from 'knex';
import { toJson } from '@/lib/db/knex';
import { decomposeRun } from '@/lib/decomposition/pipeline';
import { componentRows, decompositionSummary, storeDecomposition, writeDecompositionFiles } from '@/lib/runs/ingest-decomposition';
import { dropInitialVolumes, type MotionParams } from '@/lib/decomposition/motion';
import { generatePhantom, phantomToNiftiInput, type PhantomSize } from '@/lib/phantom';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { newKey, pathFor } from '@/lib/storage';

export type ReadyRunOptions = {
  studyId: number;
  raterIds: number[];
  createdBy: number;
  size?: PhantomSize;
  seed?: number;
  drop?: number;
  sub?: string;
  /** Fix the number of components (default: automatic). */
  components?: 'auto' | number;
  withMotion?: boolean;
  /** Per-component reproducibility (component order), as a decomposition with restarts reports it. */
  reproducibility?: number[];
  /** FastICA restarts (default: the engine's); 1 keeps set-up short for runs with many components. */
  restarts?: number;
};

export type ReadyRun = { runId: number; decompositionId: number; componentIds: number[]; k: number };

async function writeKey(key: string, bytes: Uint8Array): Promise<void> {
  const full = pathFor(key);
  await mkdir(path.dirname(full), { recursive: true });
  await writeFile(full, bytes);
}

export async function createReadyRun(db: Knex, opts: ReadyRunOptions): Promise<ReadyRun> {
  const size = opts.size ?? 'tiny';
  const seed = opts.seed ?? 7;
  const drop = opts.drop ?? 2;
  const p = generatePhantom({ size, seed });
  const [nx, ny, nz, nt] = p.dims;
  const boldBytes = encodeNifti1(phantomToNiftiInput(p));
  const image = decodeNifti(boldBytes);
  const result = await decomposeRun(
    { image },
    { drop, threads: 1, components: opts.components ?? 'auto', seed: 1, ...(opts.restarts ? { restarts: opts.restarts } : {}) },
  );
  if (opts.reproducibility) result.reproducibility = Float64Array.from({ length: result.k }, (_, c) => opts.reproducibility![c] ?? 1);

  const motionFull: MotionParams = { translations: p.motion.translations, rotations: p.motion.rotations };
  const motion = opts.withMotion === false ? undefined : dropInitialVolumes(motionFull, drop);

  // files, as the worker writes them
  const runKey = newKey('runs', '.nii.gz');
  await writeKey(runKey, boldBytes);
  let motionKey: string | null = null;
  if (motion) {
    motionKey = newKey('motion', '.tsv');
    const cols = [...motionFull.translations, ...motionFull.rotations];
    const lines = ['# trans_x\ttrans_y\ttrans_z\trot_x\trot_y\trot_z'];
    for (let t = 0; t < nt; t++) lines.push(cols.map((c) => c[t].toFixed(7)).join('\t'));
    await writeKey(motionKey, new TextEncoder().encode(lines.join('\n') + '\n'));
  }
  // the decomposition's files and rows exactly as the worker's decompose job writes them
  const files = await writeDecompositionFiles(result, image.header);
  const rows = componentRows(result, motion);

  return db.transaction(async (trx) => {
    const [runId] = await trx('runs').insert({
      study_id: opts.studyId,
      sub: opts.sub ?? `t${Date.now().toString(36)}${Math.floor(Math.random() * 1000)}`,
      ses: '1',
      task: 'rest',
      original_name: 'phantom_bold.nii.gz',
      file_key: runKey,
      sha256: `${Date.now().toString(16)}${Math.random().toString(16).slice(2)}`.padEnd(64, '0').slice(0, 64),
      size_bytes: boldBytes.byteLength,
      motion_key: motionKey,
      motion_order: motion ? 'tx,ty,tz,rx,ry,rz' : null,
      motion_rotation_units: motion ? 'radians' : null,
      dims: toJson([nx, ny, nz, nt]),
      voxel_size: toJson(p.voxelSize),
      tr_seconds: p.trSeconds,
      volumes: nt,
      datatype: 'float32',
      status: 'ready',
      created_by: opts.createdBy,
    });
    const decompositionId = await storeDecomposition(trx, {
      runId,
      parameters: {
        engine: 'quorum-decomposition',
        dropVolumes: drop,
        varianceNorm: true,
        dimMethodUsed: result.dimMethod,
        seedUsed: result.seed,
        contrast: result.contrast,
      },
      summary: decompositionSummary(result),
      files,
      components: rows,
    });
    const componentIds: number[] = await trx('components').where({ decomposition_id: decompositionId }).orderBy('idx').pluck('id');
    for (const raterId of opts.raterIds) {
      await trx('assignments').insert({ run_id: runId, rater_id: raterId, assigned_by: opts.createdBy });
    }
    return { runId, decompositionId, componentIds, k: result.k };
  });
}
