// Writes the tiny phantom used by the decomposition reference fixtures into a directory:
// phantom.nii.gz (int16, as the tests re-encode it), mask.nii.gz (uint8 truth brain mask) and
// truth.nii.gz (float32, one volume per true source). Prints the SHA-256 of the uncompressed
// phantom NIfTI bytes. Called by scripts/reference/make-decomposition-fixtures.py.
// Usage: node --import tsx scripts/reference/write-decomposition-phantom.ts DIR [seed]
import { createHash } from 'node:crypto';
import { writeFile } from 'node:fs/promises';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { encodeNifti1, writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, truthMapsToNiftiInput } from '@/lib/phantom';

const dir = process.argv[2];
const seed = Number(process.argv[3] ?? 1);
if (!dir) {
  process.stderr.write('usage: write-decomposition-phantom.ts DIR [seed]\n');
  process.exit(2);
}
const p = generatePhantom({ size: 'tiny', seed });
const bytes = encodeNifti1(phantomToNiftiInput(p, { datatype: 'int16' }));
await writeFile(path.join(dir, 'phantom.nii.gz'), gzipSync(bytes));
const [nx, ny, nz] = p.dims;
await writeNiftiFile(path.join(dir, 'mask.nii.gz'), {
  dims: [nx, ny, nz],
  pixdim: [...p.voxelSize],
  affine: p.affine,
  datatype: 'uint8',
  data: p.truth.brainMask,
});
await writeNiftiFile(path.join(dir, 'truth.nii.gz'), truthMapsToNiftiInput(p));
process.stdout.write(
  JSON.stringify({
    sha256: createHash('sha256').update(bytes).digest('hex'),
    sources: p.truth.sources.map((s) => s.name),
    dims: p.dims,
    seed,
  }) + '\n',
);
