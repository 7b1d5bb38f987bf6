import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';

const HOMES = {
  admin: 'Facility overview',
  lead: 'Your studies',
  rater: 'Your rating queue',
  observer: 'Studies you follow',
} as const;

for (const role of Object.keys(HOMES) as (keyof typeof HOMES)[]) {
  test(`${role} signs in and lands on their own home`, async ({ page }) => {
    const signIn = new SignInPage(page);
    await signIn.open();
    await signIn.signIn(DEMO[role]);
    await expect(page.getByTestId('home-heading')).toHaveText(HOMES[role]);
    await expect(page.getByTestId('caution-footer')).toContainText('not for diagnosis');
  });
}

test('a wrong password shows the error without saying which field is wrong', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead, 'not-the-password');
  await expect(signIn.error()).toHaveText('E-mail or password is wrong.');
  await signIn.signIn('nobody@fernhollow.example', 'not-the-password');
  await expect(signIn.error()).toHaveText('E-mail or password is wrong.');
  await expect(page).toHaveURL(/\/sign-in/);
});

test('a rater opening a facility page is refused, in the page and in the API', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.rater);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto('/admin');
  await expect(page.getByTestId('forbidden')).toBeVisible();
  await expect(page.getByTestId('users-table')).toHaveCount(0);
  const res = await page.request.get('/api/admin/users');
  expect(res.status()).toBe(403);
  expect((await res.json()).error.message).toMatch(/role does not allow/);
});

test('signing out ends the session', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.observer);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  expect((await page.request.get('/api/me')).status()).toBe(200);
  await page.getByTestId('sign-out').click();
  await expect(page).toHaveURL(/\/sign-in/);
  expect((await page.request.get('/api/me')).status()).toBe(401);
  await page.goto('/account');
  await expect(page).toHaveURL(/\/sign-in/);
});

test('bad input: malformed sign-in bodies get 422, unknown routes 404', async ({ request }) => {
  const csrf = await (await request.get('/api/auth/csrf')).json();
  const res = await request.post('/api/auth/callback/credentials', {
    form: { csrfToken: csrf.csrfToken, email: 'not-an-address', password: '' },
    maxRedirects: 0,
  });
  expect(res.status()).toBe(422);
  expect((await res.json()).error.message).toMatch(/not valid/);
  const missing = await request.get('/api/no-such-thing');
  expect(missing.status()).toBe(404);
  expect((await missing.json()).error.code).toBe('not_found');
  const page404 = await request.get('/no-such-page', { maxRedirects: 0 });
  expect([404, 307]).toContain(page404.status());
});
