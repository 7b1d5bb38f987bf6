/**
 * E-mail with one-time links goes through the worker (send-mail job) and leaves no live link in
 * the outbox: the readable copy has the link removed, the full message is sealed (AES-256-GCM,
 * lib/mail/seal.ts) until it is sent, then the sealed copy is dropped. A failure to send is retried;
 * the last failure drops the sealed copy too. (Issue: "the outbox keeps no live links".)
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { closeDb, db } from '@/lib/db/knex';
import { claimJob } from '@/lib/jobs';
import { jobKinds } from '@/lib/worker/kinds';
import { runClaimedJob } from '@/lib/worker/runner';
import { linkIn, waitForMail } from '@/lib/mail/mailbox';
import { requestPasswordReset } from '@/lib/people/request-password-reset';
import { queueMail } from '@/lib/jobs/queue-mail';
import { sealMail } from '@/lib/mail/seal';
import { SEND_MAIL } from '@/lib/mail/payloads';
import { createUser, uniqueSuffix } from './helpers/factories';
import { freePort, startMailCatcher } from './helpers/mail-catcher';

let server: ChildProcess;
let dir: string;
let port: number;
const quiet = { info() {}, warn() {}, error() {} };

/** Claims and runs send-mail jobs until `jobId` is no longer queued; returns its final row. */
async function runUntilDone(jobId: number) {
  for (let i = 0; i < 20; i++) {
    await db('jobs')
      .where({ id: jobId, status: 'queued' })
      .update({ run_after: db.raw('NOW(3)') }); // skip the back-off
    const job = await claimJob(db, { workerId: 'mail-test', leaseMs: 10_000, kinds: [SEND_MAIL] });
    if (job) await runClaimedJob(db, job, { workerId: 'mail-test', leaseMs: 10_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 });
    const row = await db('jobs').where({ id: jobId }).first('status', 'attempts', 'message', 'error');
    if (row.status !== 'queued' && row.status !== 'running') return row;
  }
  throw new Error(`job ${jobId} did not finish`);
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'quorum-mailq-'));
  ({ port, server } = await startMailCatcher(dir));
  process.env.SMTP_PORT = String(port);
});

afterAll(async () => {
  server?.kill('SIGTERM');
  delete process.env.SMTP_PORT;
  await rm(dir, { recursive: true, force: true });
  await closeDb();
});

