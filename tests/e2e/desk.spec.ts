/**
 * The rating desk as a rater uses it: open a run from the queue, label every component with the
 * keyboard only, reload (votes intact, reopens where she stopped, also when the reload outruns
 * the position's request), submit; the viewer really draws (distinct colours in the canvas); a
 * second rater's desk shows none of the first rater's votes; votes survive a dropped network and
 * two tabs.
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, distinctColours, findKey, mapColourShare, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

let run: E2eRun;

test.beforeAll(() => {
  run = createE2eRun({ raters: [DEMO.rater, 'rater2@fernhollow.example'], size: 'small', seed: 11 });
});

async function signIn(page: Page, email: string) {
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

/** The component (1-based) the server remembers for this rater on this run, or null. */
function storedPosition(runId: number, email: string): number | null {
  const rows = sql<{ idx: number | null }>(
    `SELECT a.last_component_idx AS idx FROM assignments a JOIN users u ON u.id = a.rater_id WHERE a.run_id = ${Number(runId)} AND u.email = '${email.replace(/'/g, "''")}'`,
  );
  return rows[0]?.idx ?? null;
}

/** Collects every JSON body the page receives from /api/. */
function recordJson(page: Page) {
  const bodies: { url: string; body: unknown }[] = [];
  page.on('response', async (res) => {
    if (!res.url().includes('/api/') || !(res.headers()['content-type'] ?? '').includes('json')) return;
    try {
      bodies.push({ url: res.url(), body: await res.json() });
    } catch {
      /* body gone after navigation */
    }
  });
  return bodies;
}

test('a rater labels a whole run by keyboard, reloads, submits; the next rater sees none of it', async ({ page, browser }) => {
  test.setTimeout(180_000);
  await signIn(page, DEMO.rater);
  const item = page.getByTestId('queue-item').filter({ has: page.locator(`a[href="/runs/${run.runId}/rate"]`) });
  await expect(item).toContainText(`0 / ${run.k} labelled`);
  await item.getByRole('link', { name: 'Start' }).click();

  const desk = new DeskPage(page);
  await desk.ready();
  await expect(desk.position()).toHaveText(`Component 1 of ${run.k}`);
  const colours = await distinctColours(page, '[data-testid="viewer-canvas"]');
  console.log(`viewer canvas: ${colours} distinct colours`);
  expect(colours, 'the viewer draws the mean image and the map').toBeGreaterThan(64);
  // the map's own colours are there, and go with the map layer (O turns it off and on)
  const canvas = '[data-testid="viewer-canvas"]';
  const shown = await mapColourShare(page, canvas);
  console.log(`viewer canvas: ${(shown * 100).toFixed(2)} % of pixels in the map's colours`);
  expect(shown, 'the map is drawn in its colours').toBeGreaterThan(0.001);
  await desk.press('o');
  await expect.poll(() => mapColourShare(page, canvas), { message: 'the map layer off: none of its colours' }).toBe(0);
  await desk.press('o');
  await expect.poll(() => mapColourShare(page, canvas), { message: 'the map layer on again' }).toBeGreaterThan(0.001);

  // click the map: the crosshair moves and the voxel's mm coordinates and z are read out
  const box = (await page.getByTestId('viewer-canvas').boundingBox())!;
  await page.mouse.click(box.x + box.width * 0.2, box.y + box.height * 0.3);
  await expect(page.getByTestId('crosshair-readout')).toHaveText(/^-?\d+, -?\d+, -?\d+ mm · z (-?\d+\.\d\d|—)$/);
  // threshold and layout keys; the mosaic draws too
  await desk.press(']');
  await expect(page.getByTestId('threshold-value')).toHaveText('2.5');
  await desk.press('[');
  await expect(page.getByTestId('threshold-value')).toHaveText('2.0');
  await desk.press('l');
  await expect(page.getByTestId('layout-mosaic')).toHaveAttribute('aria-pressed', 'true');
  await expect.poll(() => distinctColours(page, '[data-testid="viewer-canvas"]'), { message: 'the mosaic draws' }).toBeGreaterThan(64);
  await desk.press('l');
  await expect(page.getByTestId('layout-multiplanar')).toHaveAttribute('aria-pressed', 'true');

  // keyboard only: signal, noise of kind 1 (motion), uncertain … each followed by → to move on
  const plan = Array.from({ length: run.k }, (_, i) => (['s', '1', 'u'] as const)[i % 3]);
  const expected = plan.map((k) => (k === 's' ? 'signal' : k === '1' ? 'noise' : 'uncertain'));
  await page.keyboard.press('Shift+Digit4'); // no label yet: refused locally, nothing sent
  for (let i = 0; i < run.k; i++) {
    await desk.press(plan[i]);
    if (i === 0) await desk.press('Shift+Digit4');
    if (i < run.k - 1) {
      await desk.press('ArrowRight');
      await expect(desk.position()).toHaveText(`Component ${i + 2} of ${run.k}`);
    }
  }
  await expect(desk.progressText()).toHaveText(`${run.k}/${run.k}`);
  await desk.waitSaved();
  expect(await desk.stripLabels()).toEqual(expected);

  // reload once the server has the position: votes intact, reopens where she stopped (the last component)
  await expect.poll(() => storedPosition(run.runId, DEMO.rater), { timeout: 15_000 }).toBe(run.k);
  await page.reload();
  await desk.ready();
  await expect(desk.position()).toHaveText(`Component ${run.k} of ${run.k}`);
  expect(await desk.stripLabels()).toEqual(expected);
  await desk.press('k');
  await expect(desk.position()).toHaveText(`Component ${run.k - 1} of ${run.k}`);

  // a reload right after a move (before the position is sent) still reopens where she was
  await page.reload();
  await desk.ready();
  await expect(desk.position()).toHaveText(`Component ${run.k - 1} of ${run.k}`);
  // … and the server gets that position too (sent as the page went away, or on reopening)
  await expect.poll(() => storedPosition(run.runId, DEMO.rater), { timeout: 15_000 }).toBe(run.k - 1);

  // the help overlay lists the keys
  await desk.press('?');
  await expect(page.getByTestId('help-overlay')).toContainText('Next unlabelled component');
  await desk.press('Escape');
  await expect(page.getByTestId('help-overlay')).toHaveCount(0);

  await desk.press('Control+Enter');
  await expect(page.getByTestId('submitted-note')).toBeVisible();

  // the first component kept its confidence
  await desk.press('Enter'); // nothing unlabelled: stays
  await page.goto('/');
  await expect(page.getByText(/submitted \d{4}-\d\d-\d\d \d\d:\d\d UTC/).first()).toBeVisible();

  // rater 2: a fresh desk with none of rater 1's votes, in the page or in any JSON
  const ctx2 = await browser.newContext();
  const page2 = await ctx2.newPage();
  const bodies = recordJson(page2);
  await signIn(page2, 'rater2@fernhollow.example');
  const desk2 = new DeskPage(page2);
  await desk2.open(run.runId);
  await expect(desk2.progressText()).toHaveText(`0/${run.k}`);
  expect((await desk2.stripLabels()).every((l) => l === '')).toBe(true);
  await expect(page2.getByTestId('others-votes')).toHaveCount(0);
  const html = await page2.content();
  expect(html).not.toContain('Amara Lindqvist');
  expect(html).not.toContain('"others":[');
  await page2.reload();
  await desk2.ready();
  for (const { body } of bodies) {
    expect(findKey(body, 'raterName')).toEqual([]);
    for (const mine of findKey(body, 'mine')) expect(mine).toEqual([]);
    for (const others of findKey(body, 'others')) expect(others).toBeNull();
  }
  await ctx2.close();
});

