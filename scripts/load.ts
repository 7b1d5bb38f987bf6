/**
 * `npm run load` — the load test (issue 13). Not part of `npm test`; prints figures, checks that no
 * acknowledged vote was lost, and exits non-zero when the realistic phase misses its target.
 *
 * 1. Its own database (`quorum_load`, recreated) on the private MariaDB, 50 raters, ready runs
 *    assigned to them (tiny phantom decompositions), and queued decompositions of larger phantom
 *    runs for two worker processes (`scripts/worker.ts`), which decompose during the test.
 * 2. The production build served by `scripts/serve.ts` on 127.0.0.1 (loopback only), the raters
 *    signed in through the real sign-in.
 * 3. Realistic phase: 50 signed-in raters, each on their own keep-alive connection, each voting
 *    after a pause drawn uniformly from 2–5 s (mean 3.5 s: ≈ 14 votes/s in all), their desk reading
 *    its votes list after about one vote in four. The raters act independently, as people do.
 *    (autocannon's overall rate is split over its connections with timers that start together, so at
 *    a low rate over 50 connections it sends bursts of 50 requests at once every 3.5 s: a pattern no
 *    group of raters makes, and the ramp below measures the server under that anyway.)
 *    Target: vote p95 ≤ 100 ms, 0 errors, 0 lost.
 * 4. Ramp: votes at rising rates over 50 connections until the server no longer keeps up (achieved
 *    rate below 90 % of the asked one, errors, or p95 above 1 s): the throughput limit.
 * 5. Every vote the server acknowledged (200) is in the database: for each rater and component the
 *    highest acknowledged version is the stored version, with the label sent with it.
 *
 * Settings: LOAD_SECONDS (realistic phase, default 60), LOAD_STEP_SECONDS (each ramp step, 10),
 * LOAD_RATES (ramp, votes/s, default 25,50,100,200,400), LOAD_PORT (3190), QUORUM_NEXT_DIST,
 * LOAD_PROFILE_DIR (the server writes a V8 CPU profile there on exit), LOAD_DECOMPOSITIONS (queued
 * phantom runs for the workers, default 24: enough to keep both busy through the realistic phase).
 * The machine may be shared: the figures are only as good as the idle CPU.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import http from 'node:http';
import autocannon from 'autocannon';
import { createRng } from '@/lib/random';
import { summarise, type Sample } from './load/stats';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const DB_NAME = 'quorum_load';
const RATERS = 50;
const RATERS_PER_RUN = 5;
const PORT = Number(process.env.LOAD_PORT ?? 3190);
const BASE = `http://127.0.0.1:${PORT}`;
const SECONDS = Number(process.env.LOAD_SECONDS ?? 60);
const STEP_SECONDS = Number(process.env.LOAD_STEP_SECONDS ?? 10);
const RATES = (process.env.LOAD_RATES ?? '25,50,100,200,400').split(',').map(Number);
const MEAN_VOTE_GAP_S = 3.5;
/** Enough phantom runs to keep both workers decomposing through the realistic phase (checked and printed). */
const QUEUED_DECOMPOSITIONS = Number(process.env.LOAD_DECOMPOSITIONS ?? 24);
const children: ChildProcess[] = [];

function log(line: string) {
  process.stdout.write(`load: ${line}\n`);
}

type Rater = { id: number; email: string; cookie: string; runId: number; components: number[]; next: number };
type Sent = { raterId: number; componentId: number; label: string };
type Ack = { raterId: number; componentId: number; version: number; label: string };

