/**
 * Storing a finished decomposition of a run: the NIfTI outputs in a fresh storage directory, then
 * the decomposition row and its component rows in the caller's transaction.
 */
import { insertCurrentDecomposition } from '@/lib/db/queries/decompositions';
import type { Trx } from '@/lib/db/transaction';
import type { ComponentFeatures } from '@/lib/decomposition/features';
import { componentFeatures, componentSpectra, componentTimecourse } from '@/lib/decomposition/component-outputs';
import type { MotionParams } from '@/lib/decomposition/motion';
import { componentsHeaderFields, volumeHeaderFields } from '@/lib/decomposition/output-headers';
import type { DecompositionResult } from '@/lib/decomposition/pipeline';
import { writeNiftiFile, type NiftiHeader } from '@/lib/nifti';
import { childKey, ensureDirFor, newKey, pathFor, removeKey } from '@/lib/storage';
import { checksumOfKey } from '@/lib/storage/checksum';
import { storeDeskMaps } from '@/lib/desk/map-store';

export interface ComponentRow {
  /** 1..k by variance explained. */
  idx: number;
  varianceExplained: number;
  features: ComponentFeatures;
  /** Length T (kept volumes). */
  timecourse: Float32Array;
  /** Welch power, (units of the time course)² / Hz. */
  spectrum: Float32Array;
  /** Hz. */
  frequencies: Float32Array;
}

/**
 * Per component: its time course (column c of the T × k mixing matrix), Welch power spectrum and
 * rater features, computed by lib/decomposition's component outputs (the same as the CLI writes).
 * `motion` must already have the dropped initial volumes removed (length T).
 */
export function componentRows(result: DecompositionResult, motion?: MotionParams): ComponentRow[] {
  const spectra = componentSpectra(result);
  const features = componentFeatures(result, motion, spectra);
  return features.map((f, c) => ({
    idx: c + 1,
    varianceExplained: result.explainedVariance[c]!,
    features: f,
    timecourse: Float32Array.from(componentTimecourse(result, c)),
    spectrum: Float32Array.from(spectra.power[c]!),
    frequencies: Float32Array.from(spectra.frequencies),
  }));
}

export interface DecompositionFiles {
  /** The fresh directory (remove it with removeKey if the database write fails). */
  dirKey: string;
  componentsKey: string;
  meanKey: string;
  maskKey: string;
}

/**
 * Writes the outputs into a new directory `decompositions/<yyyy-mm>/<uuid>/`: components.nii.gz
 * (4D float32 z-maps, volume c = component c + 1, 0 outside the mask), mean.nii.gz (float32) and
 * mask.nii.gz (uint8), all on the run's grid with its qform/sform and their codes (output-headers.ts).
 * On error the directory is removed.
 */
export async function writeDecompositionFiles(
  result: DecompositionResult,
  header: Pick<NiftiHeader, 'pixdim' | 'affine' | 'qform' | 'qformCode' | 'sformCode' | 'xyztUnits'>,
): Promise<DecompositionFiles> {
  const dirKey = newKey('decompositions');
  const files: DecompositionFiles = {
    dirKey,
    componentsKey: childKey(dirKey, 'components.nii.gz'),
    meanKey: childKey(dirKey, 'mean.nii.gz'),
    maskKey: childKey(dirKey, 'mask.nii.gz'),
  };
  const [nx, ny, nz] = result.dims;
  const nVox = nx * ny * nz;
  const V = result.voxelsInMask;
  const volume = volumeHeaderFields(header);
  try {
    await ensureDirFor(files.componentsKey);
    const maps = new Float32Array(nVox * result.k);
    for (let c = 0; c < result.k; c++) {
      const off = c * nVox;
      for (let j = 0; j < V; j++) maps[off + result.maskIndices[j]!] = result.maps[c * V + j]!;
    }
    await writeNiftiFile(pathFor(files.componentsKey), {
      dims: [nx, ny, nz, result.k],
      ...componentsHeaderFields(header),
      datatype: 'float32',
      data: maps,
      description: 'Quorum component z-maps',
    });
    await writeNiftiFile(pathFor(files.meanKey), {
      dims: [nx, ny, nz],
      ...volume,
      datatype: 'float32',
      data: result.meanImage,
      description: 'Quorum mean image of kept volumes',
    });
    await writeNiftiFile(pathFor(files.maskKey), {
      dims: [nx, ny, nz],
      ...volume,
      datatype: 'uint8',
      data: result.mask,
      description: 'Quorum decomposition mask',
    });
    // the desk's map payload, made once here rather than on the first request
    await storeDeskMaps(files.componentsKey, {
      dims: [nx, ny, nz],
      k: result.k,
      grid: header,
      readMap: (c) => maps.subarray(c * nVox, (c + 1) * nVox),
      mask: result.mask,
    });
  } catch (err) {
    await removeKey(dirKey).catch(() => undefined);
    throw err;
  }
  return files;
}

/** The summary JSON of a decomposition: the same record the CLI writes as summary.json. */
export { decompositionSummary } from '@/lib/decomposition/component-outputs';

/**
 * In the caller's transaction: marks the run's earlier decompositions not current, inserts the new
 * decomposition (with the component-map file's SHA-256 and size, which releases ship) and its k
 * component rows, and sets the run ready. Returns the decomposition id.
 */
export async function storeDecomposition(
  trx: Trx,
  d: {
    runId: number;
    parameters: Record<string, unknown>;
    summary: Record<string, unknown>;
    files: DecompositionFiles;
    components: ComponentRow[];
  },
): Promise<number> {
  const maps = await checksumOfKey(d.files.componentsKey);
  return insertCurrentDecomposition(trx, {
    runId: d.runId,
    parameters: d.parameters,
    summary: d.summary,
    componentsKey: d.files.componentsKey,
    componentsSha256: maps.sha256,
    componentsBytes: maps.bytes,
    meanKey: d.files.meanKey,
    maskKey: d.files.maskKey,
    components: d.components,
  });
}
