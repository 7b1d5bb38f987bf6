import 'server-only';
/**
 * Receives one uploaded file from a raw request body without holding it in memory: the bytes are
 * written to a temporary file under the storage root while their sha256 is computed, a .gz body
 * is inflated on the fly only to count its bytes (and to read the first 544 for the header), and
 * the NIfTI header is checked as soon as it has arrived. At the end the full data length implied
 * by the header (vox_offset + nx·ny·nz·nt·bytes per voxel) is compared with what arrived, so a
 * truncated file is refused. Any refusal removes the temporary file.
 */
import { createHash } from 'node:crypto';
import { createWriteStream, type WriteStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { createGunzip, type Gunzip } from 'node:zlib';
import type { Writable } from 'node:stream';
import { imageSizes, NiftiError, parseNiftiHeader, type NiftiHeader } from '@/lib/nifti';
import { tempPath } from '@/lib/storage';
import { AppError } from '@/lib/errors';
import { formatBytes, maxImageBytes } from './schema';

export type ReceiveOptions = {
  maxBytes: number;
  /**
   * Largest image the header may describe (vox_offset + data), checked as soon as the header has
   * arrived, before the rest is inflated; default maxImageBytes() (QUORUM_MAX_IMAGE_MB).
   */
  maxImageBytes?: number;
  /** The Content-Length header, when the client sent one. */
  contentLength: number | null;
  /** Extra checks on the header (4D, volumes, grid); a thrown error refuses the file. */
  checkHeader?: (header: NiftiHeader) => void;
  /** Aborted when the client goes away. */
  signal?: AbortSignal;
  /** "run" or "mask", for messages. */
  what: string;
};

export type ReceivedNifti = {
  tempFile: string;
  sha256: string;
  sizeBytes: number;
  gzip: boolean;
  header: NiftiHeader;
};

const HEAD_BYTES = 544;
/**
 * Inflation stops this many bytes past the size the header implies: a .gz whose stream holds more
 * (a decompression bomb behind a small header, or trailing data) is refused without inflating the rest.
 */
export const INFLATE_SLACK_BYTES = 1024 * 1024;

export function imageTooLarge(limit: number, implied: number, header: NiftiHeader): AppError {
  return new AppError(
    'too_large',
    `The image is larger than this facility's limit of ${formatBytes(limit)}: its header describes a ${header.dims.join(' × ')} ${header.datatype} image of ${formatBytes(implied)}. ` +
      'Upload a smaller run (cropped, or with fewer volumes) or ask the facility admin to raise QUORUM_MAX_IMAGE_MB.',
  );
}

function trailingData(header: NiftiHeader, implied: number): AppError {
  const msg =
    `The compressed file holds more data than its header describes (${header.dims.join(' × ')} ${header.datatype}, ${formatBytes(implied)}); ` +
    'it is damaged or not a single NIfTI image. Re-export the image and upload it again.';
  return new AppError('validation', msg, { file: [msg] });
}

export function tooLarge(maxBytes: number, size?: number): AppError {
  return new AppError(
    'too_large',
    `The file is larger than this facility's upload limit of ${formatBytes(maxBytes)}${size ? ` (it is ${formatBytes(size)})` : ''}. ` +
      'Upload a smaller run (e.g. cropped or without unused volumes) or ask the facility admin to raise QUORUM_MAX_UPLOAD_MB.',
  );
}

export function interrupted(): AppError {
  return new AppError('bad_request', 'The upload was interrupted before the whole file arrived; nothing was kept. Upload the file again.');
}

/** NiftiErrors (and AppErrors) become 4xx answers; anything else is rethrown as it is. */
export function asRefusal(err: unknown): unknown {
  if (err instanceof NiftiError) return new AppError('validation', err.message, { file: [err.message] });
  return err;
}

/**
 * Writes a chunk, waiting only when the stream asks for it (backpressure): resolves at once while
 * the stream's buffer has room, else on 'drain'; rejects when the stream fails or closes.
 */
function writeChunk(w: Writable, chunk: Uint8Array): Promise<void> {
  if (w.destroyed || w.errored) return Promise.reject(w.errored ?? new Error('the stream is closed'));
  if (w.write(chunk)) return Promise.resolve();
  return new Promise((resolve, reject) => {
    const done = (err?: Error | null) => {
      w.off('drain', onDrain);
      w.off('error', onError);
      w.off('close', onClose);
      if (err) reject(err);
      else resolve();
    };
    const onDrain = () => done();
    const onError = (err: Error) => done(err);
    const onClose = () => done(w.errored ?? new Error('the stream closed'));
    w.on('drain', onDrain);
    w.on('error', onError);
    w.on('close', onClose);
  });
}

function finish(w: WriteStream): Promise<void> {
  return new Promise((resolve, reject) => {
    w.once('error', reject);
    w.end(() => resolve());
  });
}

function truncatedMessage(header: NiftiHeader, expected: number, got: number, gzip: boolean, cutOff: boolean): string {
  const dims = header.dims.join(' × ');
  return (
    `The file is truncated: its header describes a ${dims} ${header.datatype} image, ${formatBytes(expected)} ` +
    `(${expected} bytes) with the header, but ${cutOff ? 'the compressed stream ends early and ' : ''}only ${got} bytes` +
    `${gzip ? ' of decompressed data' : ''} arrived. The copy was probably interrupted; re-export or copy the complete file and upload it again.`
  );
}

/** Streams a NIfTI upload to a temporary file and validates it; see the module comment. */
export async function receiveNifti(body: ReadableStream<Uint8Array> | null, opts: ReceiveOptions): Promise<ReceivedNifti> {
  if (opts.contentLength !== null && opts.contentLength > opts.maxBytes) throw tooLarge(opts.maxBytes, opts.contentLength);
  if (!body || opts.contentLength === 0) {
    throw new AppError('bad_request', `The request holds no file. Send the ${opts.what} file's bytes as the request body.`);
  }

  const tempFile = await tempPath('.part');
  let out: WriteStream | null = createWriteStream(tempFile);
  let diskError: Error | null = null;
  out.on('error', (err) => {
    diskError ??= err; // surfaced after the loop; the listener keeps an 'error' event from crashing the process
  });
  const hash = createHash('sha256');
  let total = 0;
  let gzip: boolean | null = null;
  let gunzip: Gunzip | null = null;
  let inflated = 0;
  let gzipError: (Error & { code?: string }) | null = null;
  let gunzipDone: Promise<void> | null = null;
  const head: Buffer[] = [];
  let headLength = 0;
  let firstBytes = Buffer.alloc(0);
  let header: NiftiHeader | null = null;
  let implied: number | null = null;
  let overflow = false;
  let failure: unknown = null;

  const keepHead = (b: Buffer) => {
    if (headLength >= HEAD_BYTES) return;
    head.push(b.subarray(0, HEAD_BYTES - headLength));
    headLength += Math.min(b.length, HEAD_BYTES - headLength);
  };
  const tryHeader = (final: boolean) => {
    if (header || failure) return;
    if (!final && headLength < HEAD_BYTES) return;
    try {
      if (headLength === 0) throw new NiftiError('not_nifti', 'The file is empty. Upload a .nii or .nii.gz image.');
      header = parseNiftiHeader(new Uint8Array(Buffer.concat(head)));
      implied = header.voxOffset + imageSizes(header).dataBytes;
      const limit = opts.maxImageBytes ?? maxImageBytes();
      if (implied > limit) throw imageTooLarge(limit, implied, header);
      opts.checkHeader?.(header);
    } catch (err) {
      failure = asRefusal(err);
    }
  };
  const stopProcessing = () => {
    out?.destroy();
    out = null;
    gunzip?.destroy();
    gunzip = null;
  };
  const startGunzip = () => {
    const g = createGunzip();
    gunzipDone = new Promise<void>((resolve) => {
      g.on('data', (d: Buffer) => {
        inflated += d.length;
        keepHead(d);
        if (implied !== null && inflated > implied + INFLATE_SLACK_BYTES && !overflow) {
          overflow = true;
          g.destroy(); // stop inflating: the rest is never decompressed
        }
      });
      g.once('end', () => resolve());
      g.once('error', (err) => {
        gzipError = err;
        resolve();
      });
      g.once('close', () => resolve());
    });
    gunzip = g;
  };

  const reader = body.getReader();
  try {
    for (;;) {
      let chunk: ReadableStreamReadResult<Uint8Array>;
      try {
        chunk = await reader.read();
      } catch {
        throw interrupted();
      }
      if (chunk.done) break;
      const bytes = Buffer.from(chunk.value.buffer, chunk.value.byteOffset, chunk.value.byteLength);
      total += bytes.length;
      if (total > opts.maxBytes) {
        await reader.cancel().catch(() => undefined); // stop reading: the rest is never taken in
        throw tooLarge(opts.maxBytes);
      }
      if (failure) continue; // drain (up to the limit) so the client reads the answer
      hash.update(bytes);
      if (gzip === null) {
        firstBytes = Buffer.concat([firstBytes, bytes]);
        if (firstBytes.length < 2) continue;
        gzip = firstBytes[0] === 0x1f && firstBytes[1] === 0x8b;
        if (gzip) startGunzip();
        await feed(firstBytes);
      } else {
        await feed(bytes);
      }
      if (!gzip) tryHeader(false);
      else if (overflow && header) failure = trailingData(header, implied!);
      else if (gzipError) failure = gzipFailure(gzipError);
      else tryHeader(false);
      if (failure) stopProcessing();
    }
    if (opts.signal?.aborted || (opts.contentLength !== null && total < opts.contentLength)) throw interrupted();
    if (gzip === null && !failure) {
      // fewer than 2 bytes in all
      gzip = false;
      keepHead(firstBytes);
    }
    if (!failure) {
      const g = gunzip as Gunzip | null;
      if (g && !overflow) {
        g.end();
        await gunzipDone;
      }
      tryHeader(true);
      if (!failure && overflow && header) failure = trailingData(header, implied!);
      if (!failure && gzip && header && inflated > implied! + INFLATE_SLACK_BYTES) failure = trailingData(header, implied!);
    }
    if (failure) throw failure;
    if (diskError) throw diskError;
    const h = header as NiftiHeader | null;
    if (!h) throw new AppError('validation', 'The file holds no readable NIfTI header. Upload a .nii or .nii.gz image.');
    const expected = h.voxOffset + imageSizes(h).dataBytes;
    const got = gzip ? inflated : total;
    const ge = gzipError as (Error & { code?: string }) | null;
    if (ge && !(ge.code === 'Z_BUF_ERROR' || /unexpected end/i.test(ge.message))) throw gzipFailure(ge);
    if (got < expected || ge) {
      const msg = truncatedMessage(h, expected, got, Boolean(gzip), Boolean(ge));
      throw new AppError('validation', msg, { file: [msg] });
    }
    const o = out as WriteStream | null;
    if (o) await finish(o);
    out = null;
    return { tempFile, sha256: hash.digest('hex'), sizeBytes: total, gzip: Boolean(gzip), header: h };
  } catch (err) {
    stopProcessing();
    await rm(tempFile, { force: true });
    throw err;
  } finally {
    reader.releaseLock();
  }

  async function feed(bytes: Buffer) {
    const o = out as WriteStream | null;
    if (o) await writeChunk(o, bytes);
    const g = gunzip as Gunzip | null;
    if (gzip && g && !gzipError) {
      await writeChunk(g, bytes).catch((err: Error) => {
        gzipError ??= err;
      });
    } else if (!gzip) {
      keepHead(bytes);
    }
  }
}

function gzipFailure(err: Error & { code?: string }): AppError {
  const msg =
    err.code === 'Z_BUF_ERROR' || /unexpected end/i.test(err.message)
      ? 'The file is truncated: the compressed stream ends early. Re-export or copy the complete file and upload it again.'
      : `The file starts like gzip but its compressed data is corrupt (${err.message}). Re-export the image and upload it again.`;
  return new AppError('validation', msg, { file: [msg] });
}
