/**
 * The cluster path: a run decomposed with `quorum decompose` elsewhere is imported with its output
 * folder; it becomes ready with the same components as the folder and its raters are assigned.
 * A folder made from another run is refused and leaves nothing behind.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createReadStream, existsSync, statSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { db, closeDb, blobToFloat32 } from '@/lib/db/knex';
import { writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput } from '@/lib/phantom';
import { decompose } from '@/scripts/cli/decompose';
import { importDecomposition } from '@/lib/runs/import-run';
import { pathFor } from '@/lib/storage';
import { createStudyWithRaters, useTempUploads } from './helpers/factories';

let work: string;
let uploads: Awaited<ReturnType<typeof useTempUploads>>;
let study: Awaited<ReturnType<typeof createStudyWithRaters>>;
let leadEmail: string;
const open = (f: string) => () => ({
  body: Readable.toWeb(createReadStream(f)) as ReadableStream<Uint8Array>,
  contentLength: statSync(f).size,
});

async function cliDecompose(file: string, out: string) {
  const write = process.stdout.write;
  process.stdout.write = (() => true) as typeof process.stdout.write;
  try {
    return await decompose.run([file, '--out', out, '--drop', '2', '--seed', '3', '--threads', '1']);
  } finally {
    process.stdout.write = write;
  }
}

beforeAll(async () => {
  uploads = await useTempUploads();
  work = await mkdtemp(path.join(os.tmpdir(), 'quorum-import-'));
  study = await createStudyWithRaters(db, { raters: 2, raters_per_run: 2 });
  leadEmail = (await db('users').where({ id: study.leadId }).first('email')).email;
  for (const [name, seed] of [
    ['sub-31_task-rest_bold.nii.gz', 31],
    ['sub-32_task-rest_bold.nii.gz', 32],
  ] as const) {
    const p = generatePhantom({ size: 'tiny', seed, volumes: seed === 32 ? 60 : undefined });
    await writeNiftiFile(path.join(work, name), phantomToNiftiInput(p));
  }
  expect(await cliDecompose(path.join(work, 'sub-31_task-rest_bold.nii.gz'), path.join(work, 'out-31'))).toBe(0);
});

afterAll(async () => {
  await rm(work, { recursive: true, force: true });
  await uploads.cleanup();
  await closeDb();
});

describe('quorum import', () => {
  it('registers the run with the folder’s decomposition and assigns raters', async () => {
    const file = path.join(work, 'sub-31_task-rest_bold.nii.gz');
    const result = await importDecomposition({
      email: leadEmail,
      studyId: study.studyId,
      file,
      name: path.basename(file),
      open: open(file),
      entities: {},
      dir: path.join(work, 'out-31'),
    });
    const summary = JSON.parse(await readFile(path.join(work, 'out-31', 'summary.json'), 'utf8'));
    expect(result.components).toBe(summary.components);
    expect(result.raters.sort()).toEqual([...study.raterIds].sort());
    const run = await db('runs').where({ id: result.runId }).first('status', 'sub', 'task');
    expect(run).toEqual({ status: 'ready', sub: '31', task: 'rest' });
    const comps = await db('components')
      .where({ decomposition_id: result.decompositionId })
      .orderBy('idx')
      .select('idx', 'variance_explained', 'timecourse');
    expect(comps).toHaveLength(summary.components);
    expect(comps[0].variance_explained).toBeCloseTo(summary.explainedVariance[0], 5);
    const firstLine = (await readFile(path.join(work, 'out-31', 'timecourses.tsv'), 'utf8')).split('\n')[1].split('\t').map(Number);
    expect(blobToFloat32(comps[0].timecourse)![0]).toBeCloseTo(firstLine[0], 4);
    const d = await db('decompositions').where({ id: result.decompositionId }).first('components_key', 'mean_key', 'mask_key');
    for (const key of Object.values(d)) expect(existsSync(pathFor(key as string))).toBe(true);
    expect(
      await db('audit_log')
        .where({ action: 'run.imported', target_id: String(result.runId) })
        .first(),
    ).toBeTruthy();
  });

  it('refuses a folder made from another run and registers nothing', async () => {
    const file = path.join(work, 'sub-32_task-rest_bold.nii.gz');
    const before = Number((await db('runs').where({ study_id: study.studyId }).count({ n: '*' }))[0].n);
    await expect(
      importDecomposition({
        email: leadEmail,
        studyId: study.studyId,
        file,
        name: path.basename(file),
        open: open(file),
        entities: {},
        dir: path.join(work, 'out-31'),
      }),
    ).rejects.toThrow(/timecourses\.tsv has \d+ rows; the run has 60 volumes/);
    expect(Number((await db('runs').where({ study_id: study.studyId }).count({ n: '*' }))[0].n)).toBe(before);
  });

  it('refuses a folder that is not a decompose output', async () => {
    const file = path.join(work, 'sub-32_task-rest_bold.nii.gz');
    await expect(
      importDecomposition({
        email: leadEmail,
        studyId: study.studyId,
        file,
        name: path.basename(file),
        open: open(file),
        entities: {},
        dir: work,
      }),
    ).rejects.toThrow(/summary\.json .* missing/);
  });
});
