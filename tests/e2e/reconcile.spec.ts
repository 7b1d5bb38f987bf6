/**
 * Reconcile as a study lead does it: two raters disagree on a demo run (through the desk API),
 * both submit, the lead finds the disagreement in Reconcile, looks at the component, decides
 * with a reason; the decision and its audit entry exist and the agreement page shows the run.
 * Observers read the agreement page but cannot reach Reconcile or decide; raters neither.
 */
import { expect, request as pwRequest, test, type APIRequestContext } from '@playwright/test';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

const A = 'rater3@fernhollow.example';
const B = 'rater4@fernhollow.example';
let run: E2eRun;
let run2: E2eRun;
let studyId: number;

async function rateAndSubmit(ctx: APIRequestContext, labelFor: (i: number) => string, of: E2eRun) {
  for (const [i, id] of of.componentIds.entries()) {
    const label = labelFor(i);
    const res = await ctx.put(`/api/runs/${of.runId}/votes/${id}`, {
      data: { label, noiseKind: label === 'noise' ? 'motion' : null, baseVersion: 0 },
    });
    expect(res.status(), await res.text()).toBe(200);
  }
  expect((await ctx.post(`/api/runs/${of.runId}/submit`, { data: {} })).status()).toBe(200);
}

test.beforeAll(async ({ baseURL }) => {
  run = createE2eRun({ raters: [A, B], size: 'tiny', seed: 33 });
  run2 = createE2eRun({ raters: [A, B], size: 'tiny', seed: 34 });
  studyId = Number(sql<{ s: number }>(`SELECT study_id AS s FROM runs WHERE id = ${run.runId}`)[0].s);
  const a = await pwRequest.newContext({ baseURL });
  const b = await pwRequest.newContext({ baseURL });
  await apiSignIn(a, A);
  await apiSignIn(b, B);
  // they agree on every component but the first, where one says noise and the other signal
  for (const r of [run, run2]) {
    await rateAndSubmit(a, (i) => (i === 0 ? 'noise' : 'signal'), r);
    await rateAndSubmit(b, () => 'signal', r);
  }
  await a.dispose();
  await b.dispose();
});

