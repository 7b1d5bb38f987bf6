/**
 * Removes what killed uploads leave behind: `*.part` and other files under the storage root's
 * `tmp/` older than `olderThanMs` (default one hour — an upload in progress keeps its file's
 * modification time fresh). Run at server start and hourly by scripts/serve.ts.
 */
import { readdir, rm, rmdir, stat } from 'node:fs/promises';
import path from 'node:path';
import { storageRoot } from './index';

export const LEFTOVER_AGE_MS = 60 * 60 * 1000;

export async function sweepUploadLeftovers({
  olderThanMs = LEFTOVER_AGE_MS,
  now = Date.now(),
  log,
}: {
  olderThanMs?: number;
  now?: number;
  log?: (line: string) => void;
}): Promise<{ removed: number; bytes: number }> {
  const tmp = path.join(storageRoot(), 'tmp');
  let removed = 0;
  let bytes = 0;
  let months: string[];
  try {
    months = await readdir(tmp);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return { removed, bytes };
    throw err;
  }
  for (const month of months) {
    const dir = path.join(tmp, month);
    let names: string[];
    try {
      names = await readdir(dir);
    } catch {
      continue; // not a folder, or gone meanwhile
    }
    for (const name of names) {
      const file = path.join(dir, name);
      const info = await stat(file).catch(() => null);
      if (!info?.isFile() || now - info.mtimeMs < olderThanMs) continue;
      await rm(file, { force: true });
      removed++;
      bytes += info.size;
    }
    await rmdir(dir).catch(() => undefined); // only when empty
  }
  if (removed && log) log(`removed ${removed} left-over upload file(s) (${bytes} bytes) from ${tmp}`);
  return { removed, bytes };
}
