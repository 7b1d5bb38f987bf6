/**
 * Refusals answer with their HTTP status, not a 200 page that merely says so (issue 13): a page the
 * role may not open → 403, a run or study the person cannot see and a missing id → 404, each with
 * its screen. Status codes per RFC 9110 §15.5.4 (403) and §15.5.5 (404).
 */
import { expect, request as pwRequest, test, type APIRequestContext } from '@playwright/test';
import { apiSignIn } from './pages/sign-in-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';

let run: E2eRun;
let lead: APIRequestContext;
let outsider: APIRequestContext;
let otherStudyId: number;

test.beforeAll(async ({ baseURL }) => {
  run = createE2eRun({ raters: ['rater1@fernhollow.example'], size: 'tiny', seed: 33 });
  lead = await pwRequest.newContext({ baseURL });
  outsider = await pwRequest.newContext({ baseURL });
  await apiSignIn(lead, 'lead@fernhollow.example');
  await apiSignIn(outsider, 'rater4@fernhollow.example');
  // a study rater4 is no member of
  const res = await lead.post('/api/studies', {
    data: {
      name: `Status study ${Date.now()}`,
      ratersPerRun: 1,
      consensusRule: 'majority',
      allowUncertain: true,
      noiseKinds: ['motion'],
      blinding: true,
      showVotesAfterSubmit: false,
      dropVolumes: 0,
      dimMethod: 'iid-mdl',
      varianceNorm: true,
      detrend: true,
    },
  });
  expect(res.status(), await res.text()).toBe(201);
  otherStudyId = (await res.json()).id;
  expect(otherStudyId).toBeGreaterThan(0);
});

test.afterAll(async () => {
  for (const c of [lead, outsider]) await c?.dispose();
});

test('a page the role does not allow answers 403 with the refusal screen', async () => {
  const res = await outsider.get('/admin');
  expect(res.status()).toBe(403);
  // the refusal screen arrives in the page's payload (rendered by the browser; auth.spec.ts sees it there)
  const html = await res.text();
  expect(html).toContain('Your role does not allow this page');
  expect(html).not.toContain('users-table');
  const calibration = await outsider.get(`/studies/${otherStudyId}/calibration`);
  expect(calibration.status()).toBe(403);
});

test("a run not assigned to the rater answers 404 with the desk's not-found screen", async () => {
  const res = await outsider.get(`/runs/${run.runId}/rate`);
  expect(res.status()).toBe(404);
  const html = await res.text();
  expect(html).toContain('This run is not on your desk');
  expect(html).not.toContain('data-testid="rating-desk"');
});

test('a study the person is no member of answers 404, as do missing and malformed ids', async () => {
  for (const url of [`/studies/${otherStudyId}`, `/studies/${otherStudyId}/settings`]) {
    expect((await outsider.get(url)).status(), url).toBe(404);
  }
  expect((await lead.get(`/studies/${otherStudyId}`)).status(), 'the lead who made it sees it').toBe(200);
  for (const url of ['/studies/999999', '/studies/abc', '/no-such-page']) {
    expect((await lead.get(url)).status(), url).toBe(404);
  }
  // the desk is for raters (a lead gets 403 there); a missing run is 404 for a rater
  expect((await outsider.get('/runs/999999/rate')).status()).toBe(404);
});
