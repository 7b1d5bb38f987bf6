/**
 * The rating desk on a run with many components (realistic XS phantom, 60 components): the rater
 * lands on each component's peak and cycles clusters, zooms, pages slices, changes the large
 * plane, goes to component N, toggles the map, reads the colour bar's numbers, filters the strip
 * and labels the whole run by keyboard; the Submitted list links back. A lead and an observer
 * open the run read-only from the runs table and cannot vote; the lead sees the submitted votes.
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

let run: E2eRun;
let studyId: number;

test.describe.configure({ mode: 'serial' });

test.beforeAll(() => {
  // many components on the realistic phantom; one FastICA run (no restarts) keeps the set-up short
  run = createE2eRun({ raters: [DEMO.rater], size: 'XS', seed: 5, components: 60, restarts: 1 });
  studyId = Number(sql<{ s: number }>(`SELECT study_id AS s FROM runs WHERE id = ${run.runId}`)[0].s);
});

async function signIn(page: Page, email: string) {
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

/** The crosshair readout as numbers: [x, y, z] mm and the map's z there. */
async function crosshair(page: Page) {
  const text = (await page.getByTestId('crosshair-readout').textContent()) ?? '';
  const m = /^(-?\d+), (-?\d+), (-?\d+) mm · z (-?[\d.]+|—)$/.exec(text.trim());
  expect(m, `crosshair readout "${text}"`).not.toBeNull();
  return { mm: [Number(m![1]), Number(m![2]), Number(m![3])], z: m![4] === '—' ? null : Number(m![4]) };
}

test('a rater jumps to peaks, zooms, pages slices, goes to N, toggles the map and labels 60 components by keyboard', async ({ page }) => {
  test.setTimeout(360_000);
  expect(run.k).toBe(60);
  await signIn(page, DEMO.rater);
  const desk = new DeskPage(page);
  await page.goto(`/runs/${run.runId}/rate`);
  // 60 maps in one 4D image take longer to load than the demo runs' 10 on a busy machine
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 120_000 });
  await expect(desk.position()).toHaveText('Component 1 of 60');

  // the colour bar in numbers: threshold, top of the scale, the component's largest |z|
  await expect(page.getByTestId('colour-bar-threshold')).toHaveText('2.0');
  // on this phantom some components peak below |z| 2 (spikes): lower the threshold to 1.0 with [ [
  await desk.press('[');
  await desk.press('[');
  await expect(page.getByTestId('colour-bar-threshold')).toHaveText('1.0');
  await expect(page.getByTestId('colour-bar-max')).toHaveText(/^\d+\.\d\d$/);
  await expect(page.getByTestId('colour-bar-top')).toHaveText(/^\+\d+\.\d$/);

  // a new threshold finds the clusters again; P puts the crosshair on the largest one's peak, and
  // the z read there is the peak's z
  const readout = page.getByTestId('cluster-readout');
  await expect(readout).toHaveText(/^\d+ clusters?$|^no cluster/);
  await desk.press('p');
  await expect(readout).toHaveText(/^peak 1 of \d+ · z -?\d+\.\d\d$/);
  const peakZ = Number(/z (-?[\d.]+)$/.exec((await readout.textContent())!)![1]);
  await expect.poll(async () => (await crosshair(page)).z).toBeCloseTo(peakZ, 1);
  expect(Math.abs(peakZ)).toBeGreaterThanOrEqual(1);
  const max = Number(await page.getByTestId('colour-bar-max').textContent());
  expect(max).toBeGreaterThanOrEqual(Math.abs(peakZ) - 0.01);

  // P: the next cluster's peak
  const clusters = Number(await readout.getAttribute('data-clusters'));
  if (clusters > 1) {
    await desk.press('p');
    await expect(readout).toHaveText(/^peak 2 of /);
  }

  // a new component moves the crosshair to its own peak
  const before = await crosshair(page);
  await desk.press('j');
  await expect(desk.position()).toHaveText('Component 2 of 60');
  await expect(readout).toHaveText(/^peak 1 of \d+ · z /);
  const second = Number(/z (-?[\d.]+)$/.exec((await readout.textContent())!)![1]);
  await expect.poll(async () => (await crosshair(page)).z).toBeCloseTo(second, 1);
  expect(await crosshair(page)).not.toEqual(before);

  // slice up in the large (axial) plane: the crosshair moves up one voxel (3 mm on this grid) in z
  const c0 = await crosshair(page);
  await desk.press('ArrowUp');
  await expect.poll(async () => (await crosshair(page)).mm[2]).toBeGreaterThan(c0.mm[2]);
  await desk.press('ArrowDown');
  await expect.poll(async () => (await crosshair(page)).mm[2]).toBe(c0.mm[2]);

  // zoom in twice, reset (the viewer writes its zoom on the canvas)
  const zoom = async () => Number(await page.getByTestId('viewer-canvas').getAttribute('data-zoom'));
  await desk.press('=');
  await desk.press('=');
  await expect.poll(zoom).toBeCloseTo(1.5625, 3);
  await desk.press('Shift+ArrowLeft');
  await desk.press('0');
  await expect.poll(zoom).toBe(1);

  // M: the large plane cycles
  await desk.press('m');
  await expect(page.getByTestId('plane')).toHaveValue('coronal');

  // map off and on, sign, opacity
  await desk.press('o');
  await expect(page.getByTestId('colour-bar')).toHaveAttribute('data-visible', 'false');
  await expect(page.getByTestId('overlay-toggle')).toHaveText('map off (O)');
  await desk.press('o');
  await expect(page.getByTestId('colour-bar')).toHaveAttribute('data-visible', 'true');
  await desk.press('v');
  await expect(page.getByTestId('colour-bar')).toHaveAttribute('data-sign', 'positive');
  await expect(page.getByTestId('colour-bar-neg-top')).toHaveCount(0);
  await desk.press('v');
  await desk.press('v');
  await expect(page.getByTestId('colour-bar')).toHaveAttribute('data-sign', 'both');
  await desk.press('{');
  await expect(page.getByTestId('overlay-opacity-value')).toHaveText('75%');

  // G then the number: go to component 37; a number past the end is refused in words
  await desk.press('g');
  await expect(page.getByTestId('go-to-input')).toBeFocused();
  await page.keyboard.type('99');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('go-to-message')).toHaveText('Type a component number from 1 to 60.');
  await page.getByTestId('go-to-input').fill('37');
  await page.keyboard.press('Enter');
  await expect(desk.position()).toHaveText('Component 37 of 60');
  await expect(page.getByTestId('go-to-box')).toHaveCount(0);
  await desk.press('End');
  await expect(desk.position()).toHaveText('Component 60 of 60');
  await desk.press('Home');
  await expect(desk.position()).toHaveText('Component 1 of 60');

  // flag one, filter the strip
  await desk.press('j');
  await desk.press('f');
  await expect(page.getByTestId('flag-toggle')).toHaveAttribute('aria-pressed', 'true');
  await desk.press('Shift+F');
  await desk.press('Shift+F');
  await expect(page.getByTestId('component-strip')).toHaveAttribute('data-filter', 'flagged');
  await expect(page.getByTestId('component-strip').locator('button')).toHaveCount(1);
  await desk.press('Shift+F');
  await expect(page.getByTestId('component-strip').locator('button')).toHaveCount(60);

  // label all 60 by keyboard: auto-advance on, S on each; the 2nd as noise of the first kind
  await desk.press('Home');
  await desk.press('a');
  for (let i = 1; i <= 60; i++) {
    await expect(desk.position()).toHaveText(`Component ${i} of 60`);
    await desk.press(i === 2 ? '1' : 's');
  }
  await expect(desk.progressText()).toHaveText('60/60');
  await desk.waitSaved();
  await desk.press('Shift+F'); // unlabelled: only the current one stays
  await expect(page.getByTestId('component-strip').locator('button')).toHaveCount(1);
  await desk.press('Control+Enter');
  await expect(page.getByTestId('submitted-note')).toBeVisible();

  // the Submitted list names the study and links back to the run
  await page.goto('/');
  const item = page.getByTestId('submitted-item').filter({ has: page.locator(`a[href="/runs/${run.runId}/rate"]`) });
  await expect(item).toContainText('Evening light');
  await item.getByTestId('submitted-open').click();
  await expect(page.getByTestId('submitted-note')).toBeVisible();
  await expect(desk.progressText()).toHaveText('60/60');
});