async function prepare(uploads: string) {
  const { execFileSync } = await import('node:child_process');
  execFileSync('bash', ['scripts/db.sh', 'start'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
  execFileSync(process.execPath, ['--import', 'tsx', 'scripts/reset-database.ts', DB_NAME], { cwd: root, stdio: 'inherit' });
  Object.assign(process.env, { QUORUM_DB_NAME: DB_NAME, QUORUM_UPLOADS_DIR: uploads });
  const { createDb } = await import('@/lib/db/knex');
  const { migrationSource } = await import('../knexfile');
  const { hashPassword } = await import('@/lib/auth/password');
  const { createReadyRun } = await import('../tests/e2e/helpers/ready-run');
  const { createRun, createStudyWithRaters, writePhantomRunFile } = await import('../tests/integration/helpers/factories');
  const { queueDecomposition } = await import('@/lib/runs/queue-job');
  const db = createDb();
  try {
    await db.migrate.latest({ migrationSource });
    const { studyId, leadId, raterIds } = await createStudyWithRaters(db, { raters: RATERS, raters_per_run: RATERS_PER_RUN });
    const hash = await hashPassword('load-test-password');
    await db('users').whereIn('id', raterIds).update({ password_hash: hash });
    const raters: Rater[] = [];
    for (let r = 0; r < RATERS; r += RATERS_PER_RUN) {
      const group = raterIds.slice(r, r + RATERS_PER_RUN);
      const run = await createReadyRun(db, {
        studyId,
        createdBy: leadId,
        raterIds: group,
        size: 'tiny',
        seed: 100 + r,
        components: 12,
        sub: `load${r}`,
      });
      for (const id of group) {
        const { email } = await db('users').where({ id }).first('email');
        raters.push({ id, email, cookie: '', runId: run.runId, components: run.componentIds, next: 0 });
      }
    }
    // work for the two workers: larger phantom runs, queued
    for (let i = 0; i < QUEUED_DECOMPOSITIONS; i++) {
      const file = await writePhantomRunFile({ size: 'small', seed: 500 + i });
      const runId = await createRun(db, { studyId, createdBy: leadId, file, sub: `work${i}` });
      await queueDecomposition(db, { runId });
    }
    return raters;
  } finally {
    await db.destroy();
  }
}

/** Starts a child; `ownSession` puts it in its own session (setsid), as a separately started service would be. */
function start(
  args: string[],
  env: Record<string, string>,
  name: string,
  { flags = [] as string[], ownSession = false } = {},
): ChildProcess {
  const child = spawn(process.execPath, [...flags, '--conditions=react-server', '--import', 'tsx', ...args], {
    cwd: root,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: ownSession,
  });
  child.stderr!.on('data', (b: Buffer) => process.stderr.write(`[${name}] ${b}`));
  child.stdout!.resume();
  children.push(child);
  return child;
}

async function waitForHealth() {
  for (;;) {
    const ok = await fetch(`${BASE}/api/health`).then(
      (r) => r.ok,
      () => false,
    );
    if (ok) return;
    await new Promise((r) => setTimeout(r, 250));
  }
}

async function signIn(rater: Rater, i: number) {
  const csrfRes = await fetch(`${BASE}/api/auth/csrf`);
  const csrfCookie = csrfRes.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${BASE}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    // each rater from their own (documentation-range) address, as in a facility; the sign-in throttle is per address
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookie, 'x-forwarded-for': `198.51.100.${i + 1}` },
    body: new URLSearchParams({ csrfToken, email: rater.email, password: 'load-test-password', json: 'true' }),
  });
  const session = res.headers.getSetCookie().find((c) => c.startsWith('next-auth.session-token='));
  if (!session) throw new Error(`sign-in failed for ${rater.email}: ${res.status}`);
  rater.cookie = session.split(';')[0];
}

const LABELS = ['signal', 'noise', 'uncertain'] as const;
/** The vote version each rater last saw, per component (the desk sends it as baseVersion). */
const versions = new Map<string, number>();

