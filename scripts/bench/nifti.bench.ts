// NIfTI reader speed: decode, readVolume and readVoxelSeries on a synthetic run the size of a
// typical whole-brain acquisition (96 × 96 × 50 voxels × 400 volumes, 230k in-mask voxels).
import { gzipSync } from 'node:zlib';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';

function time<T>(label: string, fn: () => T): T {
  const t0 = performance.now();
  const out = fn();
  console.log(`${label.padEnd(52)} ${((performance.now() - t0) / 1000).toFixed(3)} s`);
  return out;
}

export async function main(): Promise<void> {
  const dims = [96, 96, 50, 400];
  const V = dims[0] * dims[1] * dims[2];
  const data = new Int16Array(V * dims[3]);
  for (let i = 0; i < data.length; i++) data[i] = (i * 2654435761) % 4000;
  const le = time('encodeNifti1 int16 (737 MB)', () =>
    encodeNifti1({ dims, pixdim: [2, 2, 2, 0.8], datatype: 'int16', data, sclSlope: 0.5, sclInter: 1 }),
  );
  const img = time('decodeNifti (plain, no copy)', () => decodeNifti(le));
  const mask = new Int32Array(230_000);
  for (let v = 0; v < mask.length; v++) mask[v] = Math.floor((v * V) / mask.length);
  const out = new Float32Array(mask.length * dims[3]);
  time('readVoxelSeries 230k voxels × 400 (aligned, native)', () => img.readVoxelSeries(mask, 0, out));
  time('readVoxelSeries again (aligned, native, warm)', () => img.readVoxelSeries(mask, 0, out));
  const shifted = new Uint8Array(le.length + 1).subarray(1);
  shifted.set(le);
  const img2 = decodeNifti(shifted);
  time('readVoxelSeries 230k voxels × 400 (misaligned copy)', () => img2.readVoxelSeries(mask, 0, out));
  const buf = new Float32Array(V);
  time('readVolume × 400', () => {
    for (let t = 0; t < dims[3]; t++) img.readVolume(t, buf);
  });
  const small = encodeNifti1({ dims: [96, 96, 50, 40], datatype: 'int16', data: data.subarray(0, V * 40) });
  const gz = time('gzip 40 volumes (74 MB)', () => gzipSync(small, { level: 1 }));
  time('decodeNifti .nii.gz 40 volumes (bounded gunzip)', () => decodeNifti(new Uint8Array(gz)));
}
