/**
 * Shared by scripts/backup.ts and scripts/restore.ts: the database client programs (Debian's
 * mariadb-client, installed when missing as scripts/lib/ensure-system.sh does), their connection
 * arguments (the password goes in MYSQL_PWD, never on the command line), and file hashing.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream, existsSync } from 'node:fs';
import type { DbSettings } from '@/lib/db/config';

export const MANIFEST = 'manifest.json';
export const DATABASE_FILE = 'database.sql';
export const UPLOADS_FILE = 'uploads.tar';

export type BackupManifest = {
  format: 'quorum-backup-1';
  createdAt: string;
  database: string;
  files: Record<string, { bytes: number; sha256: string }>;
  /** Files in the storage root when the copy was made (tmp/ included in the count, not in the tar). */
  uploads: { files: number };
};

export function fail(message: string, code = 1): never {
  process.stderr.write(`${message}\n`);
  process.exit(code);
}

function findBin(name: string): string | null {
  for (const dir of (process.env.PATH ?? '').split(':').concat(['/usr/bin', '/usr/local/bin'])) {
    if (dir && existsSync(`${dir}/${name}`)) return `${dir}/${name}`;
  }
  return null;
}

/** mariadb-dump and mariadb, installing Debian's mariadb-client when missing (as root). */
export function clientPrograms(): { dump: string; client: string } {
  let dump = findBin('mariadb-dump');
  let client = findBin('mariadb');
  if (dump && client) return { dump, client };
  const cmd = 'apt-get update && apt-get install -y --no-install-recommends mariadb-client';
  if (process.getuid?.() !== 0) fail(`backup: mariadb-dump is not installed. As root, run: ${cmd}`, 4);
  process.stderr.write('installing Debian package mariadb-client\n');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  spawnSync('apt-get', ['update', '-q'], { stdio: 'ignore', env });
  const res = spawnSync('apt-get', ['install', '-y', '-q', '--no-install-recommends', 'mariadb-client'], { stdio: 'ignore', env });
  dump = findBin('mariadb-dump');
  client = findBin('mariadb');
  if (res.status !== 0 || !dump || !client) fail(`backup: installing mariadb-client failed; run: ${cmd}`, 4);
  return { dump, client };
}

/** Connection arguments and environment for the client programs. */
export function connection(s: DbSettings): { args: string[]; env: NodeJS.ProcessEnv } {
  return {
    args: ['--no-defaults', `--host=${s.host}`, `--port=${s.port}`, `--user=${s.user}`, '--protocol=tcp'],
    env: { ...process.env, MYSQL_PWD: s.password },
  };
}

export function sha256File(file: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(file)
      .on('data', (d) => hash.update(d))
      .on('end', () => resolve(hash.digest('hex')))
      .on('error', reject);
  });
}
