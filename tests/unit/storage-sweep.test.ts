/**
 * uploads/tmp leftovers of killed uploads are swept (lib/storage/sweep.ts): old files go, a file
 * still being written (fresh modification time) and everything outside tmp/ stay. Issue 13 item 10.
 */
import { mkdir, mkdtemp, readdir, rm, utimes, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { sweepUploadLeftovers } from '@/lib/storage/sweep';

let root: string;
const previous = process.env.QUORUM_UPLOADS_DIR;
beforeEach(async () => {
  root = await mkdtemp(path.join(os.tmpdir(), 'quorum-sweep-'));
  process.env.QUORUM_UPLOADS_DIR = root;
});
afterEach(async () => {
  if (previous === undefined) delete process.env.QUORUM_UPLOADS_DIR;
  else process.env.QUORUM_UPLOADS_DIR = previous;
  await rm(root, { recursive: true, force: true });
});

async function file(rel: string, ageMs: number, bytes = 10) {
  const full = path.join(root, rel);
  await mkdir(path.dirname(full), { recursive: true });
  await writeFile(full, Buffer.alloc(bytes));
  const t = new Date(Date.now() - ageMs);
  await utimes(full, t, t);
}

describe('sweepUploadLeftovers', () => {
  it('removes old tmp files only', async () => {
    await file('tmp/2026-11/dead-upload.part', 3 * 3600_000, 1000);
    await file('tmp/2026-12/old-motion.tsv', 2 * 3600_000, 24);
    await file('tmp/2026-12/in-progress.part', 60_000);
    await file('runs/2026-11/kept.nii.gz', 30 * 24 * 3600_000);
    const lines: string[] = [];
    expect(await sweepUploadLeftovers({ log: (l) => lines.push(l) })).toEqual({ removed: 2, bytes: 1024 });
    expect(lines[0]).toMatch(/removed 2 left-over upload file\(s\) \(1024 bytes\)/);
    expect(await readdir(path.join(root, 'tmp'))).toEqual(['2026-12']); // the emptied month folder is gone
    expect(await readdir(path.join(root, 'tmp/2026-12'))).toEqual(['in-progress.part']);
    expect(await readdir(path.join(root, 'runs/2026-11'))).toEqual(['kept.nii.gz']);
  });

  it('does nothing when there is no tmp folder yet', async () => {
    expect(await sweepUploadLeftovers({})).toEqual({ removed: 0, bytes: 0 });
  });
});