test('a lead and an observer open the run read-only from the runs table; the lead sees the submitted votes', async ({ page }) => {
  test.setTimeout(360_000);
  const writes: string[] = [];
  page.on('request', (r) => {
    if (r.method() !== 'GET') writes.push(`${r.method()} ${r.url()}`);
  });
  for (const who of [DEMO.lead, DEMO.observer]) {
    await page.context().clearCookies();
    await signIn(page, who);
    await page.goto(`/studies/${studyId}`);
    const open = page.locator(`a[href="/runs/${run.runId}/view"]`);
    await open.click();
    await expect(page.getByTestId('run-view')).toBeVisible();
    await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 120_000 });
    await expect(page.getByTestId('desk-position')).toHaveText('Component 1 of 60');
    // the viewer found the component's clusters (this phantom's component 1 peaks below |z| 2.0)
    await expect(page.getByTestId('cluster-readout')).toHaveText(/^peak 1 of |^no cluster at \|z\| ≥ 2\.0$/);
    await expect(page.getByTestId('submit-run')).toHaveCount(0);
    await expect(page.getByTestId('verdict-panel')).toHaveCount(0);
    // label keys do nothing here; moving does
    await page.keyboard.press('s');
    await page.keyboard.press('j');
    await expect(page.getByTestId('desk-position')).toHaveText('Component 2 of 60');
    if (who === DEMO.lead) {
      await expect(page.getByTestId('run-view-submitted')).toHaveText('1 of 1 raters submitted');
      await expect(page.getByTestId('others-votes')).toContainText('Noise');
    } else {
      await expect(page.getByTestId('others-votes')).toHaveCount(0);
      await expect(page.getByTestId('run-view-submitted')).toHaveCount(0);
    }
  }
  expect(writes.filter((w) => /\/api\/runs\/\d+\/(votes|submit|desk)/.test(w))).toEqual([]);
  const leadVotes = sql<{ n: number }>(
    `SELECT COUNT(*) AS n FROM votes v JOIN users u ON u.id = v.rater_id WHERE v.run_id = ${run.runId} AND u.email IN ('${DEMO.lead}', '${DEMO.observer}')`,
  );
  expect(Number(leadVotes[0].n)).toBe(0);
  // the rater's desk address stays closed to them
  await page.goto(`/runs/${run.runId}/rate`);
  await expect(page).toHaveURL(/forbidden|rate/);
});
