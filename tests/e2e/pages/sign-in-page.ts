import { expect, type APIRequestContext, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'quorum-demo';
export const DEMO = {
  admin: 'admin@fernhollow.example',
  lead: 'lead@fernhollow.example',
  rater: 'rater1@fernhollow.example',
  observer: 'observer@fernhollow.example',
} as const;

/** The sign-in screen as a person uses it. */
export class SignInPage {
  constructor(private readonly page: Page) {}

  async open() {
    await this.page.goto('/sign-in');
    await expect(this.page.getByTestId('sign-in-form')).toBeVisible();
  }

  async signIn(email: string, password = DEMO_PASSWORD) {
    await this.page.getByLabel('E-mail').fill(email);
    await this.page.getByLabel('Password').fill(password);
    await this.page.getByTestId('sign-in-submit').click();
  }

  error() {
    return this.page.getByTestId('sign-in-error');
  }
}

/** Signs an API request context in through next-auth's credentials endpoint (cookies stay in the context). */
export async function apiSignIn(request: APIRequestContext, email: string, password = DEMO_PASSWORD) {
  const csrf = await (await request.get('/api/auth/csrf')).json();
  const res = await request.post('/api/auth/callback/credentials', {
    form: { csrfToken: csrf.csrfToken, email, password, json: 'true' },
    maxRedirects: 0,
  });
  expect([200, 302]).toContain(res.status());
  const me = await request.get('/api/me');
  expect(me.status(), `sign-in as ${email}`).toBe(200);
}
