import { createHash } from 'node:crypto';
import { readStream } from './index';

/** SHA-256 (hex) and size in bytes of a stored file, read as a stream. */
export async function checksumOfKey(key: string): Promise<{ sha256: string; bytes: number }> {
  const h = createHash('sha256');
  let bytes = 0;
  for await (const chunk of readStream(key)) {
    h.update(chunk as Buffer);
    bytes += (chunk as Buffer).length;
  }
  return { sha256: h.digest('hex'), bytes };
}
