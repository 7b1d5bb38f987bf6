/**
 * Blinding, checked on every JSON the desk receives: before a rater submits a run nothing about
 * another rater's vote reaches them (components payload, votes payload, page HTML); after they
 * submit, the study (show_votes_after_submit) lets them see how the others voted. A rater who is
 * not assigned reaches nothing.
 */
import { expect, request as pwRequest, test, type APIRequestContext } from '@playwright/test';
import { apiSignIn } from './pages/sign-in-page';
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

test('before submission a rater receives none of the other rater\'s votes; after it, she sees them', async () => {
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

  // A, submitted: sees B's votes (the demo study shows votes after submission)
  const ja = await deskJson(a);
  expect(ja.votes.others).toHaveLength(run.k);
  expect(ja.votes.others[0]).toMatchObject({ raterName: 'Jonah Adeyemi', label: 'signal' });

  // B submits: now B sees A's
  expect((await b.post(`/api/runs/${run.runId}/submit`, { data: {} })).status()).toBe(200);
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