test('a lead reconciles a disagreement with a reason, and the agreement page shows the run', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  // Reconcile loads the desk's map payload, not the whole 4D maps file (issue 14)
  const mapRequests: string[] = [];
  page.on('request', (r) => {
    if (/\/api\/reconcile\/runs\/\d+\/(maps\/|files\/components\.nii\.gz)/.test(r.url())) mapRequests.push(new URL(r.url()).pathname);
  });
  await page.goto(`/studies/${studyId}/reconcile`);
  await expect(page.getByTestId('reconcile-heading')).toBeVisible();
  // this test's run by its subject label: other tests' runs in the demo study may wait in Reconcile too
  const sub = sql<{ sub: string }>(`SELECT sub FROM runs WHERE id = ${run.runId}`)[0]!.sub;
  const entry = page.getByTestId('reconcile-list').getByRole('button', { name: new RegExp(`sub-${sub}_.*component 1 of ${run.k}`) });
  await expect(entry).toBeVisible();
  await entry.click();
  await expect(page.getByTestId('reconcile-votes')).toContainText('Noise');
  await expect(page.getByTestId('reconcile-votes')).toContainText('Signal');
  await expect(page.getByTestId('timecourse-chart')).toBeVisible();
  // the viewer draws the layout and the component's map (data-layout, data-map: the 0-based component)
  const canvas = page.getByTestId('viewer-canvas');
  await expect(canvas).toHaveAttribute('data-layout', /^(planes|mosaic)\|/);
  await expect(canvas).toHaveAttribute('data-map', '0');
  // another run: the viewer starts again and draws that run's layout and map, not the first run's state
  const sub2 = sql<{ sub: string }>(`SELECT sub FROM runs WHERE id = ${run2.runId}`)[0]!.sub;
  await page
    .getByTestId('reconcile-list')
    .getByRole('button', { name: new RegExp(`sub-${sub2}_.*component 1 of ${run2.k}`) })
    .click();
  await expect(canvas).toHaveAttribute('data-layout', /^(planes|mosaic)\|/);
  await expect(canvas).toHaveAttribute('data-map', '0');
  await expect(page.getByTestId('reconcile-votes')).toContainText('Noise');
  await entry.click();
  await expect(canvas).toHaveAttribute('data-map', '0');

  // the desk's map panel offers the run's structural underlay here too (issue 14); the structural
  // image is the run's own mean image, attached the way the upload leaves it (key and name on the run)
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'mean');
  expect(mapRequests).toContain(`/api/reconcile/runs/${run.runId}/maps/layout`);
  expect(mapRequests.filter((u) => u.endsWith('components.nii.gz'))).toEqual([]);
  await expect(page.getByTestId('underlay-structural')).toHaveCount(0);
  sql(
    `UPDATE runs r JOIN decompositions d ON d.run_id = r.id AND d.is_current = 1
        SET r.structural_key = d.mean_key, r.structural_name = 'sub-01_T1w_on-bold.nii.gz' WHERE r.id = ${run.runId}`,
  );
  await page.reload();
  await page
    .getByTestId('reconcile-list')
    .getByRole('button', { name: new RegExp(`sub-${sub}_.*component 1 of ${run.k}`) })
    .click();
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 30_000 });
  await page.getByTestId('underlay-structural').click();
  await expect(page.getByTestId('underlay-structural')).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'structural');
  await page.getByTestId('underlay-mean').click();
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'mean');

  // the reason is required
  await page.getByTestId('decide-noise').click();
  await page.getByTestId('decide-submit').click();
  await expect(page.getByTestId('decision-error')).toContainText('reason');

  await page.getByTestId('decide-kind').selectOption('motion');
  await page.getByTestId('decide-reason').fill('Rim pattern and spikes matching the motion trace');
  await page.getByTestId('decide-submit').click();
  await expect(page.getByText(/Component 1 of .*: Noise \(decided by a lead\)/)).toBeVisible();

  const componentId = run.componentIds[0];
  const decision = sql(`SELECT label, noise_kind, method, reason FROM decisions WHERE component_id = ${componentId}`)[0];
  expect(decision).toEqual({
    label: 'noise',
    noise_kind: 'motion',
    method: 'reconciled',
    reason: 'Rim pattern and spikes matching the motion trace',
  });
  const audit = sql(
    `SELECT a.action, u.email FROM audit_log a JOIN users u ON u.id = a.actor_id WHERE a.target_type = 'component' AND a.target_id = '${componentId}' AND a.action LIKE 'decision.%'`,
  );
  expect(audit).toEqual([{ action: 'decision.reconcile', email: DEMO.lead }]);

  await page.goto(`/studies/${studyId}/agreement`);
  await expect(page.getByTestId('agreement-heading')).toBeVisible();
  await expect(page.getByTestId('run-agreement')).toContainText('task-rest');
  await expect(page.getByTestId('stat-percentAgreement')).toBeVisible();
});

test('observers read agreement but cannot reconcile; raters reach neither', async ({ baseURL }) => {
  const observer = await pwRequest.newContext({ baseURL });
  await apiSignIn(observer, DEMO.observer);
  expect((await observer.get(`/api/studies/${studyId}/agreement`)).status()).toBe(200);
  expect((await observer.get(`/api/studies/${studyId}/reconcile`)).status()).toBe(403);
  const decide = await observer.post(`/api/studies/${studyId}/decisions`, {
    data: { componentId: run.componentIds[0], label: 'signal', reason: 'trying' },
  });
  expect(decide.status()).toBe(403);
  const rater = await pwRequest.newContext({ baseURL });
  await apiSignIn(rater, A);
  expect((await rater.get(`/api/studies/${studyId}/reconcile`)).status()).toBe(403);
  expect((await rater.get(`/api/studies/${studyId}/agreement`)).status()).toBe(403);
  expect((await rater.get(`/api/reconcile/runs/${run.runId}/components`)).status()).toBe(403);
  await observer.dispose();
  await rater.dispose();
});