/** One autocannon run of votes (round-robin over raters and their components) at `rate` requests/s. */
function voteLoad(raters: Rater[], opts: { rate: number; seconds: number; connections: number }, acks: Ack[], samples: Sample[]) {
  let turn = 0;
  let finished!: () => void;
  const ended = new Promise<void>((resolve) => (finished = resolve));
  const instance = autocannon(
    {
      url: BASE,
      connections: opts.connections,
      overallRate: opts.rate,
      duration: opts.seconds,
      requests: [
        {
          setupRequest: (req: autocannon.Request, context: object) => {
            const rater = raters[turn++ % raters.length];
            const componentId = rater.components[rater.next++ % rater.components.length];
            const label = LABELS[(rater.next + rater.id) % LABELS.length];
            const key = `${rater.id}:${componentId}`;
            (context as { sent?: Sent }).sent = { raterId: rater.id, componentId, label };
            return {
              ...req,
              method: 'PUT',
              path: `/api/runs/${rater.runId}/votes/${componentId}`,
              headers: { cookie: rater.cookie, 'content-type': 'application/json', origin: BASE },
              body: JSON.stringify({ label, noiseKind: label === 'noise' ? 'motion' : null, baseVersion: versions.get(key) ?? 0 }),
            };
          },
          onResponse: (status: number, body: string, context: object) => {
            const sent = (context as { sent: Sent }).sent;
            if (status !== 200) return;
            const vote = (JSON.parse(body) as { vote: { version: number; label: string } }).vote;
            versions.set(`${sent.raterId}:${sent.componentId}`, vote.version);
            acks.push({ ...sent, version: vote.version, label: vote.label });
          },
        },
      ],
    },
    () => finished(),
  );
  instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => samples.push({ status, ms }));
  instance.on('reqError', () => samples.push({ status: 0, ms: NaN }));
  return ended;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** One HTTP request on `agent` (node:http); resolves with the status and body. */
function send(
  agent: http.Agent,
  method: string,
  urlPath: string,
  headers: Record<string, string>,
  body?: string,
): Promise<{ status: number; text: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      `${BASE}${urlPath}`,
      { method, agent, headers: body ? { ...headers, 'content-length': String(Buffer.byteLength(body)) } : headers },
      (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString('utf8') }));
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    req.end(body);
  });
}

/**
 * One rater at a realistic pace until `until`: pause 2–5 s (uniform), vote on the next component of
 * their run with the version they last saw; after about one vote in four their desk reads the votes
 * list. Each rater has their own keep-alive connection.
 */
async function raterAtPace(rater: Rater, until: number, acks: Ack[], votes: Sample[], reads: Sample[], random: () => number) {
  const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
  try {
    await sleep(random() * 5000); // raters do not start together
    while (Date.now() < until) {
      const componentId = rater.components[rater.next++ % rater.components.length];
      const label = LABELS[(rater.next + rater.id) % LABELS.length];
      const key = `${rater.id}:${componentId}`;
      const body = JSON.stringify({ label, noiseKind: label === 'noise' ? 'motion' : null, baseVersion: versions.get(key) ?? 0 });
      const t0 = performance.now();
      try {
        const res = await send(
          agent,
          'PUT',
          `/api/runs/${rater.runId}/votes/${componentId}`,
          { cookie: rater.cookie, 'content-type': 'application/json', origin: BASE },
          body,
        );
        votes.push({ status: res.status, ms: performance.now() - t0 });
        if (res.status === 200) {
          const vote = (JSON.parse(res.text) as { vote: { version: number; label: string } }).vote;
          versions.set(key, vote.version);
          acks.push({ raterId: rater.id, componentId, version: vote.version, label: vote.label });
        }
      } catch {
        votes.push({ status: 0, ms: NaN });
      }
      if (random() < 0.25) {
        const t1 = performance.now();
        try {
          const res = await send(agent, 'GET', `/api/runs/${rater.runId}/votes`, { cookie: rater.cookie });
          reads.push({ status: res.status, ms: performance.now() - t1 });
        } catch {
          reads.push({ status: 0, ms: NaN });
        }
      }
      await sleep(2000 + random() * 3000);
    }
  } finally {
    agent.destroy();
  }
}

