/**
 * npm run backup / npm run restore against the real MariaDB: a database with votes, decisions, a
 * release (with its files) and uploaded runs is backed up, wiped (every table dropped, the storage
 * root removed), restored, and every vote, decision, release, audit entry and stored file is found
 * identical. Runs on its own database (quorum_test_backup) so the shared test database is untouched.
 */
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('server-only', () => ({}));

const DB_NAME = 'quorum_test_backup';
process.env.QUORUM_DB_NAME = DB_NAME;
const work = await mkdtemp(path.join(os.tmpdir(), 'quorum-backup-'));
const uploads = path.join(work, 'uploads');
process.env.QUORUM_UPLOADS_DIR = uploads;

const { recreateDatabase } = await import('./global-setup');
const { resolveDbSettings } = await import('@/lib/db/config');
const { migrationSource } = await import('../../knexfile');
const { db, closeDb } = await import('@/lib/db/knex');
const { seedDemo } = await import('@/db/seeds/demo');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const { requestRelease } = await import('@/lib/releases/create-release');
const { runReleaseJobs } = await import('./helpers/release-jobs');

const root = path.resolve(import.meta.dirname, '../..');
const run = promisify(execFile);
const scriptEnv = { ...process.env, QUORUM_DB_NAME: DB_NAME, QUORUM_UPLOADS_DIR: uploads };

const TABLES = [
  'users',
  'studies',
  'study_members',
  'runs',
  'decompositions',
  'components',
  'assignments',
  'votes',
  'decisions',
  'releases',
  'release_decisions',
  'audit_log',
];

/** Every row of the tables above (ordered by primary key) and every stored file with its sha256. */
async function snapshot() {
  const rows: Record<string, unknown[]> = {};
  for (const t of TABLES) rows[t] = await db(t).select('*').orderByRaw('1');
  const files: Record<string, string> = {};
  for (const entry of await readdir(uploads, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const full = path.join(entry.parentPath, entry.name);
    files[path.relative(uploads, full)] = createHash('sha256')
      .update(await readFile(full))
      .digest('hex');
  }
  return { rows, files };
}

beforeAll(async () => {
  await recreateDatabase(resolveDbSettings(), DB_NAME);
  await db.migrate.latest({ migrationSource });
  const seeded = await seedDemo(db);
  const u = (n: string) => seeded.users[`${n}@fernhollow.example`];
  const ready = await createReadyRun(db, {
    studyId: seeded.studyId,
    createdBy: u('lead'),
    raterIds: [u('rater1'), u('rater2')],
    size: 'tiny',
    seed: 31,
    sub: 'bk01',
    components: 6,
  });
  for (const [n, componentId] of ready.componentIds.entries()) {
    const label = n % 3 === 0 ? 'noise' : 'signal';
    await db('votes').insert([
      {
        component_id: componentId,
        run_id: ready.runId,
        rater_id: u('rater1'),
        label,
        noise_kind: label === 'noise' ? 'motion' : null,
        note: n === 1 ? 'edge ring — émoji 😀' : null,
      },
      { component_id: componentId, run_id: ready.runId, rater_id: u('rater2'), label, noise_kind: label === 'noise' ? 'motion' : null },
    ]);
    await db('decisions').insert({
      component_id: componentId,
      run_id: ready.runId,
      label,
      noise_kind: label === 'noise' ? 'motion' : null,
      method: 'unanimous',
    });
  }
  await db('assignments')
    .where({ run_id: ready.runId })
    .update({ submitted_at: db.fn.now(3) });
  await requestRelease({
    user: { id: u('lead'), role: 'lead', name: 'Priya Nandakumar' },
    studyId: seeded.studyId,
    runId: ready.runId,
    notes: 'backup test',
  });
  expect((await runReleaseJobs(db)).map((j) => j.outcome)).toEqual(['succeeded']);
});

afterAll(async () => {
  await db.raw('DROP DATABASE IF EXISTS ??', [DB_NAME]).catch(() => undefined);
  await closeDb();
  await rm(work, { recursive: true, force: true });
});

describe('backup and restore', () => {
  it('restores every vote, decision, release and file identically after a wipe', async () => {
    const before = await snapshot();
    expect(before.rows.votes).toHaveLength(12);
    expect(before.rows.releases).toHaveLength(1);
    expect(Object.keys(before.files).some((f) => f.startsWith('releases/'))).toBe(true);
    expect(Object.keys(before.files).some((f) => f.startsWith('runs/'))).toBe(true);

    const { stdout } = await run('node', ['--import', 'tsx', 'scripts/backup.ts', '--out', path.join(work, 'backups')], {
      cwd: root,
      env: scriptEnv,
    });
    const folder = stdout.trim();
    const manifest = JSON.parse(await readFile(path.join(folder, 'manifest.json'), 'utf8'));
    expect(manifest).toMatchObject({ format: 'quorum-backup-1', database: DB_NAME });

    // the wipe: every table and every file gone
    const tables = (await db('information_schema.tables').where({ table_schema: DB_NAME }).select('table_name as name')).map(
      (r: { name: string }) => r.name,
    );
    await db.transaction(async (trx) => {
      await trx.raw('SET FOREIGN_KEY_CHECKS = 0');
      for (const t of tables) await trx.raw('DROP TABLE ??', [t]);
    });
    await rm(uploads, { recursive: true, force: true });
    expect(Number((await db('information_schema.tables').where({ table_schema: DB_NAME }).count({ n: '*' }))[0].n)).toBe(0);

    const restored = await run('node', ['--import', 'tsx', 'scripts/restore.ts', folder], { cwd: root, env: scriptEnv });
    expect(restored.stdout).toMatch(new RegExp(`restored .* into \`${DB_NAME}\``));
    expect(await snapshot()).toEqual(before);
  });

  it('refuses to overwrite a database with tables without --yes, and a damaged backup at all', async () => {
    const { stdout } = await run('node', ['--import', 'tsx', 'scripts/backup.ts', '--out', path.join(work, 'backups2')], {
      cwd: root,
      env: scriptEnv,
    });
    const folder = stdout.trim();
    const refused = await run('node', ['--import', 'tsx', 'scripts/restore.ts', folder], { cwd: root, env: scriptEnv }).catch((e) => e);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/has \d+ tables .* add --yes to replace them/);
    await rm(path.join(folder, 'uploads.tar'));
    const damaged = await run('node', ['--import', 'tsx', 'scripts/restore.ts', folder, '--yes'], { cwd: root, env: scriptEnv }).catch(
      (e) => e,
    );
    expect(damaged.code).toBe(3);
    expect(damaged.stderr).toMatch(/uploads\.tar is missing or damaged \(sha256 differs from the manifest\); nothing was changed/);
  });
});
