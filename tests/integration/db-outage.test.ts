/**
 * Issue 13, faults: MariaDB stops while raters vote. The test owns a throw-away MariaDB instance
 * (scripts/db.sh with QUORUM_DB_DATA in a temporary folder, on a free port) so that stopping it
 * touches no other test. Through the real vote route:
 * - while the database is down every vote and read answers 503 with a plain message (also a vote
 *   whose transaction was in flight — waiting on a row lock — when the server went away);
 * - after the database is back the same process answers again, without a restart;
 * - every vote the server acknowledged (200) is in the database; the desk's outbox keeps the
 *   votes that got 503 and they go through once the database is back.
 * Deterministic: the test waits for states (the waiting statement in the process list, server
 * stopped, server answering), never for durations.
 */
import { execFile } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const root = path.resolve(import.meta.dirname, '../..');

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

const dataDir = await mkdtemp(path.join(os.tmpdir(), 'quorum-outage-db-'));
const port = await freePort();
const dbEnv = { ...process.env, QUORUM_DB_DATA: dataDir, QUORUM_DB_PORT: String(port) } as NodeJS.ProcessEnv;
delete dbEnv.DATABASE_URL;

/** scripts/db.sh start|stop on this test's own instance; resolves when the command has finished (the server is up, or gone). */
function dbsh(cmd: 'start' | 'stop'): Promise<string> {
  return new Promise((resolve, reject) => {
    execFile('bash', [path.join(root, 'scripts/db.sh'), cmd], { cwd: root, env: dbEnv, timeout: 120_000 }, (err, stdout, stderr) =>
      err ? reject(new Error(`db.sh ${cmd}: ${stdout}${stderr}`)) : resolve(stdout),
    );
  });
}

await dbsh('start');
// this file's application modules talk to the private instance, not the shared test database
Object.assign(process.env, { QUORUM_DB_PORT: String(port), QUORUM_DB_NAME: 'quorum_test' });
delete process.env.DATABASE_URL;
const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-outage-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb, createDb } = await import('@/lib/db/knex');
const { migrationSource } = await import('@/knexfile');
const { createStudyWithRaters } = await import('./helpers/factories');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');
const votesRoute = await import('@/app/api/runs/[id]/votes/route');
const outbox = await import('@/lib/desk/outbox');

let raterId: number;
let run: Awaited<ReturnType<typeof createReadyRun>>;
/** Votes the server acknowledged (200): component id → label. */
const acknowledged = new Map<number, string>();
const versions = new Map<number, number>();

beforeAll(async () => {
  await db.migrate.latest({ migrationSource });
  const s = await createStudyWithRaters(db, { raters: 1, raters_per_run: 1 });
  raterId = s.raterIds[0];
  run = await createReadyRun(db, {
    studyId: s.studyId,
    createdBy: s.leadId,
    raterIds: [raterId],
    size: 'tiny',
    seed: 5,
    components: 6,
    sub: 'outage',
  });
});
afterAll(async () => {
  await closeDb().catch(() => undefined);
  await dbsh('stop').catch(() => undefined);
  await rm(dataDir, { recursive: true, force: true });
  await rm(uploads, { recursive: true, force: true });
});

async function vote(componentId: number, label: string) {
  actAs(raterId);
  const res = await callRoute(voteRoute.PUT, {
    method: 'PUT',
    url: `/api/runs/${run.runId}/votes/${componentId}`,
    params: { id: String(run.runId), componentId: String(componentId) },
    body: { label, noiseKind: label === 'noise' ? 'motion' : null, baseVersion: versions.get(componentId) ?? 0 },
  });
  if (res.status === 200) {
    acknowledged.set(componentId, label);
    versions.set(componentId, res.json.vote.version);
  }
  return res;
}

function expectDatabaseDown(res: { status: number; json: { error?: { message?: string } } | null }, where: string) {
  expect(res.status, `${where}: ${JSON.stringify(res.json)}`).toBe(503);
  expect(res.json?.error?.message, where).toBe('The database is not reachable right now. Try again in a moment.');
}

/** Every acknowledged vote, read back from the database. */
async function expectNoAcknowledgedVoteLost() {
  const rows = await db('votes').where({ run_id: run.runId, rater_id: raterId }).select('component_id as componentId', 'label');
  const stored = new Map(rows.map((r) => [Number(r.componentId), r.label]));
  for (const [componentId, label] of acknowledged) expect(stored.get(componentId), `component ${componentId}`).toBe(label);
}

