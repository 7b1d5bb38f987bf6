// The worker's output files (lib/runs/ingest-decomposition, the same header fields as the CLI's):
// the run's qform/sform codes and transforms survive, and the component axis is not labelled as
// time. Checked with the project's own reader against the NIfTI-1 standard's fields (nifti1.h:
// qform_code/sform_code NIFTI_XFORM_SCANNER_ANAT = 1; xyzt_units time bits 0x38).
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const uploads = await mkdtemp(path.join(tmpdir(), 'quorum-output-headers-'));
process.env.QUORUM_UPLOADS_DIR = uploads;
const { writeDecompositionFiles } = await import('@/lib/runs/ingest-decomposition');
const { pathFor } = await import('@/lib/storage');
const { decodeNifti, encodeNifti1, readNiftiFile, affineMaxDiff } = await import('@/lib/nifti');
const { generatePhantom, phantomToNiftiInput } = await import('@/lib/phantom');
const { decomposeRun } = await import('@/lib/decomposition/pipeline');

afterAll(async () => {
  await rm(uploads, { recursive: true, force: true });
});

describe('worker output headers', () => {
  it('components, mean and mask keep qform_code = sform_code = 1 of a converter-made run; components have no time unit', async () => {
    const p = generatePhantom({ size: 'tiny', seed: 4, volumes: 30 });
    const image = decodeNifti(encodeNifti1({ ...phantomToNiftiInput(p, { datatype: 'int16' }), qformCode: 1, sformCode: 1 }));
    expect([image.header.qformCode, image.header.sformCode]).toEqual([1, 1]);
    const result = await decomposeRun({ image }, { components: 3, threads: 1, seed: 1 });
    const files = await writeDecompositionFiles(result, image.header);
    for (const key of [files.componentsKey, files.meanKey, files.maskKey]) {
      const h = (await readNiftiFile(pathFor(key))).header;
      expect([h.qformCode, h.sformCode], key).toEqual([1, 1]);
      expect(affineMaxDiff(h.affine, image.header.affine)).toBeLessThan(1e-4);
    }
    const comps = (await readNiftiFile(pathFor(files.componentsKey))).header;
    expect(comps.dims).toEqual([...p.dims.slice(0, 3), 3]);
    expect(comps.xyztUnits & 0x38).toBe(0); // NIFTI_UNITS_UNKNOWN for the component axis
    expect(comps.xyztUnits & 0x07).toBe(image.header.xyztUnits & 0x07); // mm kept
    expect(comps.pixdim[4]).toBe(1);
  });
});
