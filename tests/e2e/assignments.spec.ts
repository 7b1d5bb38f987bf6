/**
 * A study lead manages assignments in the browser: opens Assignments from the study page, sees a
 * run's raters with their progress, adds a rater (who gets one e-mail listing the run), removes a
 * rater who has votes only after a confirmation that says what happens to the votes, and sets a
 * due date for several runs at once. A rater cannot open the page.
 * Run with QUORUM_NOTIFY_BATCH_MS small (e.g. 1000) so the e-mail batch goes out during the test.
 */
import { expect, request as pwRequest, test, type Page } from '@playwright/test';
import { waitForMail } from '../../lib/mail/mailbox';
import { MAIL_DIR } from './pages/people';
import { apiSignIn, DEMO, SignInPage } from './pages/sign-in-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';

const A = 'rater1@fernhollow.example'; // Amara Lindqvist
const B = 'rater2@fernhollow.example'; // Jonah Adeyemi
const C = 'rater4@fernhollow.example'; // Kenji Halvorsen
let run: E2eRun;
let other: E2eRun;

/** The lead's assignments page. */
class AssignmentsPage {
  constructor(private readonly page: Page) {}
  row(runId: number) {
    return this.page.getByTestId(`assignments-run-${runId}`);
  }
  cell(runId: number, name: string) {
    return this.row(runId)
      .getByRole('listitem')
      .filter({ has: this.page.getByTestId('assignment-rater').getByText(name, { exact: true }) });
  }
  async add(runId: number, name: string) {
    const select = this.row(runId).getByTestId('add-rater-select');
    const value = await select.locator('option', { hasText: name }).getAttribute('value');
    await select.selectOption(value!);
    await this.row(runId).getByTestId('add-rater').click();
  }
  message() {
    return this.page.getByTestId('assignments-message');
  }
}

test.beforeAll(async ({ baseURL }) => {
  run = createE2eRun({ raters: [A, B], size: 'tiny', seed: 41 });
  other = createE2eRun({ raters: [B], size: 'tiny', seed: 42 });
  // rater A labels the first component of the run
  const a = await pwRequest.newContext({ baseURL });
  await apiSignIn(a, A);
  const res = await a.put(`/api/runs/${run.runId}/votes/${run.componentIds[0]}`, {
    data: { label: 'signal', noiseKind: null, baseVersion: 0 },
  });
  expect(res.status(), await res.text()).toBe(200);
  await a.dispose();
});

test('a lead adds, removes (with confirmation) and dates assignments; the added rater gets one e-mail', async ({ page }) => {
  const since = new Date();
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const studyId = await page.evaluate(async (runId) => (await (await fetch(`/api/runs/${runId}`)).json()).run.studyId as number, run.runId);
  await page.goto(`/studies/${studyId}`);
  await page.getByTestId('study-assignments-link').click();
  await expect(page.getByRole('heading', { name: 'Assignments' })).toBeVisible();

  const p = new AssignmentsPage(page);
  await expect(p.cell(run.runId, 'Amara Lindqvist').getByTestId('assignment-progress')).toHaveText(`1/${run.k} labelled`);
  await expect(p.cell(run.runId, 'Jonah Adeyemi').getByTestId('assignment-progress')).toHaveText(`0/${run.k} labelled`);

  await p.add(run.runId, 'Kenji Halvorsen');
  await expect(p.message()).toContainText('Kenji Halvorsen now rates');
  await expect(p.cell(run.runId, 'Kenji Halvorsen')).toBeVisible();
  const mail = await waitForMail({ to: C, subject: /to rate$/, since, dir: MAIL_DIR, timeoutMs: 30_000 });
  expect(mail.text).toContain(`/runs/${run.runId}/rate`);
  expect(mail.subject).toContain('Fernhollow Imaging Core');

  // Amara has a vote: the page asks first and says what happens to it
  await p.cell(run.runId, 'Amara Lindqvist').getByTestId('assignment-remove').click();
  const confirm = page.getByTestId('assignment-confirm');
  await expect(confirm).toContainText('1 vote on this run');
  await expect(confirm).toContainText('stay in the database');
  await expect(confirm).toContainText('no longer count');
  await page.getByTestId('assignment-confirm-yes').click();
  await expect(p.message()).toContainText('Amara Lindqvist no longer rates');
  await expect(p.cell(run.runId, 'Amara Lindqvist')).toHaveCount(0);

  // a due date for two runs at once
  await p.row(run.runId).getByRole('checkbox').check();
  await p.row(other.runId).getByRole('checkbox').check();
  await page.getByTestId('bulk-due').fill('2031-03-14');
  await page.getByTestId('bulk-due-apply').click();
  await expect(p.message()).toContainText('Due 2031-03-14');
  await expect(p.cell(other.runId, 'Jonah Adeyemi').getByLabel('Due date for Jonah Adeyemi')).toHaveValue('2031-03-14');
});

test('a rater cannot open the assignments page nor change assignments', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(A);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const status = await page.evaluate(
    async (runId) => (await fetch(`/api/runs/${runId}/assignments/1?confirm=1`, { method: 'DELETE' })).status,
    run.runId,
  );
  expect(status).toBe(403);
  await page.goto('/studies/1/assignments');
  await expect(page.getByTestId('forbidden')).toBeVisible();
  await expect(page.getByTestId('assignments-table')).toHaveCount(0);
});
