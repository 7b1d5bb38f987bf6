/**
 * Features as a rater meets them on the desk: reproducibility first and flagged below the study's
 * threshold (the demo study keeps the default rule: flag below 0.8), the strip marks the low
 * component, and an undefined feature reads "—" with the reason (never 0).
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';

let run: E2eRun;

test.beforeAll(() => {
  // no motion table, so the motion features are undefined; component 1 reproduces poorly
  run = createE2eRun({
    raters: [DEMO.rater],
    size: 'tiny',
    seed: 21,
    components: 4,
    withMotion: false,
    reproducibility: [0.42, 0.97, 0.91, 0.88],
  });
});

async function signIn(page: Page, email: string) {
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

test('the desk shows reproducibility, flags a low one, and shows undefined features as a dash with the reason', async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page, DEMO.rater);
  const desk = new DeskPage(page);
  // the features panel does not wait for the WebGL viewer: only the desk itself must be there
  await page.goto(`/runs/${run.runId}/rate`);
  await expect(page.getByTestId('rating-desk')).toBeVisible({ timeout: 60_000 });
  await expect(desk.position()).toHaveText(`Component 1 of ${run.k}`);

  const panel = page.getByTestId('feature-panel');
  await expect(panel.getByTestId('feature-reproducibility-value')).toHaveText('0.42');
  await expect(panel.getByTestId('reproducibility-flag')).toContainText('below the study’s 0.80');
  await expect(page.getByTestId('component-strip').locator('button').first()).toHaveAttribute('data-low-reproducibility', 'true');

  // undefined (no motion table): a dash, muted, with the reason in its hint; never "0.00"
  const motion = panel.getByTestId('feature-motionCorrelation');
  await expect(motion.getByTestId('feature-motionCorrelation-value')).toHaveText('—');
  await expect(motion).toHaveAttribute('title', /^Not available: The run has no motion table/);
  // the drift and step features are there with numbers
  await expect(panel.getByTestId('feature-trendR2-value')).toHaveText(/^\d\.\d\d$/);
  await expect(panel.getByTestId('feature-stepScore-value')).toHaveText(/^\d+\.\d$/);

  // the next component reproduces well: no flag
  await desk.press('ArrowRight');
  await expect(desk.position()).toHaveText(`Component 2 of ${run.k}`);
  await expect(panel.getByTestId('feature-reproducibility-value')).toHaveText('0.97');
  await expect(panel.getByTestId('reproducibility-flag')).toHaveCount(0);
});
