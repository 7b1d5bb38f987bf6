// File-system entry points of the NIfTI reader.
import { open, readFile } from 'node:fs/promises';
import { NiftiError } from './errors';
import { gunzipPrefix, isGzip } from './gzip';
import { parseNiftiHeader, type NiftiHeader } from './header';
import { decodeNifti, type DecodeOptions, type NiftiImage } from './image';

/** Reads and decodes a .nii or .nii.gz file (gzip detected by magic bytes, not by name). */
export async function readNiftiFile(path: string, opts: DecodeOptions = {}): Promise<NiftiImage> {
  return decodeNifti(new Uint8Array(await readFile(path)), opts);
}

/**
 * Reads only the header of a .nii or .nii.gz file: the first 64 KiB from disk, of which only the
 * first 540 decompressed bytes are inflated.
 */
export async function readNiftiHeaderFile(path: string): Promise<NiftiHeader> {
  const fh = await open(path, 'r');
  try {
    const buf = new Uint8Array(65_536);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    const head = buf.subarray(0, bytesRead);
    if (bytesRead === 0) throw new NiftiError('not_nifti', 'The file is empty. Upload a .nii or .nii.gz image.');
    return parseNiftiHeader(isGzip(head) ? gunzipPrefix(head, 544) : head);
  } finally {
    await fh.close();
  }
}
