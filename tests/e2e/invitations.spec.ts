import { expect, test } from '@playwright/test';
import type { Knex } from 'knex';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import {
  AcceptInvitationPage,
  createAccount,
  e2eDb,
  InvitationsPage,
  mailWithLink,
  PasswordResetPage,
  storeLink,
  unique,
} from './pages/people';

// One made-up client address per run, so these tests never meet the sign-in or reset throttles of other files.
const client = unique('client');
test.use({ extraHTTPHeaders: { 'x-forwarded-for': client.ip } });

let db: Knex;
test.beforeAll(() => {
  db = e2eDb();
});
test.afterAll(async () => {
  await db.destroy();
});

test('an admin invites a rater, who follows the e-mailed link, sets a password and signs in', async ({ page, browser }) => {
  const invitee = unique('new-rater').email;
  const since = new Date();
  await new SignInPage(page).open();
  await new SignInPage(page).signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const invitations = new InvitationsPage(page);
  await invitations.open();
  await invitations.invite(invitee, 'rater', { name: 'Evening light and sleep — resting state', role: 'rater' });

  const { mail, link } = await mailWithLink(invitee, '/invitations/', since, /invited/);
  expect(mail.subject).toContain('Fernhollow Imaging Core');
  expect(mail.text).toContain('Dana Okafor invites you');
  expect(mail.html).toContain('Accept the invitation');
  await expect(page.getByTestId(`invitation-${invitee}`)).toContainText('waiting');

  // the invitee, in a browser of their own
  const context = await browser.newContext({ extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
  const theirs = await context.newPage();
  await theirs.goto(link);
  await expect(theirs.getByTestId('accept-form')).toContainText(invitee);
  const accept = new AcceptInvitationPage(theirs);
  await accept.accept('Mireille Tanaka-Brook', 'short', 'short');
  await expect(theirs.getByTestId('password-error')).toHaveText('Use at least 10 characters.');
  await expect(theirs.getByLabel('Password', { exact: true })).toHaveAttribute('aria-describedby', /field-password-error/);
  await accept.accept('Mireille Tanaka-Brook', 'calm-waters-at-dusk');
  await expect(theirs.getByTestId('invitation-accepted')).toBeVisible();
  await theirs.getByTestId('go-sign-in').click();
  const signIn = new SignInPage(theirs);
  await signIn.signIn(invitee, 'calm-waters-at-dusk');
  await expect(theirs.getByTestId('home-heading')).toHaveText('Your rating queue');
  await expect(theirs.getByTestId('account-link')).toContainText('Mireille Tanaka-Brook');

  // the same link a second time
  await theirs.goto(link);
  await expect(new AcceptInvitationPage(theirs).refusal()).toContainText('This link has already been used');
  await context.close();

  // the admin sees it accepted, with the membership, and the audit log has both steps
  await page.reload();
  await expect(page.getByTestId(`invitation-${invitee}`)).toContainText('accepted');
  await page.goto('/admin');
  await expect(page.getByTestId(`person-${invitee}`)).toContainText('Evening light and sleep — resting state (rater)');
  await page.goto('/admin/audit?action=invitation');
  await expect(page.getByTestId('audit-table')).toContainText('invitation.accepted');
  await expect(page.getByTestId('audit-table')).toContainText('invitation.sent');
});

test('expired, used and unknown links are refused with a clear message', async ({ page }) => {
  const admin = await db('users').where({ email: DEMO.admin }).first('id');
  const expiredAt = new Date(Date.UTC(2026, 0, 15, 9, 30));
  const expired = await storeLink(db, { kind: 'invite', email: unique('late').email, expiresAt: expiredAt, invitedBy: admin.id });
  await page.goto(`/invitations/${expired}`);
  await expect(page.getByTestId('link-refused-message')).toHaveText(
    'This link expired on 15 January 2026 at 09:30 UTC; ask Dana Okafor for a new invitation.',
  );

  const used = await storeLink(db, {
    kind: 'invite',
    email: unique('used').email,
    expiresAt: new Date(Date.now() + 86400_000),
    usedAt: new Date(),
  });
  await page.goto(`/invitations/${used}`);
  await expect(page.getByTestId('link-refused-message')).toContainText('This link has already been used');

  const user = await db('users').where({ email: DEMO.observer }).first('id');
  const oldReset = await storeLink(db, { kind: 'reset', email: DEMO.observer, userId: user.id, expiresAt: new Date(Date.now() - 60_000) });
  await page.goto(`/reset-password/${oldReset}`);
  await expect(page.getByTestId('link-refused-message')).toContainText('This link expired on');
  await expect(page.getByTestId('link-refused-message')).toContainText('Forgot your password?');

  await page.goto('/invitations/not-a-real-token');
  await expect(page.getByTestId('link-refused-message')).toContainText('This link is not valid');
  // the API refuses the used link as well
  const res = await page.request.post('/api/invitations/accept', {
    data: { token: used, name: 'X', password: 'long-enough-1', confirmPassword: 'long-enough-1' },
  });
  expect(res.status()).toBe(409);
  expect((await res.json()).error.message).toContain('already been used');
});

test('a password reset by e-mail works once, and the old password stops working', async ({ page }) => {
  const { email } = unique('forgetful');
  await createAccount(db, { email, password: 'the-old-password-1', name: 'Ilse Forgetful' });
  const since = new Date();
  const reset = new PasswordResetPage(page);
  await reset.request(email);
  await expect(page.getByTestId('forgot-sent')).toContainText('If an active account exists for that address');
  const { mail, link } = await mailWithLink(email, '/reset-password/', since, /reset your Quorum password/);
  expect(mail.text).toContain('Hello Ilse Forgetful');
  expect(mail.text).toContain('expires on');

  await page.goto(link);
  await reset.choose('a-brand-new-password');
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(email, 'the-old-password-1');
  await expect(signIn.error()).toHaveText('E-mail or password is wrong.');
  await signIn.signIn(email, 'a-brand-new-password');
  await expect(page.getByTestId('home-heading')).toBeVisible();

  await page.goto(link);
  await expect(page.getByTestId('link-refused-message')).toContainText('This link has already been used');
});

test('a study lead invites raters and observers to their own studies only', async ({ playwright, baseURL }) => {
  const study = await db('studies').where({ slug: 'evening-light-sleep-rest' }).first('id');
  const asLead = async (email: string) => {
    const ctx = await playwright.request.newContext({ baseURL, extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
    await apiSignIn(ctx, email);
    return ctx;
  };
  const lead = await asLead(DEMO.lead);
  const ok = await lead.post('/api/invitations', {
    data: { email: unique('lead-pick').email, role: 'rater', studyId: study.id, studyRole: 'rater' },
  });
  expect(ok.status()).toBe(200);
  const admin = await lead.post('/api/invitations', { data: { email: unique('too-high').email, role: 'admin' } });
  expect(admin.status()).toBe(403);
  expect((await admin.json()).error.message).toContain('raters and observers');
  const list = await (await lead.get('/api/invitations')).json();
  expect(list.invitations.every((i: { inviterName: string }) => i.inviterName === 'Priya Nandakumar')).toBe(true);
  await lead.dispose();

  const other = await asLead('lead2@fernhollow.example');
  const foreign = await other.post('/api/invitations', {
    data: { email: unique('foreign').email, role: 'rater', studyId: study.id, studyRole: 'rater' },
  });
  expect(foreign.status()).toBe(403);
  expect((await foreign.json()).error.message).toContain('studies you lead');
  await other.dispose();
});
