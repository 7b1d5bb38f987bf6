// Throughput of decompositions through the worker: a batch of BENCH_RUNS (default 20) realistic
// S-size phantom runs (64×64×36×300, lib/phantom/realistic.ts) decomposed with the study defaults,
// (1) by one worker with the local executor (the engine on both cores), then (2) by one worker
// with the Slurm executor on the private single-node Slurm of scripts/slurm.sh (the node's CPUs,
// one CPU and BENCH_SLURM_MEM per run, so runs go side by side). Prints runs per minute from the
// first enqueue to the last run ready — the figure a facility sizes its cluster with. Uses its own
// database (quorum_bench_test, recreated) and storage under .data/bench-cluster/. The 1-minute load
// average is printed beside each figure: the machine may be shared.
import { execFileSync, spawn } from 'node:child_process';
import { copyFile, mkdir, rm } from 'node:fs/promises';
import { loadavg, cpus } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

function runWorker(env: Record<string, string>): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--conditions=react-server', '--import', 'tsx', 'scripts/worker.ts', '--once'], {
      cwd: root,
      env: { ...process.env, ...env },
      stdio: ['ignore', 'ignore', 'inherit'],
    });
    child.on('error', reject);
    child.on('exit', (code) => resolve(code ?? 1));
  });
}

export async function main(): Promise<void> {
  const n = Number(process.env.BENCH_RUNS ?? 20);
  const uploads = path.join(root, '.data/bench-cluster');
  await rm(uploads, { recursive: true, force: true });
  await mkdir(uploads, { recursive: true });
  process.env.QUORUM_UPLOADS_DIR = uploads;
  process.env.QUORUM_DB_NAME = 'quorum_bench_test';
  execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'start'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  const { resolveDbSettings } = await import('@/lib/db/config');
  const { recreateDatabase } = await import('../../tests/integration/global-setup');
  const settings = resolveDbSettings();
  await recreateDatabase(settings, settings.database);
  const { db, closeDb } = await import('@/lib/db/knex');
  const { migrationSource } = await import('../../knexfile');
  await db.migrate.latest({ migrationSource });
  const { createStudyWithRaters, createRun } = await import('../../tests/integration/helpers/factories');
  const { generatePhantom, phantomToNiftiInput } = await import('@/lib/phantom');
  const { writeNiftiFile } = await import('@/lib/nifti');
  const { ensureDirFor, newKey } = await import('@/lib/storage');
  const { queueDecomposition } = await import('@/lib/runs/queue-job');

  const slurmWasRunning = (() => {
    try {
      execFileSync('bash', [path.join(root, 'scripts/slurm.sh'), 'status'], { stdio: 'ignore' });
      return true;
    } catch {
      return false;
    }
  })();
  try {
    console.log(`writing ${n} realistic S phantom runs (64×64×36×300)…`);
    const phantom = generatePhantom({ size: 'S', seed: 1, model: 'realistic' });
    const first = newKey('runs', '.nii.gz');
    await writeNiftiFile(await ensureDirFor(first), phantomToNiftiInput(phantom));
    // no raters: no assignment mails, so the worker's queue holds the decompositions only
    const { studyId, leadId } = await createStudyWithRaters(db, { raters: 0 });
    const runIds: number[] = [];
    for (let i = 0; i < n; i++) {
      const key = i === 0 ? first : newKey('runs', '.nii.gz');
      if (i > 0) await copyFile(path.join(uploads, first), await ensureDirFor(key));
      runIds.push(
        await createRun(db, { studyId, createdBy: leadId, file: { fileKey: key, sha256: `bench-${i}`, sizeBytes: 0 }, sub: `b${i + 1}` }),
      );
    }
    const batch = async (label: string, env: Record<string, string>) => {
      await db('jobs').del();
      const load0 = loadavg()[0]!;
      const t0 = performance.now();
      for (const runId of runIds) await queueDecomposition(db, { runId });
      const code = await runWorker({ QUORUM_UPLOADS_DIR: uploads, QUORUM_DB_NAME: settings.database, ...env });
      const wall = (performance.now() - t0) / 1000;
      // from the first job's creation to the last one's completion, on the database's clock
      const span = await db('jobs')
        .where({ kind: 'decompose' })
        .first(db.raw('TIMESTAMPDIFF(MICROSECOND, MIN(created_at), MAX(finished_at)) / 1e6 AS s'));
      const seconds = Number(span?.s ?? wall);
      const ok = Number((await db('jobs').where({ kind: 'decompose', status: 'succeeded' }).count({ n: '*' }).first())?.n ?? 0);
      const line = `${label}: ${ok}/${n} runs ready in ${seconds.toFixed(0)} s → ${(ok / (seconds / 60)).toFixed(2)} runs/min (worker exit ${code}; load ${load0.toFixed(1)}→${loadavg()[0]!.toFixed(1)})`;
      console.log(line);
    };
    await batch('local executor (one worker, engine on all cores)', { QUORUM_EXECUTOR: 'local' });
    if (!slurmWasRunning) execFileSync('bash', [path.join(root, 'scripts/slurm.sh'), 'start'], { stdio: ['ignore', 'ignore', 'inherit'] });
    const conf = path.join(root, '.data/slurm/slurm.conf');
    await batch(`slurm executor (single node, ${cpus().length} CPUs, 1 CPU per run)`, {
      QUORUM_EXECUTOR: 'slurm',
      SLURM_CONF: process.env.SLURM_CONF ?? conf,
      QUORUM_SLURM_CPUS: '1',
      QUORUM_SLURM_MEM: process.env.BENCH_SLURM_MEM ?? '2000M',
      QUORUM_SLURM_TIME: '01:00:00',
      QUORUM_SLURM_POLL_MS: '1000',
    });
  } finally {
    if (!slurmWasRunning) execFileSync('bash', [path.join(root, 'scripts/slurm.sh'), 'stop'], { stdio: 'ignore' });
    await closeDb();
    await rm(uploads, { recursive: true, force: true });
  }
}
