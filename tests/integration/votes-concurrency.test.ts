/**
 * Issue 13, load: votes of different raters of one study go side by side. A vote locks its rater's
 * assignment row and its component row exclusively, and the run, study and decomposition rows only
 * in share mode (lib/db/queries/desk.ts findAssignedRun via lib/runs/assigned-run.ts, lib/db/queries/votes.ts saveVote). Before,
 * the run's join was read FOR UPDATE, which locked the study row: every vote of the study waited for
 * the one in flight, and latency grew with the number of raters.
 *
 * Each check holds what a vote in flight holds in one transaction and asks for the locks of another
 * request in a second one that gives up on the first lock wait (error 1205): the verdict is whether
 * the lock was held, not how long anything took.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-votes-conc-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { findAssignedRun } = await import('@/lib/db/queries/desk');
const { createStudyWithRaters } = await import('./helpers/factories');
const { createReadyRun } = await import('../e2e/helpers/ready-run');
const voteRoute = await import('@/app/api/runs/[id]/votes/[componentId]/route');

let studyId: number;
let raters: number[];
let run: Awaited<ReturnType<typeof createReadyRun>>;

beforeAll(async () => {
  const s = await createStudyWithRaters(db, { raters: 4, raters_per_run: 4 });
  studyId = s.studyId;
  raters = s.raterIds;
  run = await createReadyRun(db, { studyId, createdBy: s.leadId, raterIds: raters, seed: 31, components: 6, sub: 'conc' });
});
afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

function vote(raterId: number, componentId: number, label: string) {
  actAs(raterId);
  return callRoute(voteRoute.PUT, {
    method: 'PUT',
    url: `/api/runs/${run.runId}/votes/${componentId}`,
    params: { id: String(run.runId), componentId: String(componentId) },
    body: { label, baseVersion: 0 },
  });
}

/** MariaDB's "Lock wait timeout exceeded" (error 1205, MariaDB Knowledge Base, "MariaDB Error Codes"). */
const LOCK_WAIT_TIMEOUT = 1205;

/**
 * Runs `probe` in its own transaction whose lock waits give up at once (innodb_lock_wait_timeout = 1,
 * the smallest MariaDB allows): 'free' when it took every lock it asked for, 'blocked' when one was held.
 */
async function probeLocks(probe: (trx: Knex.Transaction) => Promise<unknown>): Promise<'free' | 'blocked'> {
  const trx = await db.transaction();
  try {
    await trx.raw('SET SESSION innodb_lock_wait_timeout = 1');
    await probe(trx);
    return 'free';
  } catch (err) {
    if ((err as { errno?: number }).errno === LOCK_WAIT_TIMEOUT) return 'blocked';
    throw err;
  } finally {
    await trx.rollback().catch(() => undefined);
    // the connection goes back to the pool: restore the server's default for it
    await db.raw('SET SESSION innodb_lock_wait_timeout = DEFAULT').catch(() => undefined);
  }
}

/** What saveVote locks before it writes: the rater's assignment and run (findAssignedRun), the component. */
const voteLocks = (raterId: number, componentId: number) => async (trx: Knex.Transaction) => {
  await findAssignedRun({ user: { id: raterId }, runId: run.runId, forUpdate: true }, trx);
  await trx('components').where({ id: componentId }).forUpdate().first('id');
};

/** Holds what a vote in flight holds while `during` runs, then commits. */
async function whileAVoteIsInFlight<T>(raterId: number, componentId: number, during: () => Promise<T>): Promise<T> {
  const trx: Knex.Transaction = await db.transaction();
  try {
    await voteLocks(raterId, componentId)(trx);
    return await during();
  } finally {
    await trx.commit();
  }
}

describe('votes of one study under concurrency', () => {
  it("another rater's vote on another component takes its locks while a vote is in flight", async () => {
    const state = await whileAVoteIsInFlight(raters[0], run.componentIds[0], () => probeLocks(voteLocks(raters[1], run.componentIds[1])));
    expect(state, 'before: the run was read FOR UPDATE, locking the study row for every vote of the study').toBe('free');
  });

  it('a vote on the same component waits for the one in flight (its decision sees both)', async () => {
    const c = run.componentIds[2];
    const state = await whileAVoteIsInFlight(raters[0], c, () => probeLocks(voteLocks(raters[1], c)));
    expect(state).toBe('blocked');
  });

  it("the same rater's second vote waits for their first (their assignment row)", async () => {
    const state = await whileAVoteIsInFlight(raters[0], run.componentIds[0], () => probeLocks(voteLocks(raters[0], run.componentIds[1])));
    expect(state).toBe('blocked');
  });

  it('a release (which locks the study row exclusively) waits for a vote in flight', async () => {
    const state = await whileAVoteIsInFlight(raters[2], run.componentIds[3], () =>
      probeLocks((trx) => trx('studies').where({ id: studyId }).forUpdate().first('id')),
    );
    expect(state).toBe('blocked');
  });

  it('every rater voting every component at once: all answered 200, decisions from all votes', async () => {
    const labels = ['signal', 'noise'];
    const calls = raters.flatMap((r, i) => run.componentIds.map((c) => vote(r, c, labels[i % 2])));
    const results = await Promise.all(calls);
    expect(
      results.filter((r) => r.status !== 200).map((r) => r.json),
      'no deadlock or lock timeout surfaced',
    ).toEqual([]);
    const votes = await db('votes').where({ run_id: run.runId }).count({ n: '*' });
    expect(Number(votes[0].n)).toBe(raters.length * run.componentIds.length);
    // two raters say signal and two noise on every component: no majority, each waits for a lead
    // (lib/consensus/rules.ts; a tie decides nothing: common practice, no source)
    const decisions = await db('decisions').where({ run_id: run.runId }).select('method');
    expect(decisions).toHaveLength(run.componentIds.length);
    expect(new Set(decisions.map((d) => d.method))).toEqual(new Set(['pending']));
  });
});
