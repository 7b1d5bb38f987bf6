/**
 * Blinding, checked on every JSON the desk receives: before a rater submits a run nothing about
 * another rater's vote reaches them (components payload, votes payload, page HTML); after they
 * submit, the study (show_votes_after_submit) lets them see how the others voted — only raters who
 * submitted too. Submitted votes are frozen on the desk; a lead reopens the run for a rater on the
 * assignments page (with a reason, audited), the rater changes a vote, and the vote as first
 * submitted stays in the history (issue 13 item 2). A rater who is not assigned reaches nothing.
 */
import { expect, request as pwRequest, test, type APIRequestContext } from '@playwright/test';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { e2eDb } from './pages/people';
import { createE2eRun, findKey, type E2eRun } from './helpers/e2e-run';

const A = 'rater1@fernhollow.example';
const B = 'rater2@fernhollow.example';
let run: E2eRun;
let a: APIRequestContext;
let b: APIRequestContext;
let outsider: APIRequestContext;

test.beforeAll(async ({ baseURL }) => {
  run = createE2eRun({ raters: [A, B], size: 'tiny', seed: 21 });
  a = await pwRequest.newContext({ baseURL });
  b = await pwRequest.newContext({ baseURL });
  outsider = await pwRequest.newContext({ baseURL });
  await apiSignIn(a, A);
  await apiSignIn(b, B);
  await apiSignIn(outsider, 'rater4@fernhollow.example');
});

test.afterAll(async () => {
  for (const c of [a, b, outsider]) await c?.dispose();
});

/** Everything the desk loads for a rater: the page and both JSON payloads. */
async function deskJson(ctx: APIRequestContext) {
  const components = await (await ctx.get(`/api/runs/${run.runId}/components`)).json();
  const votes = await (await ctx.get(`/api/runs/${run.runId}/votes`)).json();
  const html = await (await ctx.get(`/runs/${run.runId}/rate`)).text();
  return { components, votes, html };
}

async function labelAll(ctx: APIRequestContext, label: string) {
  for (const id of run.componentIds) {
    const res = await ctx.put(`/api/runs/${run.runId}/votes/${id}`, { data: { label, baseVersion: 0 } });
    expect(res.status()).toBe(200);
  }
}

function expectBlind(j: Awaited<ReturnType<typeof deskJson>>, otherName: string) {
  for (const key of ['votes', 'others', 'decision', 'decisions', 'tally', 'tallies', 'raterName', 'method']) {
    expect(findKey(j.components, key), `components payload has no "${key}"`).toEqual([]);
  }
  expect(j.votes.others).toBeNull();
  expect(j.votes.status.othersHidden).toBe('not_submitted');
  expect(findKey(j.votes, 'raterName')).toEqual([]);
  expect(j.html).not.toContain(otherName);
  expect(j.html).not.toContain('raterName');
}

test("before submission a rater receives none of the other rater's votes; after it, she sees them", async () => {
  // A labels everything "noise" and submits
  await labelAll(a, 'noise');
  expect((await a.post(`/api/runs/${run.runId}/submit`, { data: {} })).status()).toBe(200);

  // B, not submitted: blind — before B votes, after B votes, and after A submitted
  let j = await deskJson(b);
  expectBlind(j, 'Amara Lindqvist');
  expect(j.votes.mine).toEqual([]);
  await labelAll(b, 'signal');
  j = await deskJson(b);
  expectBlind(j, 'Amara Lindqvist');
  expect(j.votes.mine.map((v: { label: string }) => v.label)).toEqual(run.componentIds.map(() => 'signal'));

  // A, submitted: sees none of B's votes while B has not submitted (not even B's name)
  let ja = await deskJson(a);
  expect(ja.votes.status.othersHidden).toBeNull();
  expect(ja.votes.others).toEqual([]);
  expect(JSON.stringify(ja.votes)).not.toContain('Jonah Adeyemi');

  // B submits: now A sees B's votes (the demo study shows votes after submission), and B sees A's
  expect((await b.post(`/api/runs/${run.runId}/submit`, { data: {} })).status()).toBe(200);
  ja = await deskJson(a);
  expect(ja.votes.others).toHaveLength(run.k);
  expect(ja.votes.others[0]).toMatchObject({ raterName: 'Jonah Adeyemi', label: 'signal' });
  const jb = await deskJson(b);
  expect(jb.votes.status.othersHidden).toBeNull();
  expect(jb.votes.others.map((v: { raterName: string; label: string }) => `${v.raterName}:${v.label}`)).toEqual(
    run.componentIds.map(() => 'Amara Lindqvist:noise'),
  );
});

