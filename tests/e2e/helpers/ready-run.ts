/**
 * Test helper: creates a run that is ready for rating, the way the worker's `decompose` job does —
 * a synthetic phantom run is decomposed with lib/decomposition's decomposeRun, its component z-maps
 * (4D float32 gz), mean image and mask are written under the storage root, and rows go into runs,
 * decompositions, components (features + float32 blobs) and assignments (one per rater).
 * Used by the integration tests (imported) and the browser tests (through create-ready-run.ts).
 * It writes with its own knex instance so it runs outside Next.js.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Knex } from 'knex';
import { float32ToBlob, toJson } from '@/lib/db/knex';
import { decomposeRun } from '@/lib/decomposition/pipeline';
import { powerSpectrum } from '@/lib/decomposition/spectrum';
import { computeComponentFeatures } from '@/lib/decomposition/features';
import { dropInitialVolumes, type MotionParams } from '@/lib/decomposition/motion';
import { generatePhantom, phantomToNiftiInput, type PhantomSize } from '@/lib/phantom';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { childKey, newKey, pathFor } from '@/lib/storage';

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
  const result = await decomposeRun({ image }, { drop, threads: 1, components: opts.components ?? 'auto', seed: 1 });

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
  const dirKey = newKey('decompositions');
  const nVox = nx * ny * nz;
  const maps4d = new Float32Array(nVox * result.k);
  for (let c = 0; c < result.k; c++) {
    for (let j = 0; j < result.maskIndices.length; j++) maps4d[c * nVox + result.maskIndices[j]] = result.maps[c * result.maskIndices.length + j];
  }
  const common = { pixdim: [...p.voxelSize], affine: p.affine.map((r) => [...r]), xyztUnits: 2 };
  const componentsKey = childKey(dirKey, 'components.nii.gz');
  const meanKey = childKey(dirKey, 'mean.nii.gz');
  const maskKey = childKey(dirKey, 'mask.nii.gz');
  const { gzipSync } = await import('node:zlib');
  await writeKey(componentsKey, gzipSync(encodeNifti1({ ...common, dims: [nx, ny, nz, result.k], pixdim: [...p.voxelSize, 1], datatype: 'float32', data: maps4d, description: 'component z-maps' })));
  await writeKey(meanKey, gzipSync(encodeNifti1({ ...common, dims: [nx, ny, nz], datatype: 'float32', data: result.meanImage, description: 'mean image' })));
  await writeKey(maskKey, gzipSync(encodeNifti1({ ...common, dims: [nx, ny, nz], datatype: 'uint8', data: result.mask, description: 'mask' })));

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
    const [decompositionId] = await trx('decompositions').insert({
      run_id: runId,
      parameters: toJson({ drop, detrend: false, varianceNorm: true, dimMethod: result.dimMethod, seed: result.seed, contrast: result.contrast }),
      summary: toJson({ k: result.k, converged: result.converged, iterations: result.iterations, droppedVolumes: drop }),
      components_key: componentsKey,
      mean_key: meanKey,
      mask_key: maskKey,
      k: result.k,
      is_current: true,
    });
    const T = result.timepoints;
    const componentIds: number[] = [];
    for (let c = 0; c < result.k; c++) {
      const tc = new Float64Array(T);
      for (let t = 0; t < T; t++) tc[t] = result.timecourses[t * result.k + c];
      const spectrum = powerSpectrum(tc, result.trSeconds);
      const map = result.maps.subarray(c * result.maskIndices.length, (c + 1) * result.maskIndices.length);
      const features = computeComponentFeatures({ map, maskIndices: result.maskIndices, dims: result.dims, timecourse: tc, trSeconds: result.trSeconds, motion, spectrum });
      const [id] = await trx('components').insert({
        decomposition_id: decompositionId,
        idx: c + 1,
        variance_explained: result.explainedVariance[c],
        features: toJson(features),
        timecourse: float32ToBlob(Float32Array.from(tc)),
        spectrum: float32ToBlob(Float32Array.from(spectrum.power)),
        frequencies: float32ToBlob(Float32Array.from(spectrum.frequencies)),
      });
      componentIds.push(id);
    }
    for (const raterId of opts.raterIds) {
      await trx('assignments').insert({ run_id: runId, rater_id: raterId, assigned_by: opts.createdBy });
    }
    return { runId, decompositionId, componentIds, k: result.k };
  });
}
