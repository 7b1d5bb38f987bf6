/**
 * npm run restore -- <backup folder> [--yes] – puts a backup made by `npm run backup` back: checks
 * the manifest's sha256 sums, drops every table of the configured database and loads the dump,
 * then replaces the storage root (QUORUM_UPLOADS_DIR) with the backup's files; the previous storage
 * folder is kept beside it as <root>.before-restore-<time>. Stop the app and the workers first.
 * Refuses to overwrite a database that has tables or a non-empty storage root without --yes.
 */
import { spawn } from 'node:child_process';
import { createReadStream, existsSync } from 'node:fs';
import { mkdir, readdir, readFile, rename } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { resolveDbSettings } from '@/lib/db/config';
import { createDb } from '@/lib/db/knex';
import { storageRoot } from '@/lib/storage';
import { clientPrograms, connection, DATABASE_FILE, fail, MANIFEST, sha256File, UPLOADS_FILE, type BackupManifest } from './backup/common';

function run(cmd: string, args: string[], opts: { env?: NodeJS.ProcessEnv; stdinFrom?: string }): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { env: opts.env, stdio: [opts.stdinFrom ? 'pipe' : 'ignore', 'ignore', 'pipe'] });
    let err = '';
    child.stderr!.on('data', (d) => (err += d));
    if (opts.stdinFrom) createReadStream(opts.stdinFrom).pipe(child.stdin!);
    child.on('error', reject);
    child.on('close', (code) =>
      code === 0
        ? resolve()
        : reject(new Error(`${path.basename(cmd)} failed (exit ${code}): ${err.trim().split('\n').slice(-3).join(' ')}`)),
    );
  });
}

async function main(): Promise<void> {
  const { values, positionals } = parseArgs({ options: { yes: { type: 'boolean', default: false } }, allowPositionals: true });
  if (positionals.length !== 1) fail('usage: npm run restore -- <backup folder> [--yes]', 2);
  const dir = path.resolve(positionals[0]);
  if (!existsSync(path.join(dir, MANIFEST))) fail(`restore: ${dir} holds no ${MANIFEST}; give a folder made by \`npm run backup\``, 2);
  const manifest = JSON.parse(await readFile(path.join(dir, MANIFEST), 'utf8')) as BackupManifest;
  if (manifest.format !== 'quorum-backup-1') fail(`restore: unknown backup format "${manifest.format}"`, 2);
  for (const name of [DATABASE_FILE, UPLOADS_FILE]) {
    const expected = manifest.files[name]?.sha256;
    const full = path.join(dir, name);
    if (!expected || !existsSync(full) || (await sha256File(full)) !== expected)
      fail(`restore: ${name} is missing or damaged (sha256 differs from the manifest); nothing was changed`, 3);
  }

  const settings = resolveDbSettings();
  const { client } = clientPrograms();
  const conn = createDb(settings);
  const root = storageRoot();
  try {
    const tables: string[] = (
      await conn('information_schema.tables').where({ table_schema: settings.database }).select('table_name as name')
    ).map((r: { name: string }) => r.name);
    const storageUsed = existsSync(root) && (await readdir(root)).length > 0;
    if ((tables.length || storageUsed) && !values.yes) {
      fail(
        `restore: database \`${settings.database}\` has ${tables.length} tables${storageUsed ? ` and ${root} is not empty` : ''}; add --yes to replace them`,
        2,
      );
    }
    await conn.transaction(async (trx) => {
      await trx.raw('SET FOREIGN_KEY_CHECKS = 0');
      for (const t of tables) await trx.raw('DROP TABLE IF EXISTS ??', [t]);
      await trx.raw('SET FOREIGN_KEY_CHECKS = 1');
    });
  } finally {
    await conn.destroy();
  }
  const { args, env } = connection(settings);
  await run(client, [...args, '--default-character-set=utf8mb4', settings.database], { env, stdinFrom: path.join(dir, DATABASE_FILE) });

  let keptAside: string | null = null;
  if (existsSync(root) && (await readdir(root)).length > 0) {
    keptAside = `${root}.before-restore-${new Date()
      .toISOString()
      .replace(/[-:]/g, '')
      .replace(/\.\d+Z$/, 'Z')}`;
    await rename(root, keptAside);
  }
  await mkdir(root, { recursive: true });
  await run('tar', ['-C', root, '-xf', path.join(dir, UPLOADS_FILE)], {});
  console.log(`restored ${dir} into \`${settings.database}\` and ${root}${keptAside ? ` (previous storage kept in ${keptAside})` : ''}`);
}

main().catch((err: Error) => fail(`restore: ${err.message}`));
