/**
 * Reads a `quorum decompose` output folder (made on a cluster, say) back into what the worker
 * stores: the component rows (time courses, spectra, features, variance), the summary and the
 * three NIfTI files, checked against the run they belong to. Bad or incomplete folders are refused
 * with a message naming the file and the problem.
 */
import { copyFile, readFile } from 'node:fs/promises';
import path from 'node:path';
import type { ComponentFeatures } from '@/lib/decomposition/features';
import { assertSameGrid, readNiftiHeaderFile, type NiftiHeader } from '@/lib/nifti';
import { childKey, ensureDirFor, newKey } from '@/lib/storage';
import { parseTsv } from '@/lib/exports/tabular';
import type { ComponentRow, DecompositionFiles } from './ingest-decomposition';

export class ImportError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ImportError';
  }
}

type Table = { header: string[]; rows: (number | null)[][] };

async function readTable(dir: string, name: string): Promise<Table> {
  let text: string;
  try {
    text = await readFile(path.join(dir, name), 'utf8');
  } catch {
    throw new ImportError(`${name} is missing from ${dir}; give the folder written by \`quorum decompose --out\`.`);
  }
  const { header, rows: cellRows } = parseTsv(text);
  if (cellRows.length === 0) throw new ImportError(`${name} has no rows.`);
  const rows = cellRows.map((cells, i) => {
    if (cells.length !== header.length)
      throw new ImportError(`${name}, line ${i + 2}: ${cells.length} columns, the header has ${header.length}.`);
    return cells.map((c) => {
      if (c === 'n/a' || c === '') return null;
      const v = Number(c);
      if (!Number.isFinite(v)) throw new ImportError(`${name}, line ${i + 2}: "${c}" is not a number.`);
      return v;
    });
  });
  return { header, rows };
}

export type ImportedDecomposition = {
  summary: Record<string, unknown>;
  parameters: Record<string, unknown>;
  components: ComponentRow[];
  componentsHeader: NiftiHeader;
};

/** Parses and checks a decompose output folder against the run's header (grid, volumes). */
export async function readDecompositionDir(dir: string, run: NiftiHeader): Promise<ImportedDecomposition> {
  let summary: Record<string, unknown>;
  try {
    summary = JSON.parse(await readFile(path.join(dir, 'summary.json'), 'utf8'));
  } catch {
    throw new ImportError(`summary.json in ${dir} is missing or not JSON; give the folder written by \`quorum decompose --out\`.`);
  }
  const k = Number(summary.components);
  if (!Number.isInteger(k) || k < 1) throw new ImportError('summary.json has no component count.');
  const [tc, sp, ft] = await Promise.all([
    readTable(dir, 'timecourses.tsv'),
    readTable(dir, 'spectra.tsv'),
    readTable(dir, 'features.tsv'),
  ]);
  if (tc.header.length !== k || sp.header.length !== k + 1 || ft.rows.length !== k) {
    throw new ImportError(`The tables disagree with summary.json about the number of components (${k}).`);
  }
  const componentsHeader = await readNiftiHeaderFile(path.join(dir, 'components.nii.gz')).catch(() => {
    throw new ImportError(`components.nii.gz in ${dir} is missing or not a NIfTI file.`);
  });
  try {
    assertSameGrid({ ...componentsHeader, dims: componentsHeader.dims.slice(0, 3) }, { ...run, dims: run.dims.slice(0, 3) });
  } catch {
    throw new ImportError('components.nii.gz is not on the run’s grid: this folder belongs to another run.');
  }
  if ((componentsHeader.dims[3] ?? 1) !== k)
    throw new ImportError(`components.nii.gz holds ${componentsHeader.dims[3] ?? 1} maps, summary.json says ${k}.`);
  const kept = Number(summary.timepoints);
  if (kept !== tc.rows.length || kept > (run.dims[3] ?? 0)) {
    throw new ImportError(
      `timecourses.tsv has ${tc.rows.length} rows; the run has ${run.dims[3]} volumes and summary.json says ${kept} were kept.`,
    );
  }
  const featureKeys = ft.header.slice(2) as (keyof ComponentFeatures)[];
  const components: ComponentRow[] = ft.rows.map((row, c) => ({
    idx: c + 1,
    varianceExplained: row[1] ?? 0,
    features: Object.fromEntries(featureKeys.map((key, j) => [key, row[j + 2]])) as unknown as ComponentFeatures,
    timecourse: Float32Array.from(tc.rows, (r) => r[c] ?? 0),
    spectrum: Float32Array.from(sp.rows, (r) => r[c + 1] ?? 0),
    frequencies: Float32Array.from(sp.rows, (r) => r[0] ?? 0),
  }));
  const parameters = {
    engine: 'quorum-decomposition',
    source: 'imported from a decompose output folder',
    dropVolumes: summary.droppedVolumes,
    detrend: summary.detrended,
    varianceNorm: summary.varianceNormalised,
    dimMethodUsed: summary.dimMethod,
    seedUsed: summary.seed,
    contrast: summary.contrast,
    tol: summary.tol,
    maxIter: summary.maxIter,
  };
  return { summary, parameters, components, componentsHeader };
}

/** Copies the folder's three NIfTI files into a fresh storage directory. */
export async function copyDecompositionFiles(dir: string): Promise<DecompositionFiles> {
  const dirKey = newKey('decompositions');
  const keys = {
    componentsKey: childKey(dirKey, 'components.nii.gz'),
    meanKey: childKey(dirKey, 'mean.nii.gz'),
    maskKey: childKey(dirKey, 'mask.nii.gz'),
  };
  for (const [key, name] of [
    [keys.componentsKey, 'components.nii.gz'],
    [keys.meanKey, 'mean.nii.gz'],
    [keys.maskKey, 'mask.nii.gz'],
  ] as const) {
    try {
      await copyFile(path.join(dir, name), await ensureDirFor(key));
    } catch {
      throw new ImportError(`${name} is missing from ${dir}.`);
    }
  }
  return { dirKey, ...keys } as DecompositionFiles;
}
