/**
 * Invitations and members as a lead and an admin meet them (issue 13 item 8; issue 15 items 2, 9
 * and 11): re-inviting an address with a pending invitation warns and asks, and the withdrawal is
 * audited; the form resets after each send; an observer account cannot be invited as a study
 * rater; inviting an address that has an account says so; a lead adds a member by finding the
 * account by name.
 */
import { expect, test } from '@playwright/test';
import type { Knex } from 'knex';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { createAccount, e2eDb, unique } from './pages/people';

const client = unique('week-client');
test.use({ extraHTTPHeaders: { 'x-forwarded-for': client.ip } });

let db: Knex;
test.beforeAll(() => {
  db = e2eDb();
});
test.afterAll(async () => {
  await db.destroy();
});

test('re-inviting a pending address warns and asks; the form resets after each send; existing accounts and wrong roles are explained', async ({
  page,
}) => {
  const invitee = unique('twice').email;
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto('/admin/invitations');
  const form = page.getByTestId('invite-form');

  // first invitation: an observer; afterwards every field is back to its default (role: rater)
  await form.getByLabel('E-mail').fill(invitee);
  await form.getByLabel('Role', { exact: true }).selectOption('observer');
  await form.getByTestId('invite-submit').click();
  await expect(page.getByTestId('invite-sent')).toHaveText(`An invitation (Observer) is on its way to ${invitee}.`);
  await expect(form.getByLabel('E-mail')).toHaveValue('');
  await expect(form.getByLabel('Role', { exact: true })).toHaveValue('rater');

  // the same address again, as a rater: the form warns and asks
  await form.getByLabel('E-mail').fill(invitee);
  await form.getByTestId('invite-submit').click();
  const ask = page.getByTestId('invite-replace');
  await expect(ask).toContainText(`An invitation to ${invitee} is still pending (Observer; sent`);
  await expect(ask).toContainText('the person is invited as Rater instead');
  expect(
    await db('invitations')
      .where({ email: invitee })
      .whereNull('revoked_at')
      .count({ n: '*' })
      .then(([r]) => Number(r.n)),
  ).toBe(1);
  await ask.getByTestId('invite-replace-yes').click();
  await expect(page.getByTestId('invite-sent')).toHaveText(
    `The pending invitation to ${invitee} (Observer) was withdrawn; a new invitation (Rater) is on its way.`,
  );
  await expect(form.getByLabel('E-mail')).toHaveValue('');
  const rows = await db('invitations').where({ email: invitee }).orderBy('id').select('id', 'role', 'revoked_at');
  expect(rows.map((r) => [r.role, r.revoked_at === null])).toEqual([
    ['observer', false],
    ['rater', true],
  ]);
  const audit = await db('audit_log')
    .where({ action: 'invitation.revoked', target_id: String(rows[0].id) })
    .first('detail');
  expect(typeof audit.detail === 'string' ? JSON.parse(audit.detail) : audit.detail).toMatchObject({
    reason: 'replaced',
    replacedBy: rows[1].id,
  });

  // an observer account as a study rater: refused in the form, saying what to choose
  await form.getByLabel('E-mail').fill(unique('obs').email);
  await form.getByLabel('Role', { exact: true }).selectOption('observer');
  await form.getByLabel('Study (optional)').selectOption({ label: 'Evening light and sleep — resting state' });
  await form.getByLabel('Role in the study').selectOption('rater');
  await form.getByTestId('invite-submit').click();
  await expect(form.getByTestId('studyRole-error')).toContainText('An observer account cannot be a study rater (it cannot vote)');

  // an address that already has an account: no invitation, and the admin is told so
  await form.getByLabel('E-mail').fill(DEMO.observer);
  await form.getByLabel('Study (optional)').selectOption('');
  await form.getByTestId('invite-submit').click();
  await expect(page.getByTestId('invite-sent')).toContainText(`${DEMO.observer} already has an account, so no invitation was sent`);
});

test('a lead adds a member by finding the account by name', async ({ page }) => {
  const { email } = unique('picked');
  const name = `Solveig Marchetti-${email.slice(7, 15)}`;
  await createAccount(db, { email, password: 'a-long-password-1', name, role: 'rater' });
  const observer = unique('picked-obs');
  await createAccount(db, {
    email: observer.email,
    password: 'a-long-password-1',
    name: `Solveig Observer-${observer.email.slice(11, 19)}`,
    role: 'observer',
  });
  const study = await db('studies').where({ slug: 'evening-light-sleep-rest' }).first('id');

  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto(`/studies/${study.id}/settings`);
  const form = page.getByTestId('member-form');
  await form.getByLabel('Study role').selectOption('rater');
  await form.getByTestId('member-search').fill('Solveig');
  const results = form.getByTestId('member-search-results');
  const rater = results.getByTestId('member-candidate').filter({ hasText: name });
  await expect(rater).toBeEnabled();
  // the observer account is listed but cannot be chosen as a rater
  const obs = results.getByTestId('member-candidate').filter({ hasText: observer.email });
  await expect(obs).toBeDisabled();
  await expect(obs).toContainText('cannot be a study rater');
  await rater.click();
  await expect(form.getByLabel('E-mail of an existing account')).toHaveValue(email);
  await form.getByRole('button', { name: 'Add member' }).click();
  await expect(page.getByTestId('members-table').getByTestId('member-row').filter({ hasText: name })).toContainText('Rater');
});