/** "2 running, 4 succeeded": the decompose jobs by state. */
async function decompositionStates(): Promise<string> {
  const { createDb } = await import('@/lib/db/knex');
  const db = createDb();
  try {
    const jobs: { status: string; n: number }[] = await db('jobs')
      .where({ kind: 'decompose' })
      .select('status')
      .count({ n: '*' })
      .groupBy('status');
    return jobs.map((j) => `${j.n} ${j.status}`).join(', ');
  } finally {
    await db.destroy();
  }
}

async function checkAcknowledged(acks: Ack[]): Promise<{ checked: number; lost: string[] }> {
  const { createDb } = await import('@/lib/db/knex');
  const db = createDb();
  try {
    const latest = new Map<string, Ack>();
    for (const a of acks) {
      const key = `${a.raterId}:${a.componentId}`;
      if ((latest.get(key)?.version ?? -1) < a.version) latest.set(key, a);
    }
    const rows = await db('votes').select('rater_id as raterId', 'component_id as componentId', 'version', 'label');
    const stored = new Map(rows.map((r) => [`${r.raterId}:${r.componentId}`, r]));
    const lost: string[] = [];
    for (const [key, a] of latest) {
      const row = stored.get(key);
      if (!row || row.version !== a.version || row.label !== a.label)
        lost.push(`${key}: acknowledged v${a.version} ${a.label}, stored ${row ? `v${row.version} ${row.label}` : 'nothing'}`);
    }
    return { checked: latest.size, lost };
  } finally {
    await db.destroy();
  }
}

