/**
 * The member picker's search (issue 15 item 11) through the real route handler and MariaDB: only
 * those who manage the study may search; only active accounts, by name or e-mail, with nothing
 * but id, name, e-mail, facility role and the study role already held; at most 20 results with a
 * "more" flag; "%" and "_" match literally; the query's length is bounded (zod).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { actAs, callRoute, currentSession } from '../e2e/helpers/route-call';
import { addMember, createStudyWithRaters, createUser, uniqueSuffix } from './helpers/factories';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const { db, closeDb } = await import('@/lib/db/knex');
const route = await import('@/app/api/studies/[id]/members/candidates/route');

const tag = `pick${uniqueSuffix()}`;
let study: Awaited<ReturnType<typeof createStudyWithRaters>>;
let other: Awaited<ReturnType<typeof createStudyWithRaters>>;

const search = (studyId: number, q: string) =>
  callRoute(route.GET, { url: `/api/studies/${studyId}/members/candidates?q=${encodeURIComponent(q)}`, params: { id: String(studyId) } });

beforeAll(async () => {
  study = await createStudyWithRaters(db, { raters: 1 });
  other = await createStudyWithRaters(db, { raters: 0 });
  for (let i = 0; i < 25; i++)
    await createUser(db, {
      role: 'rater',
      name: `Many ${tag} ${String(i).padStart(2, '0')}`,
      email: `many-${i}-${tag}@test.quorum.invalid`,
    });
  await createUser(db, { role: 'observer', name: `Gone ${tag}`, email: `gone-${tag}@test.quorum.invalid`, active: false });
  const obs = await createUser(db, { role: 'observer', name: `Orla 100%_${tag}`, email: `orla-${tag}@test.quorum.invalid` });
  await addMember(db, { studyId: study.studyId, userId: obs, studyRole: 'observer' });
});

afterAll(async () => {
  await closeDb();
});

describe('member picker search', () => {
  it('finds active accounts by name or e-mail, with only the columns the picker shows and the role held here', async () => {
    actAs(study.leadId);
    const byName = await search(study.studyId, `Orla 100`);
    expect(byName.status).toBe(200);
    expect(byName.json.accounts).toHaveLength(1);
    expect(Object.keys(byName.json.accounts[0]).sort()).toEqual(['email', 'name', 'role', 'studyRole', 'userId']);
    expect(byName.json.accounts[0]).toMatchObject({ role: 'observer', studyRole: 'observer' });
    const byEmail = await search(study.studyId, `ORLA-${tag}`); // case-insensitive
    expect(byEmail.json.accounts.map((a: { email: string }) => a.email)).toEqual([`orla-${tag}@test.quorum.invalid`]);
    expect((await search(study.studyId, `gone-${tag}`)).json.accounts).toEqual([]); // deactivated
  });

  it('gives at most 20 and says there are more', async () => {
    actAs(study.leadId);
    const res = await search(study.studyId, `Many ${tag}`);
    expect(res.json.accounts).toHaveLength(20);
    expect(res.json.more).toBe(true);
    expect(res.json.accounts[0].name).toBe(`Many ${tag} 00`);
    const narrow = await search(study.studyId, `Many ${tag} 2`);
    expect(narrow.json.accounts.map((a: { name: string }) => a.name.slice(-2))).toEqual(['20', '21', '22', '23', '24']);
    expect(narrow.json.more).toBe(false);
  });

  it('matches % and _ literally', async () => {
    actAs(study.leadId);
    expect((await search(study.studyId, `100%_${tag}`)).json.accounts).toHaveLength(1);
    expect((await search(study.studyId, `%${tag}`)).json.accounts).toEqual([]);
  });

  it('refuses a query under 2 or over 100 characters (422), a rater (403), and a lead of another study (404, nothing of the search)', async () => {
    actAs(study.leadId);
    const short = await search(study.studyId, 'a');
    expect(short.status).toBe(422);
    expect(short.json.error.message).toMatch(/at least 2 letters/);
    expect((await search(study.studyId, 'x'.repeat(101))).status).toBe(422);
    actAs(study.raterIds[0]);
    expect((await search(study.studyId, tag)).status).toBe(403);
    actAs(other.leadId);
    const foreign = await search(study.studyId, tag);
    expect(foreign.status).toBe(404);
    expect(JSON.stringify(foreign.json)).not.toContain(tag);
  });
});