test('a rater who is not assigned reaches neither the run, its votes nor its files', async () => {
  for (const url of ['components', 'votes', 'files/components.nii.gz', 'files/mean.nii.gz']) {
    const res = await outsider.get(`/api/runs/${run.runId}/${url}`);
    expect(res.status(), url).toBe(404);
    expect((await res.json()).error.message).toMatch(/not among the runs assigned to you/);
  }
  // the page streams behind its loading skeleton, so the refusal arrives as the not-found screen
  const page = await (await outsider.get(`/runs/${run.runId}/rate`)).text();
  expect(page).toContain('This run is not on your desk');
  expect(page).not.toContain('data-testid="rating-desk"');
  const assigned = await a.get(`/api/runs/${run.runId}/files/components.nii.gz`);
  expect(assigned.status()).toBe(200);
  expect(assigned.headers()['content-type']).toBe('application/gzip');
  expect((await assigned.body()).subarray(0, 2)).toEqual(Buffer.from([0x1f, 0x8b]));
});

test('submitted votes are frozen on the desk until the lead reopens the run for the rater; the first vote stays in the history', async ({
  page,
  browser,
}) => {
  // (the first test left both raters submitted: A all noise, B all signal)
  const refused = await a.put(`/api/runs/${run.runId}/votes/${run.componentIds[0]}`, { data: { label: 'signal', baseVersion: 1 } });
  expect(refused.status()).toBe(409);
  expect((await refused.json()).error.message).toContain('ask the study lead to reopen the run for you');

  // A's desk: read-only, and it says why
  const raterContext = await browser.newContext();
  const raterPage = await raterContext.newPage();
  await new SignInPage(raterPage).open();
  await new SignInPage(raterPage).signIn(A);
  await expect(raterPage.getByTestId('home-heading')).toBeVisible();
  const desk = new DeskPage(raterPage);
  // the desk's controls, without waiting for the volume viewer to draw (not what this test is about)
  const openDesk = async () => {
    await raterPage.goto(`/runs/${run.runId}/rate`);
    await expect(raterPage.getByTestId('rating-desk')).toBeVisible();
  };
  await openDesk();
  await expect(raterPage.getByTestId('submitted-note')).toContainText(
    'votes frozen; if a label must change, ask the study lead to reopen the run for you',
  );
  await expect(raterPage.getByTestId('label-signal')).toBeDisabled();

  // the lead reopens it on the assignments page, giving a reason
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const studyId = await page.evaluate(async (runId) => (await (await fetch(`/api/runs/${runId}`)).json()).run.studyId as number, run.runId);
  await page.goto(`/studies/${studyId}/assignments`);
  const cell = page.getByTestId(`assignment-${run.runId}-${await userId(A)}`);
  await expect(cell.getByTestId('assignment-state')).toHaveText('submitted');
  await cell.getByTestId('assignment-reopen').click();
  const dialog = page.getByTestId('reopen-confirm');
  await expect(dialog).toContainText('Their votes as first submitted stay in the history');
  await expect(dialog.getByTestId('reopen-confirm-yes')).toBeDisabled(); // no reason yet
  await dialog.getByTestId('reopen-reason').fill('component 1 labelled by mistake');
  await dialog.getByTestId('reopen-confirm-yes').click();
  await expect(page.getByTestId('assignments-message')).toContainText(`is open again for Amara Lindqvist`);
  await expect(cell.getByTestId('assignment-state')).not.toHaveText('submitted');
  await expect(cell.getByTestId('assignment-reopened')).toHaveText('reopened once');

  // A, on the desk again: may change the vote (blind again meanwhile), then submits once more
  await openDesk();
  await expect(raterPage.getByTestId('submit-run')).toBeVisible();
  await expect(raterPage.getByTestId('label-signal')).toBeEnabled();
  await raterPage.getByTestId('label-signal').click();
  await desk.waitSaved();
  await raterPage.getByTestId('submit-run').click();
  await expect(raterPage.getByTestId('submitted-note')).toContainText('votes frozen');
  await raterContext.close();

  // the audit log has the reopen with its reason; the vote as first submitted is kept
  const db = e2eDb();
  try {
    const entry = await db('audit_log')
      .where({ action: 'assignment.reopen', target_id: String(run.runId) })
      .first('detail');
    expect(typeof entry.detail === 'string' ? JSON.parse(entry.detail) : entry.detail).toMatchObject({
      reason: 'component 1 labelled by mistake',
      raterName: 'Amara Lindqvist',
    });
    const aId = await userId(A);
    expect((await db('submitted_votes').where({ component_id: run.componentIds[0], rater_id: aId }).first('label')).label).toBe('noise');
    expect((await db('votes').where({ component_id: run.componentIds[0], rater_id: aId }).first('label')).label).toBe('signal');
  } finally {
    await db.destroy();
  }
});

async function userId(email: string): Promise<number> {
  const db = e2eDb();
  try {
    return Number((await db('users').where({ email }).first('id')).id);
  } finally {
    await db.destroy();
  }
}
