/**
 * npm run backup [-- --out DIR] – a consistent backup of a running Quorum: the database with
 * mariadb-dump --single-transaction (one InnoDB snapshot, no locks on the app's tables), then the
 * storage root (QUORUM_UPLOADS_DIR) as a tar without tmp/. Order matters: storage files are
 * written once under fresh keys and put in place before or with their rows, so every file a row of
 * the snapshot names already exists when the copy starts; files newer than the snapshot are extra
 * and harmless. Writes DIR/quorum-<UTC time>/ (default DIR: QUORUM_BACKUP_DIR, else .data/backups)
 * with database.sql, uploads.tar and manifest.json (sha256 of each). Prints the folder.
 */
import { spawn } from 'node:child_process';
import { createWriteStream } from 'node:fs';
import { mkdir, readdir, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { resolveDbSettings } from '@/lib/db/config';
import { storageRoot } from '@/lib/storage';
import { clientPrograms, connection, DATABASE_FILE, fail, MANIFEST, sha256File, UPLOADS_FILE, type BackupManifest } from './backup/common';

function run(cmd: string, args: string[], opts: { env?: NodeJS.ProcessEnv; cwd?: string; stdoutTo?: string }): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { env: opts.env, cwd: opts.cwd, stdio: ['ignore', opts.stdoutTo ? 'pipe' : 'ignore', 'pipe'] });
    let err = '';
    child.stderr!.on('data', (d) => (err += d));
    const out = opts.stdoutTo ? createWriteStream(opts.stdoutTo) : null;
    if (out) child.stdout!.pipe(out);
    child.on('error', reject);
    child.on('close', (code) => {
      const done = () =>
        code === 0
          ? resolve()
          : reject(new Error(`${path.basename(cmd)} failed (exit ${code}): ${err.trim().split('\n').slice(-3).join(' ')}`));
      if (out) out.end(done);
      else done();
    });
  });
}

async function countFiles(dir: string): Promise<number> {
  let n = 0;
  for (const entry of await readdir(dir, { withFileTypes: true, recursive: true })) if (entry.isFile()) n++;
  return n;
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { out: { type: 'string' } } });
  const settings = resolveDbSettings();
  const { dump } = clientPrograms();
  const stamp = new Date()
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d+Z$/, 'Z');
  const base = path.resolve(values.out ?? process.env.QUORUM_BACKUP_DIR ?? '.data/backups');
  const dir = path.join(base, `quorum-${stamp}`);
  await mkdir(dir, { recursive: true });

  const { args, env } = connection(settings);
  await run(
    dump,
    [
      ...args,
      '--single-transaction',
      '--quick',
      '--routines',
      '--triggers',
      '--hex-blob',
      '--no-tablespaces',
      '--default-character-set=utf8mb4',
      settings.database,
    ],
    {
      env,
      stdoutTo: path.join(dir, DATABASE_FILE),
    },
  );

  const root = storageRoot();
  await mkdir(root, { recursive: true });
  await run('tar', ['-C', root, '--exclude=./tmp', '-cf', path.join(dir, UPLOADS_FILE), '.'], {});

  const files: BackupManifest['files'] = {};
  for (const name of [DATABASE_FILE, UPLOADS_FILE]) {
    const full = path.join(dir, name);
    files[name] = { bytes: (await stat(full)).size, sha256: await sha256File(full) };
  }
  const manifest: BackupManifest = {
    format: 'quorum-backup-1',
    createdAt: new Date().toISOString(),
    database: settings.database,
    files,
    uploads: { files: await countFiles(root) },
  };
  await writeFile(path.join(dir, MANIFEST), JSON.stringify(manifest, null, 2) + '\n');
  console.log(dir);
}

main().catch((err: Error) => fail(`backup: ${err.message}`));