describe('a password reset link', () => {
  it('is queued without a live link in the outbox, sent by the job, and its sealed copy dropped', async () => {
    const email = `reset-${uniqueSuffix()}@fernhollow.example`;
    await createUser(db, { email, name: 'Rowan Pike' });
    expect(await requestPasswordReset({ email, ip: null, baseUrl: 'http://localhost:3100', facility: 'Fernhollow Imaging Core' })).toEqual({
      queued: true,
    });

    const queued = await db('mail_outbox').where({ to_email: email }).first('id', 'status', 'text_body', 'html_body', 'sealed');
    expect(queued.status).toBe('queued');
    expect(queued.text_body).not.toMatch(/reset-password\//);
    expect(queued.html_body).not.toMatch(/reset-password\//);
    expect(queued.text_body).toContain('[one-time link, not kept]');
    expect(queued.sealed).toMatch(/^v1\./);
    expect(queued.sealed).not.toMatch(/reset-password/);

    const job = await db('jobs').where({ kind: SEND_MAIL }).whereRaw("JSON_VALUE(payload, '$.outboxId') = ?", [queued.id]).first('id');
    expect((await runUntilDone(Number(job.id))).status).toBe('succeeded');

    const mail = await waitForMail({ to: email, dir, subject: /reset your Quorum password/ });
    const link = linkIn(mail, '/reset-password/');
    expect(link).toMatch(/^http:\/\/localhost:3100\/reset-password\/\S+$/);
    // the link in the e-mail is the live one: its token hashes to the stored reset (lib/auth/tokens.ts: SHA-256)
    const token = link!.split('/').pop()!;
    const stored = await db('invitations').where({ email, kind: 'reset' }).whereNull('used_at').first('token_hash');
    expect(createHash('sha256').update(token).digest('hex')).toBe(stored.token_hash);

    const sent = await db('mail_outbox').where({ id: queued.id }).first('status', 'sealed', 'attempts');
    expect(sent).toMatchObject({ status: 'sent', sealed: null, attempts: 1 });
  });

  it('for an unknown or deactivated address queues nothing', async () => {
    const email = `gone-${uniqueSuffix()}@fernhollow.example`;
    await createUser(db, { email, active: false });
    expect(await requestPasswordReset({ email, ip: null, baseUrl: 'http://x', facility: 'F' })).toEqual({ queued: false });
    expect(
      await requestPasswordReset({ email: `nobody-${uniqueSuffix()}@fernhollow.example`, ip: null, baseUrl: 'http://x', facility: 'F' }),
    ).toEqual({ queued: false });
    expect(await db('mail_outbox').where({ to_email: email }).first('id')).toBeUndefined();
  });
});

describe('the send-mail job', () => {
  it('retries a failed send and drops the sealed copy after the last attempt', async () => {
    const to = `unreachable-${uniqueSuffix()}@fernhollow.example`;
    const { outboxId, jobId } = await db.transaction((trx) =>
      queueMail(trx, {
        to,
        template: 'test',
        content: { subject: 's', text: 'go to http://x/t/secret1', html: '<a href="http://x/t/secret1">x</a>' },
        secrets: ['http://x/t/secret1'],
      }),
    );
    await db('jobs').where({ id: jobId }).update({ max_attempts: 2 });
    process.env.SMTP_PORT = String(await freePort()); // nothing listens there
    try {
      await db('jobs')
        .where({ id: jobId })
        .update({ run_after: db.raw('NOW(3)') });
      const first = await claimJob(db, { workerId: 'mail-test', leaseMs: 10_000, kinds: [SEND_MAIL] });
      expect(first?.id).toBe(jobId);
      expect(
        await runClaimedJob(db, first!, { workerId: 'mail-test', leaseMs: 10_000, kinds: jobKinds, logger: quiet, retryBaseMs: 0 }),
      ).toBe('retry');
      const afterOne = await db('mail_outbox').where({ id: outboxId }).first('status', 'sealed', 'attempts', 'last_error');
      expect(afterOne.status).toBe('failed');
      expect(afterOne.attempts).toBe(1);
      expect(afterOne.sealed).toMatch(/^v1\./); // kept for the retry
      const final = await runUntilDone(jobId);
      expect(final.status).toBe('failed');
      const afterLast = await db('mail_outbox').where({ id: outboxId }).first('sealed', 'attempts', 'text_body');
      expect(afterLast.sealed).toBeNull();
      expect(afterLast.attempts).toBe(2);
      expect(afterLast.text_body).not.toContain('secret1');
    } finally {
      process.env.SMTP_PORT = String(port);
    }
  });

  it('fails at once, saying why, when the message was sealed with another secret', async () => {
    const to = `other-secret-${uniqueSuffix()}@fernhollow.example`;
    const { outboxId, jobId } = await db.transaction((trx) =>
      queueMail(trx, { to, template: 'test', content: { subject: 's', text: 't', html: 'h' }, secrets: [] }),
    );
    await db('mail_outbox')
      .where({ id: outboxId })
      .update({ sealed: sealMail({ subject: 's', text: 't', html: 'h' }, 'another-secret-of-at-least-thirty-two-chars') });
    const final = await runUntilDone(jobId);
    expect(final.status).toBe('failed');
    expect(final.attempts).toBe(1);
    expect(`${final.message} ${final.error}`).toMatch(/NEXTAUTH_SECRET/);
  });
});

describe('an invitation', () => {
  it('is queued with its link sealed and removed from the readable copy', async () => {
    const { sendInvitation } = await import('@/lib/invitations/send-invitation');
    const admin = await createUser(db, { role: 'admin' });
    const email = `invitee-${uniqueSuffix()}@fernhollow.example`;
    const r = await sendInvitation({
      user: { id: admin, role: 'admin', name: 'Admin' },
      input: { email, role: 'rater' },
      baseUrl: 'http://localhost:3100',
      facility: 'Fernhollow Imaging Core',
    });
    expect(r.outcome).toBe('sent');
    const row = await db('mail_outbox').where({ to_email: email }).first('id', 'status', 'text_body', 'html_body', 'sealed');
    expect(row.status).toBe('queued');
    expect(`${row.text_body}${row.html_body}`).not.toMatch(/\/invitations\//);
    const job = await db('jobs').where({ kind: SEND_MAIL }).whereRaw("JSON_VALUE(payload, '$.outboxId') = ?", [row.id]).first('id');
    expect((await runUntilDone(Number(job.id))).status).toBe('succeeded');
    const mail = await waitForMail({ to: email, dir, subject: /invit/i });
    expect(linkIn(mail, '/invitations/')).toMatch(/^http:\/\/localhost:3100\/invitations\/\S+$/);
  });
});
