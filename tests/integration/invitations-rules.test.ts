/**
 * Invitations and membership rules against the real MariaDB (issue 13 item 8; issue 15 items 2
 * and 9): an invitation obeys the rule for adding a member (an observer account is never a study
 * rater); automatic and manual assignment choose only accounts that may vote, also when an old
 * membership breaks the rule; inviting an address with a pending invitation asks first and audits
 * the withdrawal; inviting an address that has an account says so.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, closeDb } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { inviteSchema } from '@/lib/invitations/schema';
import { sendInvitation } from '@/lib/invitations/send-invitation';
import { assignRaters } from '@/lib/runs/assign-raters';
import { addRaterToRun } from '@/lib/assignments/add-rater';
import { listStudyAssignments } from '@/lib/assignments/list-study-assignments';
import { addMember, createRun, createStudyWithRaters, createUser, uniqueSuffix } from './helpers/factories';

let study: Awaited<ReturnType<typeof createStudyWithRaters>>;
let lead: { id: number; role: 'lead'; name: string };
let observerId: number;

async function refusal(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error('expected a refusal');
}

const send = (input: Parameters<typeof sendInvitation>[0]['input']) =>
  sendInvitation({ user: lead, input, baseUrl: 'http://quorum.test', facility: 'Test Facility' });
const fakeFile = () => ({ fileKey: 'runs/none.nii.gz', sha256: uniqueSuffix().padEnd(64, '0'), sizeBytes: 1 });

beforeAll(async () => {
  study = await createStudyWithRaters(db, { raters: 1, raters_per_run: 2 });
  lead = { id: study.leadId, role: 'lead', name: 'Test Lead' };
  // an observer account that an old invitation made a study "rater" (before the rule applied)
  observerId = await createUser(db, { role: 'observer' });
  await addMember(db, { studyId: study.studyId, userId: observerId, studyRole: 'rater' });
});

afterAll(async () => {
  await closeDb();
});

describe('an invitation obeys the membership rule', () => {
  it('the form schema refuses an observer account as a study rater, naming what to choose', () => {
    const r = inviteSchema.safeParse({ email: 'x@test.quorum.invalid', role: 'observer', studyId: study.studyId, studyRole: 'rater' });
    expect(r.success).toBe(false);
    expect(r.error!.issues.find((i) => i.path[0] === 'studyRole')?.message).toContain(
      'An observer account cannot be a study rater (it cannot vote)',
    );
    expect(
      inviteSchema.safeParse({ email: 'x@test.quorum.invalid', role: 'observer', studyId: study.studyId, studyRole: 'observer' }).success,
    ).toBe(true);
  });

  it('the use case refuses it too (422), and writes no invitation', async () => {
    const email = `obs-${uniqueSuffix()}@test.quorum.invalid`;
    const err = await refusal(send({ email, role: 'observer', studyId: study.studyId, studyRole: 'rater' }));
    expect(err.code).toBe('validation');
    expect(err.fields).toHaveProperty('studyRole');
    expect(
      await db('invitations')
        .where({ email })
        .count({ n: '*' })
        .then(([r]) => Number(r.n)),
    ).toBe(0);
  });
});

describe('assignment picks only accounts that may vote', () => {
  it('automatic assignment skips the observer account even though it is a rater member', async () => {
    const runId = await createRun(db, { studyId: study.studyId, createdBy: study.leadId, file: fakeFile() });
    const result = await assignRaters(db, { runId });
    expect(result.raterIds).toEqual(study.raterIds);
    expect(result.short).toBe(1);
  });

  it("the lead's rater list leaves it out, and adding it by hand is refused (422)", async () => {
    const listed = await listStudyAssignments({ user: { id: study.leadId, role: 'lead' }, studyId: study.studyId });
    expect(listed.raters.map((r) => r.id)).toEqual(study.raterIds);
    const runId = await createRun(db, { studyId: study.studyId, createdBy: study.leadId, file: fakeFile() });
    await db('runs').where({ id: runId }).update({ status: 'ready' });
    const err = await refusal(addRaterToRun({ user: { id: study.leadId, role: 'lead' }, runId, raterId: observerId }));
    expect(err.code).toBe('validation');
    expect(err.message).toMatch(/may not vote, so it cannot rate runs/);
  });
});

describe('re-inviting and existing accounts say what happens', () => {
  it('a second invitation to a pending address is refused until confirmed; then the old one is withdrawn and audited', async () => {
    const email = `again-${uniqueSuffix()}@test.quorum.invalid`;
    const first = await send({ email, role: 'rater', studyId: study.studyId, studyRole: 'rater' });
    expect(first.outcome).toBe('sent');
    expect(first.message).toContain(`is on its way to ${email}`);
    const ask = await refusal(send({ email, role: 'observer' }));
    expect(ask.code).toBe('conflict');
    expect(ask.fields).toHaveProperty('replace');
    expect(ask.message).toMatch(
      new RegExp(
        `An invitation to ${email} is still pending \\(Rater, study rater in .+; sent .+ UTC by .+\\)\\. Sending this one withdraws it, and the person is invited as Observer instead\\.`,
      ),
    );
    const rows = await db('invitations').where({ email }).select('id', 'role', 'revoked_at');
    expect(rows).toHaveLength(1);
    expect(rows[0].revoked_at).toBeNull();

    const replaced = await send({ email, role: 'observer', replace: true });
    expect(replaced.outcome).toBe('replaced');
    expect(replaced.message).toContain('was withdrawn; a new invitation (Observer) is on its way');
    const after = await db('invitations').where({ email }).orderBy('id').select('id', 'role', 'revoked_at');
    expect(after.map((r) => [r.role, r.revoked_at === null])).toEqual([
      ['rater', false],
      ['observer', true],
    ]);
    const audit = await db('audit_log')
      .where({ action: 'invitation.revoked', target_id: String(after[0].id) })
      .first('actor_id', 'detail');
    const detail = typeof audit.detail === 'string' ? JSON.parse(audit.detail) : audit.detail;
    expect(audit.actor_id).toBe(study.leadId);
    expect(detail).toMatchObject({ email, reason: 'replaced', replacedBy: after[1].id, role: 'rater', studyRole: 'rater' });
  });

  it('an address with an account gets no invitation, and the inviter is told so', async () => {
    const email = `has-account-${uniqueSuffix()}@test.quorum.invalid`;
    await createUser(db, { role: 'rater', email });
    const r = await send({ email, role: 'rater', studyId: study.studyId, studyRole: 'rater' });
    expect(r.outcome).toBe('existing_account');
    expect(r.message).toMatch(
      new RegExp(
        `^${email} already has an account, so no invitation was sent; they were e-mailed a reminder to sign in\\. To give them a place in .+, add them under the study's members\\.$`,
      ),
    );
    expect(r.message).not.toContain('on its way');
    expect(
      await db('invitations')
        .where({ email })
        .count({ n: '*' })
        .then(([x]) => Number(x.n)),
    ).toBe(0);
    const mail = await db('mail_outbox').where({ to_email: email }).first('subject', 'status');
    expect(mail.subject).toContain('you already have a Quorum account');
    expect(mail.status).toBe('queued'); // the worker's send-mail job sends it
  });
});
