/**
 * The desk's maps arrive component by component (issue 14): a component whose map has not arrived
 * shows "Loading this component's map…", no largest |z| ("—"), no cluster and no z at the
 * crosshair — never the previous component's map — and then its own map once it arrives. The
 * map payload's requests after the first are held back in the browser (Playwright routing) until
 * the test has seen the loading state, so the verdict does not depend on the machine's speed.
 * "Its own map" is checked against the component's stored peak |z| feature (computed by the
 * decomposition from the full-precision map; the payload's maps are 16-bit, error ≤ max|z| / 65534).
 */
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';

let run: E2eRun;

test.beforeAll(() => {
  run = createE2eRun({ raters: [DEMO.rater], size: 'tiny', seed: 43, components: 6, restarts: 1 });
});

test('a component whose map has not arrived says so, then shows its own map', async ({ page }) => {
  expect(run.k).toBeGreaterThanOrEqual(3);
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(DEMO.rater);
  await expect(page.getByTestId('home-heading')).toBeVisible();

  // let the layout and the first map through; hold every later map range until released
  let release!: () => void;
  const released = new Promise<void>((r) => (release = r));
  let ranges = 0;
  const held: string[] = [];
  await page.route(/\/api\/runs\/\d+\/maps\/\d+-\d+/, async (route) => {
    if (ranges++ > 0) {
      held.push(route.request().url());
      await released;
    }
    await route.continue();
  });

  const desk = new DeskPage(page);
  await page.goto(`/runs/${run.runId}/rate`);
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 60_000 });
  await expect(desk.position()).toHaveText(`Component 1 of ${run.k}`);
  await expect(page.getByTestId('colour-bar-max')).toHaveText(/^\d+\.\d\d$/);
  await expect(page.getByTestId('map-loading')).toHaveCount(0);

  // the last component: its map is held back
  await desk.press('End');
  await expect(desk.position()).toHaveText(`Component ${run.k} of ${run.k}`);
  await expect(page.getByTestId('map-loading')).toBeVisible();
  await expect(page.getByTestId('map-loading')).toHaveText("Loading this component's map…");
  await expect(page.getByTestId('colour-bar-max')).toHaveText('—');
  await expect(page.getByTestId('cluster-readout')).toHaveText('');
  await expect(page.getByTestId('crosshair-readout')).toHaveText(/z —$|click the map/);
  expect(
    held.some((u) => new RegExp(`/maps/\\d+-${run.k}\\?`).test(u)),
    `the last map was asked for: ${held.join(', ')}`,
  ).toBe(true);

  // released: the component's own map, whose largest |z| is the component's peak |z| feature
  release();
  await expect(page.getByTestId('map-loading')).toHaveCount(0);
  await expect(page.getByTestId('colour-bar-max')).toHaveText(/^\d+\.\d\d$/);
  const shownMax = Number(await page.getByTestId('colour-bar-max').textContent());
  const featurePeak = Number(await page.getByTestId('feature-peakZ-value').textContent());
  expect(Math.abs(shownMax - featurePeak)).toBeLessThanOrEqual(0.051); // the feature is shown to 1 decimal
  await expect(page.getByTestId('cluster-readout')).not.toHaveText('');
});
