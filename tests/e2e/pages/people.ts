import { randomBytes } from 'node:crypto';
import { expect, type Page } from '@playwright/test';
import type { Knex } from 'knex';
import { resolveDbSettings } from '../../../lib/db/config';
import { createDb } from '../../../lib/db/knex';
import { hashPassword } from '../../../lib/auth/password';
import { hashToken, newToken } from '../../../lib/auth/tokens';
import { mailDir } from '../../../lib/mail/config';
import { linkIn, waitForMail, type StoredMail } from '../../../lib/mail/mailbox';

/** The environment of the server under test (scripts/e2e-server.sh): its database and mailbox. */
const serverEnv = { ...process.env, QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e' };

/** A direct connection to the browser tests' database (local only: see tests/e2e/guard.ts). */
export function e2eDb(): Knex {
  return createDb(resolveDbSettings(serverEnv));
}

/** The fake mail server's store for the server under test. */
export const MAIL_DIR = process.env.QUORUM_MAIL_DIR ?? mailDir(serverEnv);

/** Waits for an e-mail to `to` sent after `since` and returns it with its first link to `prefix`. */
export async function mailWithLink(to: string, prefix: string, since: Date, subject?: RegExp): Promise<{ mail: StoredMail; link: string }> {
  const mail = await waitForMail({ to, subject, since, dir: MAIL_DIR, timeoutMs: 20_000 });
  return { mail, link: linkIn(mail, prefix) };
}

/** A unique address and client address for one test run. */
export function unique(prefix: string): { email: string; ip: string } {
  const tag = randomBytes(4).toString('hex');
  const n = randomBytes(3);
  return { email: `${prefix}-${tag}@fernhollow.example`, ip: `10.${n[0]}.${n[1]}.${n[2]}` };
}

/** Creates an active account straight in the database (faster than the invitation flow). */
export async function createAccount(
  db: Knex,
  { email, password, role = 'rater', name }: { email: string; password: string; role?: string; name?: string },
): Promise<number> {
  const [id] = await db('users').insert({
    email,
    name: name ?? email.split('@')[0],
    role,
    active: true,
    password_hash: await hashPassword(password),
  });
  return Number(id);
}

/** Stores a link in a given state and returns its token (for the refusal pages). */
export async function storeLink(
  db: Knex,
  {
    kind,
    email,
    expiresAt,
    usedAt = null,
    invitedBy = null,
    userId = null,
  }: { kind: 'invite' | 'reset'; email: string; expiresAt: Date; usedAt?: Date | null; invitedBy?: number | null; userId?: number | null },
): Promise<string> {
  const { token } = newToken();
  await db('invitations').insert({
    kind,
    token_hash: hashToken(token),
    email,
    role: kind === 'invite' ? 'rater' : null,
    invited_by: invitedBy,
    user_id: userId,
    expires_at: expiresAt,
    used_at: usedAt,
  });
  return token;
}

/** /admin/invitations: the invite form and the list. */
export class InvitationsPage {
  constructor(private readonly page: Page) {}

  async open() {
    await this.page.goto('/admin/invitations');
    await expect(this.page.getByTestId('invite-form')).toBeVisible();
  }

  async invite(email: string, role: string, study?: { name: string; role: string }) {
    await this.page.getByLabel('E-mail').fill(email);
    await this.page.getByLabel('Role', { exact: true }).selectOption(role);
    if (study) {
      await this.page.getByLabel('Study (optional)').selectOption({ label: study.name });
      await this.page.getByLabel('Role in the study').selectOption(study.role);
    }
    await this.page.getByTestId('invite-submit').click();
    await expect(this.page.getByTestId('invite-sent')).toContainText(email);
  }
}

/** /invitations/:token – the invitee's form. */
export class AcceptInvitationPage {
  constructor(private readonly page: Page) {}

  async accept(name: string, password: string, confirm = password) {
    await expect(this.page.getByTestId('accept-form')).toBeVisible();
    await this.page.getByLabel('Your name').fill(name);
    await this.page.getByLabel('Password', { exact: true }).fill(password);
    await this.page.getByLabel('Password again').fill(confirm);
    await this.page.getByTestId('accept-submit').click();
  }

  refusal() {
    return this.page.getByTestId('link-refused-message');
  }
}

/** /reset-password (ask for a link) and /reset-password/:token (choose a new password). */
export class PasswordResetPage {
  constructor(private readonly page: Page) {}

  async request(email: string) {
    await this.page.goto('/reset-password');
    await this.page.getByLabel('E-mail').fill(email);
    await this.page.getByTestId('forgot-submit').click();
    await expect(this.page.getByTestId('forgot-sent')).toBeVisible();
  }

  async choose(password: string) {
    await expect(this.page.getByTestId('reset-form')).toBeVisible();
    await this.page.getByLabel('New password', { exact: true }).fill(password);
    await this.page.getByLabel('New password again').fill(password);
    await this.page.getByTestId('reset-submit').click();
    await expect(this.page.getByTestId('reset-done')).toBeVisible();
  }
}

/** /admin – the people table. */
export class PeoplePage {
  constructor(private readonly page: Page) {}

  async open() {
    await this.page.goto('/admin');
    await expect(this.page.getByTestId('users-table')).toBeVisible();
  }

  row(email: string) {
    return this.page.getByTestId(`person-${email}`);
  }

  async deactivate(email: string) {
    await this.page.getByTestId(`deactivate-${email}`).click();
    await expect(this.page.getByTestId(`status-${email}`)).toHaveText('deactivated');
  }

  async setRole(email: string, role: string) {
    await this.page.getByTestId(`role-${email}`).selectOption(role);
  }
}
