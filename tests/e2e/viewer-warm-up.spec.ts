/**
 * The rater's queue fetches the viewer's code while the browser is idle (components/viewer/warm-up.tsx),
 * so the desk opened from it does not ask for that code again: the first visit waits for neither its
 * download nor its first run (the desk's first-load figures: `npm run bench -- desk`, README).
 */
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';

let run: E2eRun;

test.beforeAll(() => {
  run = createE2eRun({ raters: [DEMO.rater], size: 'small', seed: 23 });
});

test("the queue fetches the viewer's code ahead; the desk opened from it does not fetch it again", async ({ page }) => {
  // every script chunk the page asks for, in order, and its size once received
  const chunks: string[] = [];
  const sizes = new Map<string, number>();
  page.on('request', (req) => {
    if (req.url().includes('/_next/static/chunks/') && req.url().endsWith('.js')) chunks.push(new URL(req.url()).pathname);
  });
  page.on('response', async (res) => {
    if (!res.url().includes('/_next/static/chunks/')) return;
    const body = await res.body().catch(() => null);
    if (body) sizes.set(new URL(res.url()).pathname, body.byteLength);
  });
  // the viewer's code is the WebGL library: far larger than any other chunk of these pages
  const large = (c: string) => (sizes.get(c) ?? 0) > 400_000;
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.rater);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  // the warm-up's own mark, set once the code has been fetched and run
  await page.waitForFunction(() => performance.getEntriesByName('viewer:code-loaded').length > 0);
  const fetchedAhead = [...chunks];
  await expect
    .poll(() => fetchedAhead.filter(large).length, { message: "the sign-in page and the queue fetched the viewer's code once" })
    .toBe(1);

  const afterQueue = chunks.length;
  await page
    .getByTestId('queue-item')
    .filter({ has: page.locator(`a[href="/runs/${run.runId}/rate"]`) })
    .getByRole('link', { name: 'Start' })
    .click();
  const desk = new DeskPage(page);
  await desk.ready();
  await expect(desk.position()).toHaveText(`Component 1 of ${run.k}`);
  const onDesk = chunks.slice(afterQueue);
  expect(
    onDesk.filter((c) => fetchedAhead.includes(c) || large(c)),
    'the desk reuses the code the queue fetched',
  ).toEqual([]);
});
