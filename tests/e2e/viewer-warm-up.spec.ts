/**
 * The rater's queue and a study's runs table fetch the viewer's code while the browser is idle
 * (components/viewer/warm-up.tsx), so the desk or the run view opened from them does not ask for that
 * code again: the first visit waits for neither its download nor its first run (the desk's
 * first-load figures: `npm run bench -- desk`, README).
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

let run: E2eRun;

test.beforeAll(() => {
  run = createE2eRun({ raters: [DEMO.rater], size: 'small', seed: 23 });
});

/** Every script chunk the page asks for, in order; `large` tells the viewer's code (the WebGL library, far larger than any other chunk of these pages) once received. */
function recordChunks(page: Page) {
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
  return { chunks, large: (c: string) => (sizes.get(c) ?? 0) > 400_000 };
}

async function signIn(page: Page, email: string) {
  const form = new SignInPage(page);
  await form.open();
  await form.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

/** Waits for the warm-up's own mark (set once the code has been fetched and run); returns the chunks asked for so far. */
async function warmedUp(page: Page, { chunks, large }: ReturnType<typeof recordChunks>) {
  await page.waitForFunction(() => performance.getEntriesByName('viewer:code-loaded').length > 0);
  const ahead = [...chunks];
  await expect.poll(() => ahead.filter(large).length, { message: "the viewer's code was fetched once, ahead" }).toBe(1);
  return ahead;
}

test("the queue fetches the viewer's code ahead; the desk opened from it does not fetch it again", async ({ page }) => {
  const seen = recordChunks(page);
  await signIn(page, DEMO.rater);
  const ahead = await warmedUp(page, seen);

  const afterQueue = seen.chunks.length;
  await page
    .getByTestId('queue-item')
    .filter({ has: page.locator(`a[href="/runs/${run.runId}/rate"]`) })
    .getByRole('link', { name: 'Start' })
    .click();
  const desk = new DeskPage(page);
  await desk.ready();
  await expect(desk.position()).toHaveText(`Component 1 of ${run.k}`);
  const onDesk = seen.chunks.slice(afterQueue);
  expect(
    onDesk.filter((c) => ahead.includes(c) || seen.large(c)),
    'the desk reuses the code the queue fetched',
  ).toEqual([]);
});

test("a study's runs table fetches the viewer's code ahead for the lead's run view", async ({ page }) => {
  const studyId = Number(sql<{ s: number }>(`SELECT study_id AS s FROM runs WHERE id = ${run.runId}`)[0]!.s);
  const seen = recordChunks(page);
  await signIn(page, DEMO.lead);
  await page.goto(`/studies/${studyId}`);
  await expect(page.getByTestId('runs-table')).toBeVisible();
  const ahead = await warmedUp(page, seen);

  const afterTable = seen.chunks.length;
  await page.locator(`a[href="/runs/${run.runId}/view"]`).click();
  await expect(page.getByTestId('run-view')).toBeVisible();
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 120_000 });
  const onView = seen.chunks.slice(afterTable);
  expect(
    onView.filter((c) => ahead.includes(c) || seen.large(c)),
    'the run view reuses the code the table fetched',
  ).toEqual([]);
});