test('votes made offline are kept, shown as unsaved, and sent when the network returns; two tabs merge', async ({ page, context }) => {
  test.setTimeout(120_000);
  const own = createE2eRun({ raters: ['rater3@fernhollow.example'], size: 'tiny', seed: 12 });
  await signIn(page, 'rater3@fernhollow.example');
  const desk = new DeskPage(page);
  await desk.open(own.runId);

  await context.setOffline(true);
  await desk.press('s');
  await expect(desk.syncStatus()).toHaveText('1 unsaved, retrying');
  await desk.press('ArrowRight');
  await desk.press('2');
  await expect(desk.syncStatus()).toHaveText('2 unsaved, retrying');
  await context.setOffline(false);
  await desk.waitSaved();

  // a second tab on the same run: a label there and a note here, on one component — both kept
  const tab2 = await context.newPage();
  const desk2 = new DeskPage(tab2);
  await desk2.open(own.runId);
  await expect(desk2.progressText()).toHaveText(`2/${own.k}`);
  await page.bringToFront();
  await desk.press('k'); // component 1
  await desk.press('e');
  await page.keyboard.type('left-right symmetric');
  await desk.press('Escape');
  await tab2.bringToFront();
  await desk2.press('k');
  await desk2.press('u');
  await desk2.waitSaved();
  await page.bringToFront();
  await desk.waitSaved();
  const votes = await page.request.get(`/api/runs/${own.runId}/votes`).then((r) => r.json());
  const first = votes.mine.find((v: { componentId: number }) => v.componentId === own.componentIds[0]);
  expect(first).toMatchObject({ label: 'uncertain', note: 'left-right symmetric' });
  await tab2.close();
});
