import { expect, test, type APIResponse } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { unique } from './pages/people';

function expectSecurityHeaders(res: APIResponse, where: string) {
  const h = res.headers();
  const csp = h['content-security-policy'] ?? '';
  expect(csp, `${where}: CSP`).toContain("default-src 'self'");
  expect(csp, `${where}: CSP`).toContain("frame-ancestors 'none'");
  expect(csp, `${where}: CSP`).toContain("object-src 'none'");
  expect(csp, `${where}: CSP allows the viewer's blob workers`).toContain("worker-src 'self' blob:");
  expect(csp, `${where}: no eval in production`).not.toContain('unsafe-eval');
  expect(h['referrer-policy'], where).toBe('strict-origin-when-cross-origin');
  expect(h['x-content-type-options'], where).toBe('nosniff');
  expect(h['x-frame-options'], where).toBe('DENY');
  expect(h['x-powered-by'], where).toBeUndefined();
}

test('a page and API responses carry the security headers', async ({ page, request }) => {
  const doc = await page.goto('/sign-in');
  expect(doc).not.toBeNull();
  const pageHeaders = await doc!.allHeaders();
  expect(pageHeaders['content-security-policy']).toContain("frame-ancestors 'none'");
  expectSecurityHeaders(await request.get('/sign-in'), 'GET /sign-in');
  expectSecurityHeaders(await request.get('/api/health'), 'GET /api/health');
  expectSecurityHeaders(await request.get('/api/admin/users'), 'GET /api/admin/users (401)');
});

/** The script-src directive of a policy. */
const scriptSrc = (csp: string) =>
  csp
    .split(';')
    .map((d) => d.trim())
    .find((d) => d.startsWith('script-src ')) ?? '';

test('pages allow scripts by a fresh per-request nonce, never by unsafe-inline, and still run', async ({ page, request }) => {
  // CSP Level 3 (W3C), "nonce-source": the nonce must be unguessable and new for every response
  const nonces: string[] = [];
  for (let i = 0; i < 2; i++) {
    const res = await request.get('/sign-in');
    const scripts = scriptSrc(res.headers()['content-security-policy'] ?? '');
    expect(scripts).not.toContain("'unsafe-inline'");
    const nonce = /'nonce-([A-Za-z0-9+/=]+)'/.exec(scripts)?.[1];
    expect(nonce, scripts).toBeTruthy();
    expect(nonce!.length).toBeGreaterThanOrEqual(22); // 128 bits in base64
    nonces.push(nonce!);
    const html = await res.text();
    const tags = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(tags.length).toBeGreaterThan(0);
    for (const tag of tags) expect(tag, 'every script tag carries the nonce').toContain(`nonce="${nonce}"`);
  }
  expect(nonces[0]).not.toBe(nonces[1]);
  const api = await request.get('/api/health');
  expect(scriptSrc(api.headers()['content-security-policy'] ?? '')).toBe("script-src 'self'");

  // the page still works under the policy: no CSP violation, and React hydrates (the form submits by script)
  const violations: string[] = [];
  page.on('console', (msg) => {
    if (/Content Security Policy|Refused to execute/i.test(msg.text())) violations.push(msg.text());
  });
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.observer);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  expect(violations).toEqual([]);
});

test('a reset request answers the same for a known and an unknown address, in similar time', async ({ request }) => {
  const ask = async (email: string) => {
    const started = performance.now();
    const res = await request.post('/api/password-reset', { data: { email }, headers: { 'x-forwarded-for': unique('ip').ip } });
    return { status: res.status(), body: await res.text(), ms: performance.now() - started };
  };
  const known: number[] = [];
  const unknown: number[] = [];
  let first: { status: number; body: string } | null = null;
  for (let i = 0; i < 4; i++) {
    const a = await ask(DEMO.rater.replace('rater1', 'rater3'));
    const b = await ask(unique('nobody').email);
    expect(a.status).toBe(200);
    expect(b).toMatchObject({ status: a.status, body: a.body });
    first ??= a;
    known.push(a.ms);
    unknown.push(b.ms);
  }
  const median = (xs: number[]) => [...xs].sort((x, y) => x - y)[Math.floor(xs.length / 2)];
  expect(Math.abs(median(known) - median(unknown))).toBeLessThan(150);
});

test('reset requests and guessed invitation links are throttled per client address', async ({ request }) => {
  const { ip, email } = unique('flood');
  const statuses: number[] = [];
  for (let i = 0; i < 6; i++) {
    statuses.push((await request.post('/api/password-reset', { data: { email }, headers: { 'x-forwarded-for': ip } })).status());
  }
  expect(statuses).toEqual([200, 200, 200, 200, 200, 429]);

  const guesser = unique('guess').ip;
  const guesses: number[] = [];
  for (let i = 0; i < 6; i++) {
    const res = await request.post('/api/invitations/accept', {
      data: { token: `guess-${i}`, name: 'Guess', password: 'guessing-password', confirmPassword: 'guessing-password' },
      headers: { 'x-forwarded-for': guesser },
    });
    guesses.push(res.status());
  }
  expect(guesses).toEqual([404, 404, 404, 404, 404, 429]);
});

test('an invitation to an address that already has an account says so (issue 15 item 9)', async ({ request, baseURL }) => {
  const ctx = request;
  const csrf = await (await ctx.get('/api/auth/csrf')).json();
  await ctx.post('/api/auth/callback/credentials', {
    form: { csrfToken: csrf.csrfToken, email: DEMO.admin, password: 'quorum-demo', json: 'true' },
    headers: { 'x-forwarded-for': unique('ip').ip },
  });
  expect((await ctx.get('/api/me')).status(), baseURL).toBe(200);
  const existing = await ctx.post('/api/invitations', { data: { email: DEMO.rater, role: 'rater' } });
  const freshEmail = unique('fresh').email;
  const fresh = await ctx.post('/api/invitations', { data: { email: freshEmail, role: 'rater' } });
  expect(existing.status()).toBe(200);
  expect(fresh.status()).toBe(200);
  expect(await existing.json()).toMatchObject({
    outcome: 'existing_account',
    message: expect.stringContaining(`${DEMO.rater} already has an account, so no invitation was sent`),
  });
  expect(await fresh.json()).toMatchObject({ outcome: 'sent', message: `An invitation (Rater) is on its way to ${freshEmail}.` });
});

test('the site icon is linked from the pages and served to a visitor without a session', async ({ page, request }) => {
  await page.goto('/sign-in');
  const href = await page.locator('link[rel="icon"]').first().getAttribute('href');
  expect(href, 'the page links its icon (no browser guess at /favicon.ico, which is not there)').toMatch(/^\/icon\.svg/);
  const res = await request.get(href!, { maxRedirects: 0 });
  expect(res.status(), 'not sent to sign-in').toBe(200);
  expect(res.headers()['content-type']).toContain('image/svg+xml');
});
