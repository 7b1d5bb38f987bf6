/**
 * Certifying a new rater on a calibration set, as a lead does it in the browser: two raters agree
 * on a run, the lead marks it as a calibration run, adopts its decisions as the reference and
 * assigns a new rater; once the new rater has rated it (through the desk API) and submitted, the
 * page shows their agreement with the reference and the lead certifies them.
 */
import { expect, request as pwRequest, test, type APIRequestContext } from '@playwright/test';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

const REFERENCE_RATERS = ['rater1@fernhollow.example', 'rater2@fernhollow.example'];
const NEW_RATER = 'rater4@fernhollow.example';
let run: E2eRun;
let studyId: number;
let newRaterId: number;

async function rate(ctx: APIRequestContext, labelFor: (i: number) => string) {
  for (const [i, id] of run.componentIds.entries()) {
    const label = labelFor(i);
    const res = await ctx.put(`/api/runs/${run.runId}/votes/${id}`, {
      data: { label, noiseKind: label === 'noise' ? 'motion' : null, baseVersion: 0 },
    });
    expect(res.status(), await res.text()).toBe(200);
  }
  expect((await ctx.post(`/api/runs/${run.runId}/submit`, { data: {} })).status()).toBe(200);
}

const reference = (i: number) => (i % 3 === 0 ? 'noise' : 'signal');

test.beforeAll(async ({ baseURL }) => {
  run = createE2eRun({ raters: REFERENCE_RATERS, size: 'tiny', seed: 44 });
  studyId = Number(sql<{ s: number }>(`SELECT study_id AS s FROM runs WHERE id = ${run.runId}`)[0].s);
  newRaterId = Number(sql<{ id: number }>(`SELECT id FROM users WHERE email = '${NEW_RATER}'`)[0].id);
  for (const email of REFERENCE_RATERS) {
    const ctx = await pwRequest.newContext({ baseURL });
    await apiSignIn(ctx, email);
    await rate(ctx, reference);
    await ctx.dispose();
  }
});

test('a lead builds a calibration run, and certifies a new rater on it', async ({ page, baseURL }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  await page.goto(`/studies/${studyId}/calibration`);
  await page.getByTestId('calibration-candidate').selectOption(String(run.runId));
  await page.getByTestId('calibration-mark').click();
  const row = page.getByTestId(`calibration-run-${run.runId}`);
  await expect(row).toBeVisible();
  await row.getByTestId('calibration-adopt').click();
  await expect(row.getByTestId('calibration-reference-state')).toContainText(String(run.k));
  await row.getByTestId('calibration-assign').selectOption(String(newRaterId));
  await expect(page.getByTestId(`calibration-assignment-${run.runId}-${newRaterId}`)).toContainText('open');

  // the new rater disagrees with the reference on exactly one component
  const ctx = await pwRequest.newContext({ baseURL });
  await apiSignIn(ctx, NEW_RATER);
  await rate(ctx, (i) => (i === 1 ? 'noise' : reference(i)));
  await ctx.dispose();

  await page.reload();
  const rater = page.getByTestId(`calibration-rater-${newRaterId}`);
  // percent agreement with the reference, as the page prints it (3 decimals)
  await expect(rater).toContainText(((run.k - 1) / run.k).toFixed(3));
  await rater.getByTestId('calibration-certify').click();
  await expect(rater.getByTestId('calibration-certification')).toContainText('certified');
  const cert = sql<{ passed: number }>(
    `SELECT c.passed FROM rater_certifications c WHERE c.study_id = ${studyId} AND c.user_id = ${newRaterId}`,
  );
  expect(cert.map((c) => Boolean(c.passed))).toEqual([true]);
  const audit = sql<{ action: string }>(
    `SELECT action FROM audit_log WHERE study_id = ${studyId} AND action LIKE 'calibration.%' ORDER BY id`,
  );
  expect(audit.map((a) => a.action)).toEqual([
    'calibration.run_marked',
    'calibration.reference_set',
    'calibration.assigned',
    'calibration.certified',
  ]);
});
