// Bounded gzip decompression for NIfTI files (.nii.gz), on node:zlib.
import { constants as bufferConstants } from 'node:buffer';
import { constants as zc, gunzipSync } from 'node:zlib';
import { NiftiError } from './errors';

/** True when the bytes start with the gzip magic 0x1f 0x8b (RFC 1952 §2.3.1). */
export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

function zlibFailure(err: unknown, what: string): NiftiError {
  const code = (err as { code?: string }).code;
  if (code === 'Z_BUF_ERROR') {
    return new NiftiError(
      'truncated',
      `The compressed ${what} ends early (the gzip stream is cut off). Re-export or re-upload the complete file.`,
    );
  }
  return new NiftiError(
    'not_nifti',
    `The gzip data of the ${what} is corrupt (${(err as Error).message}). Re-export or re-upload the file.`,
  );
}

/**
 * Decompresses at least `want` bytes from the start of a gzip stream (fewer only if the whole
 * stream is shorter), without inflating the rest. Feeds growing compressed prefixes with a sync
 * flush; deflate expands at most ~1032:1, which bounds the output buffer (RFC 1951, common practice).
 */
export function gunzipPrefix(bytes: Uint8Array, want: number): Uint8Array {
  let take = Math.min(bytes.length, 512);
  for (;;) {
    let out: Uint8Array;
    try {
      out = gunzipSync(bytes.subarray(0, take), {
        finishFlush: zc.Z_SYNC_FLUSH,
        maxOutputLength: take * 1040 + 4096,
      });
    } catch (err) {
      throw zlibFailure(err, 'file header');
    }
    if (out.length >= want || take >= bytes.length) return out;
    take = Math.min(bytes.length, take * 4);
  }
}

/**
 * Decompresses a whole gzip stream, refusing more than `maxBytes` of output (the size the NIfTI
 * header implies plus slack), so a crafted or mislabelled file cannot exhaust memory.
 */
export function gunzipBounded(bytes: Uint8Array, maxBytes: number): Uint8Array {
  if (maxBytes > bufferConstants.MAX_LENGTH) {
    throw new NiftiError(
      'too_large',
      `The image needs ${maxBytes} bytes once decompressed, more than one buffer can hold here (${bufferConstants.MAX_LENGTH}). Split the run or upload it uncompressed.`,
    );
  }
  try {
    return gunzipSync(bytes, { maxOutputLength: maxBytes });
  } catch (err) {
    if ((err as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') {
      throw new NiftiError(
        'too_large',
        `The compressed file decompresses to more than the ${maxBytes} bytes its NIfTI header implies. The file is damaged or not what it claims; re-export it.`,
      );
    }
    throw zlibFailure(err, 'image');
  }
}
