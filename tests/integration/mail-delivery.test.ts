/**
 * E-mail end to end on this machine: the fake SMTP server (scripts/mail-server.ts) receives what
 * the nodemailer transport sends, stores it as JSON, and lib/mail/mailbox.ts reads it back; the
 * outbox records sent and failed messages; templates carry the facility name and the link in
 * text and HTML, and nothing else secret.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import net from 'node:net';
import { db } from '@/lib/db/knex';
import { deliverMail } from '@/lib/mail/deliver';
import { linkIn, listMail, waitForMail } from '@/lib/mail/mailbox';
import { devMailboxEnabled, facilityName, mailDir, smtpSettings } from '@/lib/mail/config';
import { invitationMail } from '@/lib/mail/templates/invitation';
import { passwordResetMail } from '@/lib/mail/templates/password-reset';

let server: ChildProcess;
let dir: string;
let port: number;

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
  });
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'quorum-mail-'));
  port = await freePort();
  server = spawn(process.execPath, ['--import', 'tsx', 'scripts/mail-server.ts'], {
    env: { ...process.env, QUORUM_MAIL_PORT: String(port), QUORUM_MAIL_DIR: dir },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  await new Promise<void>((resolve, reject) => {
    server.stdout!.on('data', (d: Buffer) => d.toString().includes('fake SMTP server') && resolve());
    server.on('exit', (code) => reject(new Error(`mail server exited with ${code}`)));
  });
  process.env.SMTP_PORT = String(port);
});

afterAll(async () => {
  server?.kill('SIGTERM');
  delete process.env.SMTP_PORT;
  await rm(dir, { recursive: true, force: true });
  await db.destroy();
});

describe('settings', () => {
  it('default to the local fake outside production and insist on SMTP_HOST in production', () => {
    expect(smtpSettings({})).toMatchObject({ host: '127.0.0.1', port: 2525, local: true });
    expect(smtpSettings({ QUORUM_MAIL_PORT: '2600' }).port).toBe(2600);
    expect(
      smtpSettings({ SMTP_HOST: 'smtp.fernhollow.example', SMTP_USER: 'q', SMTP_PASS: 'p', MAIL_FROM: 'Quorum <q@fernhollow.example>' }),
    ).toMatchObject({
      host: 'smtp.fernhollow.example',
      port: 587,
      user: 'q',
      local: false,
      from: 'Quorum <q@fernhollow.example>',
    });
    expect(() => smtpSettings({ NODE_ENV: 'production' })).toThrow(/SMTP_HOST/);
    expect(facilityName({})).toBe('Fernhollow Imaging Core');
    expect(facilityName({ QUORUM_FACILITY_NAME: 'Elsewhere Core' })).toBe('Elsewhere Core');
    expect(mailDir({ QUORUM_DB_NAME: 'quorum_e2e' })).toBe(path.resolve('.data/mail/quorum_e2e'));
    expect(devMailboxEnabled({ NODE_ENV: 'production' })).toBe(false);
    expect(devMailboxEnabled({ NODE_ENV: 'production', QUORUM_DEV_MAILBOX: '1' })).toBe(true);
    expect(devMailboxEnabled({ NODE_ENV: 'development' })).toBe(true);
  });
});

describe('templates', () => {
  it('carry the facility, role, link and expiry in text and HTML, escaped', () => {
    const url = 'http://localhost:3000/invitations/abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQ';
    const m = invitationMail({
      facility: 'Fernhollow Imaging Core',
      inviterName: 'Dana <Okafor>',
      role: 'rater',
      studyName: 'Evening light',
      studyRole: 'rater',
      url,
      expiresAt: new Date('2026-12-08T10:00:00Z'),
    });
    expect(m.subject).toContain('Fernhollow Imaging Core');
    for (const body of [m.text, m.html]) {
      expect(body).toContain('Fernhollow Imaging Core');
      expect(body).toContain(url);
      expect(body).toContain('8 December 2026');
    }
    expect(m.html).toContain('Dana &lt;Okafor&gt;');
    expect(m.html).not.toContain('<Okafor>');
    const r = passwordResetMail({
      facility: 'Fernhollow Imaging Core',
      name: 'Amara',
      url: 'http://x/reset-password/t',
      expiresAt: new Date(),
    });
    expect(r.text).toMatch(/expires on/);
    // the link is the only secret in a message
    expect(r.text.match(/https?:\/\/\S+/g)).toEqual(['http://x/reset-password/t']);
    expect(m.text.match(/https?:\/\/\S+/g)).toEqual([url]);
  });
});

describe('delivery through the fake server', () => {
  it('stores the message as JSON that the mailbox reads back, and records it as sent', async () => {
    const to = 'reader@fernhollow.example';
    const content = passwordResetMail({
      facility: 'Fernhollow Imaging Core',
      name: 'Reader',
      url: 'http://localhost:3100/reset-password/tok123',
      expiresAt: new Date(),
    });
    expect(await deliverMail({ to, content, template: 'reset' })).toBe(true);
    const mail = await waitForMail({ to, dir, subject: /reset your Quorum password/ });
    expect(mail).toMatchObject({ to: [to], subject: content.subject, from: 'quorum@localhost' });
    expect(mail.text).toContain('http://localhost:3100/reset-password/tok123');
    expect(mail.html).toContain('Fernhollow Imaging Core');
    expect(new Date(mail.date).getTime()).toBeGreaterThan(Date.now() - 60_000);
    expect(linkIn(mail, '/reset-password/')).toBe('http://localhost:3100/reset-password/tok123');
    expect((await listMail({ dir })).length).toBe(1);
    const row = await db('mail_outbox').where({ to_email: to }).orderBy('id', 'desc').first('status', 'sent_at', 'template');
    expect(row).toMatchObject({ status: 'sent', template: 'reset' });
  });

  it('records a failure when the server does not answer', async () => {
    process.env.SMTP_PORT = String(await freePort());
    const to = 'nobody-home@fernhollow.example';
    const ok = await deliverMail({ to, content: { subject: 's', text: 't', html: '<p>t</p>' }, template: 'test' });
    process.env.SMTP_PORT = String(port);
    expect(ok).toBe(false);
    const row = await db('mail_outbox').where({ to_email: to }).first('status', 'last_error');
    expect(row.status).toBe('failed');
    expect(row.last_error).toMatch(/ECONNREFUSED|connect/i);
  });
});