async function main() {
  const dist = process.env.QUORUM_NEXT_DIST || '.next';
  if (!existsSync(path.join(root, dist, 'BUILD_ID'))) {
    console.error(`load: no production build in ${dist}/ — run \`npx next build\` first`);
    process.exit(2);
  }
  // LOAD_PROFILE_DIR: the server writes a V8 CPU profile there when it exits (open it in Chrome's DevTools)
  const profileFlags = process.env.LOAD_PROFILE_DIR ? ['--cpu-prof', `--cpu-prof-dir=${path.resolve(process.env.LOAD_PROFILE_DIR)}`] : [];
  const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-load-'));
  try {
    log(`preparing ${DB_NAME}: ${RATERS} raters, ${RATERS / RATERS_PER_RUN} ready runs, 6 queued decompositions`);
    const raters = await prepare(uploads);
    const env = {
      QUORUM_DB_NAME: DB_NAME,
      QUORUM_UPLOADS_DIR: uploads,
      NEXTAUTH_SECRET: 'load-test-secret-'.padEnd(48, 'x'),
      NEXTAUTH_URL: BASE,
    };
    start(
      ['scripts/serve.ts'],
      { ...env, QUORUM_HOST: '127.0.0.1', PORT: String(PORT), QUORUM_SKIP_MIGRATE: '1', QUORUM_TRUST_PROXY: '1' },
      'server',
      { flags: profileFlags },
    );
    await waitForHealth();
    for (const [i, r] of raters.entries()) await signIn(r, i);
    log(`${raters.length} raters signed in; starting two workers`);
    // the workers run as a facility runs them, as their own service (own session): they lower their
    // priority, and their session group's (lib/worker/cpu-priority.ts)
    for (const w of ['load-w1', 'load-w2'])
      start(['scripts/worker.ts'], { ...env, QUORUM_WORKER_ID: w, QUORUM_DECOMPOSE_THREADS: '1' }, w, { ownSession: true });

    // warm-up (not measured): every rater opens their desk's votes and votes once, as on arrival
    const warm: Ack[] = [];
    for (const rater of raters) {
      await fetch(`${BASE}/api/runs/${rater.runId}/votes`, { headers: { cookie: rater.cookie } });
      const componentId = rater.components[rater.next++];
      const res = await fetch(`${BASE}/api/runs/${rater.runId}/votes/${componentId}`, {
        method: 'PUT',
        headers: { cookie: rater.cookie, 'content-type': 'application/json', origin: BASE },
        body: JSON.stringify({ label: 'signal', baseVersion: 0 }),
      });
      if (!res.ok) continue;
      const version = ((await res.json()) as { vote: { version: number } }).vote.version;
      versions.set(`${rater.id}:${componentId}`, version);
      warm.push({ raterId: rater.id, componentId, version, label: 'signal' });
    }

    // realistic pace: 50 raters acting independently, one vote each per 2–5 s, and their desks' reads
    const acks: Ack[] = [...warm];
    const votes: Sample[] = [];
    const reads: Sample[] = [];
    log(`  decompositions when the phase started: ${await decompositionStates()}`);
    log(
      `realistic phase: ${SECONDS} s, ${RATERS} raters each voting after a 2–5 s pause (≈ ${(RATERS / MEAN_VOTE_GAP_S).toFixed(0)} votes/s), their desks reading after ~1 vote in 4, while two workers decompose`,
    );
    const random = createRng(20261202, 'hashed').next;
    const until = Date.now() + SECONDS * 1000;
    await Promise.all(raters.map((r) => raterAtPace(r, until, acks, votes, reads, random)));
    const v = summarise(votes, SECONDS);
    const r = summarise(reads, SECONDS);
    log(`  decompositions when the phase ended: ${await decompositionStates()}`);
    log(
      `  votes: ${v.count} (${v.rate.toFixed(1)}/s)  p50 ${v.p50.toFixed(1)} ms  p95 ${v.p95.toFixed(1)} ms  p99 ${v.p99.toFixed(1)} ms  errors ${v.errors}`,
    );
    log(
      `  reads: ${r.count} (${r.rate.toFixed(1)}/s)  p50 ${r.p50.toFixed(1)} ms  p95 ${r.p95.toFixed(1)} ms  p99 ${r.p99.toFixed(1)} ms  errors ${r.errors}`,
    );

    // ramp: votes only, 50 connections, rising rates
    log('ramp (votes, 50 connections):');
    let limit = 0;
    for (const rate of RATES) {
      const samples: Sample[] = [];
      await voteLoad(raters, { rate, seconds: STEP_SECONDS, connections: RATERS }, acks, samples);
      const s = summarise(samples, STEP_SECONDS);
      log(
        `  asked ${rate}/s → ${s.rate.toFixed(1)}/s  p50 ${s.p50.toFixed(1)} ms  p95 ${s.p95.toFixed(1)} ms  p99 ${s.p99.toFixed(1)} ms  errors ${s.errors}`,
      );
      limit = Math.max(limit, s.rate);
      if (s.rate < 0.9 * rate || s.errors > 0 || s.p95 > 1000) break;
    }
    log(`  throughput limit ≈ ${limit.toFixed(0)} votes/s on this machine`);

    const { checked, lost } = await checkAcknowledged(acks);
    log(`acknowledged votes: ${acks.length} (${checked} rater × component pairs checked), lost: ${lost.length}`);
    for (const l of lost.slice(0, 10)) log(`  LOST ${l}`);
    log(`decompositions during the test: ${await decompositionStates()}`);
    log(
      `os: ${os.cpus().length} cores, load average ${os
        .loadavg()
        .map((x) => x.toFixed(2))
        .join(' ')} (the machine may be shared)`,
    );
    const ok = v.p95 <= 100 && v.errors === 0 && r.errors === 0 && lost.length === 0;
    log(ok ? 'target met: vote p95 ≤ 100 ms, 0 errors, 0 lost' : 'TARGET MISSED (vote p95 ≤ 100 ms, 0 errors, 0 lost)');
    process.exitCode = ok ? 0 : 1;
  } finally {
    for (const c of children) c.kill('SIGTERM');
    await Promise.all(
      children.map((c) => (c.exitCode !== null || c.signalCode ? Promise.resolve() : new Promise((r) => c.once('exit', r)))),
    );
    await rm(uploads, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error('load:', err instanceof Error ? err.message : err);
  for (const c of children) c.kill('SIGTERM');
  process.exit(1);
});