async function waitUntil(check: () => Promise<boolean>, what: string) {
  for (let i = 0; i < 2_000; i++) {
    if (await check()) return;
    await new Promise((r) => setImmediate(r));
  }
  throw new Error(`never reached: ${what}`);
}

describe('MariaDB stops during voting', () => {
  it('answers 503 while down, recovers without a restart, loses no acknowledged vote', async () => {
    const [c0, c1, c2] = run.componentIds;
    expect((await vote(c0, 'noise')).status).toBe(200);
    expect((await vote(c1, 'signal')).status).toBe(200);

    await dbsh('stop');
    expectDatabaseDown(await vote(c2, 'noise'), 'a new vote');
    expectDatabaseDown(await vote(c0, 'signal'), 'a changed vote');
    actAs(raterId);
    expectDatabaseDown(
      await callRoute(votesRoute.GET, { url: `/api/runs/${run.runId}/votes`, params: { id: String(run.runId) } }),
      "the desk's read",
    );

    await dbsh('start');
    const back = await vote(c2, 'noise');
    expect(back.status, JSON.stringify(back.json)).toBe(200);
    await expectNoAcknowledgedVoteLost();
    // the vote that got 503 was not applied
    expect(await db('votes').where({ component_id: c0, rater_id: raterId }).first('label')).toEqual({ label: 'noise' });
  });

  it('a vote in flight (its transaction waiting on a lock) when the server stops gets 503, not 500', async () => {
    const [c0] = run.componentIds;
    const blocker = createDb();
    const trx = await blocker.transaction();
    await trx('votes').where({ component_id: c0, rater_id: raterId }).forUpdate().first('id');
    const inFlight = vote(c0, 'uncertain');
    await waitUntil(async () => {
      // a connection sees its own user's threads: the vote's statement is running (waiting) on another one
      const [rows] = await blocker.raw(
        "SELECT COUNT(*) AS n FROM information_schema.processlist WHERE command = 'Query' AND id <> CONNECTION_ID() AND info LIKE '%votes%'",
      );
      return Number(rows[0].n) > 0;
    }, 'the vote waits on the row lock');

    await dbsh('stop');
    expectDatabaseDown(await inFlight, 'the vote in flight');
    await trx.rollback().catch(() => undefined);
    await blocker.destroy();

    await dbsh('start');
    expect(await db('votes').where({ component_id: c0, rater_id: raterId }).first('label')).toEqual({ label: 'noise' });
    const back = await vote(c0, 'signal');
    expect(back.status, JSON.stringify(back.json)).toBe(200);
    await expectNoAcknowledgedVoteLost();
  });

  it('the desk keeps a vote that got 503 in its outbox and sends it once the database is back', async () => {
    const store = new Map<string, string>();
    vi.stubGlobal('window', {
      localStorage: {
        getItem: (k: string) => store.get(k) ?? null,
        setItem: (k: string, v: string) => store.set(k, v),
        removeItem: (k: string) => store.delete(k),
      },
    });
    try {
      const key = outbox.outboxKey(raterId, run.runId);
      const c3 = run.componentIds[3];
      outbox.queueChange(key, c3, { label: 'noise', noiseKind: 'motion' }, versions.get(c3) ?? 0);

      /** What the desk's sender does with each queued change (lib/desk/use-vote.ts flush). */
      const sendQueued = async () => {
        for (const [id, change] of Object.entries(outbox.readOutbox(key))) {
          actAs(raterId);
          const res = await callRoute(voteRoute.PUT, {
            method: 'PUT',
            url: `/api/runs/${run.runId}/votes/${id}`,
            params: { id: String(run.runId), componentId: id },
            body: { ...change.fields, baseVersion: change.baseVersion },
          });
          if (res.status === 200) {
            outbox.acknowledge(key, Number(id), change.fields, res.json.vote.version);
            acknowledged.set(Number(id), res.json.vote.label);
          } else if (!outbox.isTransient(res.status)) outbox.dropChange(key, Number(id));
        }
      };

      await dbsh('stop');
      await sendQueued();
      expect(Object.keys(outbox.readOutbox(key)), 'kept after 503').toEqual([String(c3)]);
      await dbsh('start');
      await sendQueued();
      expect(outbox.readOutbox(key)).toEqual({});
      expect(await db('votes').where({ component_id: c3, rater_id: raterId }).first('label')).toEqual({ label: 'noise' });
      await expectNoAcknowledgedVoteLost();
    } finally {
      vi.unstubAllGlobals();
    }
  });
});
