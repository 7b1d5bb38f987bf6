import { expect, request as playwrightRequest, test } from '@playwright/test';
import type { Knex } from 'knex';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import { createAccount, e2eDb, PeoplePage, unique } from './pages/people';

const client = unique('client');
test.use({ extraHTTPHeaders: { 'x-forwarded-for': client.ip } });

let db: Knex;
test.beforeAll(() => {
  db = e2eDb();
});
test.afterAll(async () => {
  await db.destroy();
});

test('a deactivated person cannot sign in, and a session already open stops working at once', async ({ page, baseURL }) => {
  const { email } = unique('leaving');
  await createAccount(db, { email, password: 'leaving-soon-pass', role: 'rater', name: 'Osric Leaving' });

  // their session, open before the deactivation
  const theirs = await playwrightRequest.newContext({ baseURL, extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
  await apiSignIn(theirs, email, 'leaving-soon-pass');
  expect((await theirs.get('/api/me')).status()).toBe(200);

  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const people = new PeoplePage(page);
  await people.open();
  await page.getByTestId('people-search').fill('Osric');
  await expect(page.getByTestId('users-table').locator('tbody tr')).toHaveCount(1);
  await people.deactivate(email);
  await expect(page.getByTestId('people-ok')).toContainText('sessions stop working now');

  expect((await theirs.get('/api/me')).status()).toBe(401);
  const home = await theirs.get('/', { maxRedirects: 0 });
  expect([302, 303, 307]).toContain(home.status());
  await theirs.dispose();

  const other = await page
    .context()
    .browser()!
    .newContext({ extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
  const otherPage = await other.newPage();
  const theirSignIn = new SignInPage(otherPage);
  await theirSignIn.open();
  await theirSignIn.signIn(email, 'leaving-soon-pass');
  // Known defect outside this feature: lib/auth/options.ts counts the two new throttle keys with
  // Promise.all, which can deadlock in sign_in_throttles and shows the SQL error instead of this text.
  await expect(theirSignIn.error()).toHaveText('E-mail or password is wrong.');
  await other.close();

  // the status filter and the audit trail
  await page.getByTestId('people-search').fill('');
  await page.getByTestId('people-status-filter').selectOption('deactivated');
  await expect(people.row(email)).toBeVisible();
  await expect(people.row(DEMO.admin)).toHaveCount(0);
  await page.goto('/admin/audit?action=user.deactivated');
  await expect(page.getByTestId('audit-row').first()).toContainText('Dana Okafor');
  await expect(page.getByTestId('audit-row').first()).toContainText(email);
});

test('the last active admin can be neither demoted nor deactivated', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const admins = await db('users').where({ role: 'admin', active: true }).select('id', 'email');
  test.skip(admins.length !== 1, 'needs the seed’s single admin');
  const people = new PeoplePage(page);
  await people.open();
  await people.setRole(DEMO.admin, 'lead');
  await expect(page.getByTestId('people-error')).toContainText('This is the last active facility admin');
  const res = await page.request.patch(`/api/admin/users/${admins[0].id}`, { data: { active: false } });
  expect(res.status()).toBe(409);
  expect((await res.json()).error.message).toContain('last active facility admin');
  expect(await db('users').where({ id: admins[0].id }).first('role', 'active')).toEqual({ role: 'admin', active: true });
});

test('a role change by the admin is recorded and takes effect', async ({ page }) => {
  const { email } = unique('promoted');
  await createAccount(db, { email, password: 'promoted-pass-1', role: 'rater' });
  await new SignInPage(page).open();
  await new SignInPage(page).signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const people = new PeoplePage(page);
  await people.open();
  await people.setRole(email, 'observer');
  await expect(page.getByTestId('people-ok')).toContainText('is now observer');
  expect((await db('users').where({ email }).first('role')).role).toBe('observer');
  await page.goto('/admin/audit?action=user.role_changed');
  await expect(page.getByTestId('audit-row').first()).toContainText('from: rater · to: observer');
});

test('the audit log filters, exports CSV, and cannot be changed', async ({ page }) => {
  await new SignInPage(page).open();
  await new SignInPage(page).signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto('/admin/audit');
  await expect(page.getByTestId('audit-table')).toBeVisible();
  await page.getByTestId('audit-action').selectOption('auth.sign_in');
  await page.getByTestId('audit-apply').click();
  await expect(page).toHaveURL(/action=auth\.sign_in/);
  const rows = page.getByTestId('audit-row');
  await expect(rows.first()).toContainText('auth.sign_in');
  expect(await rows.filter({ hasNotText: 'auth.sign_in' }).count()).toBe(0);

  const today = new Date().toISOString().slice(0, 10);
  const csv = await page.request.get(`/api/admin/audit/export?action=auth.sign_in&from=${today}&to=${today}`);
  expect(csv.status()).toBe(200);
  expect(csv.headers()['content-type']).toContain('text/csv');
  expect(csv.headers()['content-disposition']).toMatch(/attachment; filename="quorum-audit-\d{4}-\d{2}-\d{2}\.csv"/);
  const lines = (await csv.text()).trim().split('\r\n');
  expect(lines[0]).toBe('id,time_utc,actor_id,actor_name,actor_email,action,target_type,target_id,study_id,study_name,detail,ip');
  expect(lines.length).toBeGreaterThan(1);
  expect(lines.slice(1).every((l) => l.includes(',auth.sign_in,'))).toBe(true);
  expect((await page.request.get('/api/admin/audit?from=2026-02-01&to=2026-01-01')).status()).toBe(422);

  for (const url of ['/api/admin/audit', '/api/admin/audit/export']) {
    for (const method of ['PUT', 'PATCH', 'DELETE', 'POST']) {
      const res = await page.request.fetch(url, { method, data: {} });
      expect([404, 405], `${method} ${url}`).toContain(res.status());
    }
  }
  const storage = await page.request.get('/api/admin/storage');
  expect(storage.status()).toBe(200);
  expect((await storage.json()).studies[0]).toMatchObject({ studyName: expect.any(String), totalBytes: expect.any(Number) });
});

test('the development mailbox lists the caught e-mails for the admin', async ({ page }) => {
  await new SignInPage(page).open();
  await new SignInPage(page).signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto('/dev/mailbox');
  await expect(page.getByRole('heading', { name: 'Mailbox' })).toBeVisible();
  const res = await page.request.get('/api/dev/mailbox');
  expect(res.status()).toBe(200);
  expect(Array.isArray((await res.json()).messages)).toBe(true);
});

test("an admin's sign out everywhere ends a person's open sessions; signing in again works (issue 13 item 5)", async ({
  page,
  baseURL,
}) => {
  const { email } = unique('roaming');
  await createAccount(db, { email, password: 'roaming-about-pass', role: 'rater', name: 'Ilse Roaming' });
  const sessions = [];
  for (let i = 0; i < 2; i++) {
    const s = await playwrightRequest.newContext({ baseURL, extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
    await apiSignIn(s, email, 'roaming-about-pass');
    expect((await s.get('/api/me')).status()).toBe(200);
    sessions.push(s);
  }

  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.admin);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await new PeoplePage(page).open();
  await page.getByTestId('people-search').fill('Ilse');
  await page.getByTestId(`sign-out-everywhere-${email}`).click();
  await expect(page.getByTestId('people-ok')).toContainText('signed out everywhere');

  for (const s of sessions) {
    expect((await s.get('/api/me')).status()).toBe(401);
    await s.dispose();
  }
  const again = await playwrightRequest.newContext({ baseURL, extraHTTPHeaders: { 'x-forwarded-for': client.ip } });
  await apiSignIn(again, email, 'roaming-about-pass');
  expect((await again.get('/api/me')).status()).toBe(200);
  await again.dispose();
});
