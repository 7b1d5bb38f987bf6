/**
 * axe-core on the rater's queue, the rating desk and the read-only run view: no serious or critical violations in the
 * whole page: navigation bar, main content and the caution footer.
 */
import AxeBuilder from '@axe-core/playwright';
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun } from './helpers/e2e-run';

test('the queue and the desk have no serious or critical accessibility violations', async ({ page }) => {
  test.setTimeout(120_000);
  const run = createE2eRun({ raters: [DEMO.rater], size: 'tiny', seed: 31 });
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(DEMO.rater);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const serious = async (where: string) => {
    const result = await new AxeBuilder({ page }).analyze();
    const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
    expect(
      bad.map(
        (v) =>
          `${where}: ${v.id} (${v.impact}) ${v.nodes
            .map((n) => n.target.join(' '))
            .slice(0, 3)
            .join(' | ')}`,
      ),
    ).toEqual([]);
  };
  await serious('queue');
  const desk = new DeskPage(page);
  await desk.open(run.runId);
  await desk.press('s');
  await desk.waitSaved();
  await serious('desk');
  await desk.press('?');
  await expect(page.getByTestId('help-overlay')).toBeVisible();
  await serious('desk help');
});

test('the read-only run view has no serious or critical accessibility violations', async ({ page }) => {
  test.setTimeout(120_000);
  const run = createE2eRun({ raters: [DEMO.rater], size: 'tiny', seed: 32 });
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto(`/runs/${run.runId}/view`);
  await expect(page.getByTestId('run-view')).toBeVisible();
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 60_000 });
  const result = await new AxeBuilder({ page }).analyze();
  const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(
    bad.map(
      (v) =>
        `run view: ${v.id} (${v.impact}) ${v.nodes
          .map((n) => n.target.join(' '))
          .slice(0, 3)
          .join(' | ')}`,
    ),
  ).toEqual([]);
});
