/**
 * Facility admin against the real MariaDB: role changes and (de)activation with their audit
 * entries; the last active admin can be neither demoted nor deactivated (409, also when two
 * admins demote each other at once); a deactivated user's existing session stops working at once,
 * because getCurrentUser re-reads `active` on every request whatever the JWT says.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { randomBytes } from 'node:crypto';

const session = vi.hoisted(() => ({
  current: null as null | { user: { id: number; email: string; name: string; role: string; sid: string; sv: number } },
}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: async () => session.current,
}));

import { db, parseJson } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { listMemberships, listPeople } from '@/lib/db/queries/people';
import { LAST_ADMIN_MESSAGE, updateAccess } from '@/lib/people/update-access';
import { getCurrentUser, requireUser } from '@/lib/auth/session';

const tag = randomBytes(3).toString('hex');
const ids = {} as Record<'a1' | 'a2' | 'rater', number>;
let othersDeactivated: number[] = [];

async function makeUser(name: string, role: 'admin' | 'rater'): Promise<number> {
  const [id] = await db('users').insert({ email: `${name}-${tag}@fernhollow.example`, name: `${name} ${tag}`, role, active: true });
  return Number(id);
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error('expected a refusal');
}

beforeAll(async () => {
  ids.a1 = await makeUser('admin-one', 'admin');
  ids.a2 = await makeUser('admin-two', 'admin');
  ids.rater = await makeUser('rater', 'rater');
  // the last-admin rule counts every active admin: set those of other test files aside meanwhile
  const others = await db('users').where({ role: 'admin', active: true }).whereNotIn('id', [ids.a1, ids.a2]).select('id');
  othersDeactivated = others.map((o: { id: number }) => o.id);
  if (othersDeactivated.length) await db('users').whereIn('id', othersDeactivated).update({ active: false });
});

afterAll(async () => {
  if (othersDeactivated.length) await db('users').whereIn('id', othersDeactivated).update({ active: true });
  await db.destroy();
});

describe('role changes and deactivation', () => {
  it('changes a role and records who did it', async () => {
    const result = await updateAccess({ actorId: ids.a1, userId: ids.rater, role: 'observer' });
    expect(result).toEqual({ id: ids.rater, role: 'observer', active: true });
    const entry = await db('audit_log')
      .where({ action: 'user.role_changed', target_id: String(ids.rater) })
      .orderBy('id', 'desc')
      .first();
    expect(entry.actor_id).toBe(ids.a1);
    expect(parseJson(entry.detail)).toMatchObject({ from: 'rater', to: 'observer' });
    expect(entry.created_at).toBeInstanceOf(Date);
    expect(entry.target_type).toBe('user');
    await updateAccess({ actorId: ids.a1, userId: ids.rater, role: 'rater' });
  });

  it('deactivation and reactivation are audited; no change writes nothing', async () => {
    await updateAccess({ actorId: ids.a1, userId: ids.rater, active: false });
    await updateAccess({ actorId: ids.a1, userId: ids.rater, active: true });
    const count = async () =>
      Number(
        (
          await db('audit_log')
            .where({ target_id: String(ids.rater) })
            .whereIn('action', ['user.deactivated', 'user.reactivated'])
            .count({ n: 'id' })
        )[0].n,
      );
    expect(await count()).toBe(2);
    await updateAccess({ actorId: ids.a1, userId: ids.rater, active: true });
    expect(await count()).toBe(2);
  });

  it('a missing person is 404', async () => {
    expect((await refusal(updateAccess({ actorId: ids.a1, userId: 99_999_999, active: false }))).code).toBe('not_found');
  });
});

describe('the last active admin', () => {
  it('cannot be demoted or deactivated (409 with a clear message), by others or themselves', async () => {
    await updateAccess({ actorId: ids.a1, userId: ids.a2, active: false });
    const demote = await refusal(updateAccess({ actorId: ids.a1, userId: ids.a1, role: 'lead' }));
    expect(demote.code).toBe('conflict');
    expect(demote.status).toBe(409);
    expect(demote.message).toBe(LAST_ADMIN_MESSAGE);
    const off = await refusal(updateAccess({ actorId: ids.a1, userId: ids.a1, active: false }));
    expect(off.status).toBe(409);
    // demoting a deactivated admin is fine: it does not change the number of active admins
    await updateAccess({ actorId: ids.a1, userId: ids.a2, role: 'lead' });
    await updateAccess({ actorId: ids.a1, userId: ids.a2, role: 'admin', active: true });
    expect(await db('users').where({ id: ids.a1 }).first('role', 'active')).toEqual({ role: 'admin', active: true });
  });

  it('two admins demoting each other at the same time: exactly one succeeds', async () => {
    const results = await Promise.allSettled([
      updateAccess({ actorId: ids.a1, userId: ids.a2, role: 'rater' }),
      updateAccess({ actorId: ids.a2, userId: ids.a1, role: 'rater' }),
    ]);
    expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
    const rejected = results.find((r) => r.status === 'rejected') as PromiseRejectedResult;
    expect(rejected.reason).toBeInstanceOf(AppError);
    expect(Number((await db('users').where({ role: 'admin', active: true }).whereIn('id', [ids.a1, ids.a2]).count({ n: 'id' }))[0].n)).toBe(
      1,
    );
    await db('users').whereIn('id', [ids.a1, ids.a2]).update({ role: 'admin', active: true });
  });
});

describe('sessions of deactivated people', () => {
  it('stop working at once although the JWT still names them', async () => {
    const version = async () => Number((await db('users').where({ id: ids.rater }).first('session_version')).session_version);
    session.current = {
      user: { id: ids.rater, email: `rater-${tag}@fernhollow.example`, name: 'r', role: 'rater', sid: `s-${tag}`, sv: await version() },
    };
    expect((await getCurrentUser())?.id).toBe(ids.rater);
    expect((await requireUser('votes.write')).id).toBe(ids.rater);

    await updateAccess({ actorId: ids.a1, userId: ids.rater, active: false });
    expect(await getCurrentUser()).toBeNull();
    const err = await refusal(requireUser('votes.write'));
    expect(err.status).toBe(401);

    await updateAccess({ actorId: ids.a1, userId: ids.rater, active: true, role: 'observer' });
    // reactivation does not revive the old session (issue 13 item 5) …
    expect((await refusal(requireUser('votes.write'))).status).toBe(401);
    // … and in a new one a changed role takes effect at once: the JWT's "rater" is ignored
    session.current = { ...session.current, user: { ...session.current.user, sid: `s2-${tag}`, sv: await version() } };
    expect((await refusal(requireUser('votes.write'))).status).toBe(403);
    session.current = null;
  });
});

describe('people list', () => {
  it('lists accounts with memberships and without password hashes', async () => {
    const [sid] = await db('studies').insert({
      name: `People study ${tag}`,
      created_by: ids.a1,
      label_set: '["signal","noise"]',
      noise_kinds: '[]',
    });
    await db('study_members').insert({ study_id: sid, user_id: ids.rater, study_role: 'observer' });
    const people = await listPeople();
    const rater = people.find((p) => p.id === ids.rater)!;
    expect(rater.memberships).toEqual([
      { userId: ids.rater, studyId: Number(sid), studyName: `People study ${tag}`, studyRole: 'observer' },
    ]);
    expect(JSON.stringify(people)).not.toMatch(/password/i);
    expect(await listMemberships({ userId: ids.rater })).toHaveLength(1);
  });
});
