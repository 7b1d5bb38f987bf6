/**
 * Issue 15 item 4, where a lead meets it: the runs table shows the worker's real stage, percent and
 * message for a processing run (e.g. "restart 2 of 3, iteration 41" inside the ICA stage), never
 * the queue's "Waiting for a worker" once a worker has the job. The worker's reports themselves are
 * checked in tests/integration/job-progress.test.ts; here the job row is set to what a worker in
 * the middle of the ICA stage writes, and held there (a lease far in the future), so what the page
 * shows does not depend on how fast a decomposition runs.
 */
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { StudyPage } from './pages/study-page';
import { createE2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

test('the runs table shows the stage, percent and message of a run a worker is decomposing', async ({ page }) => {
  const name = `Progress shown ${Date.now().toString(36)}`;
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page).not.toHaveURL(/sign-in/);
  await new StudyPage(page).createStudy(name);
  const studyId = Number(new URL(page.url()).pathname.split('/').pop());
  expect(studyId).toBeGreaterThan(0);

  const run = createE2eRun({ size: 'tiny', seed: 41 });
  sql(`UPDATE runs SET study_id = ${studyId}, status = 'processing', status_message = NULL WHERE id = ${run.runId}`);
  sql(
    `INSERT INTO jobs (kind, payload, status, priority, attempts, max_attempts, run_id, study_id, lease_owner, lease_expires_at, stage, percent, message, run_after, started_at)
     VALUES ('decompose', '{"runId":${run.runId}}', 'running', 0, 1, 3, ${run.runId}, ${studyId}, 'e2e-held', NOW(3) + INTERVAL 1 DAY, 'ica', 42, 'restart 2 of 3, iteration 41', NOW(3), NOW(3))`,
  );
  try {
    await page.reload();
    const row = page.locator('[data-testid="run-row"]', { has: page.getByTestId('run-job-message') });
    await expect(row).toHaveCount(1);
    await expect(row.getByTestId('run-status')).toHaveText('processing');
    await expect(row.getByText('ica · 42%')).toBeVisible();
    await expect(row.getByRole('progressbar')).toHaveAttribute('aria-valuenow', '42');
    await expect(row.getByTestId('run-job-message')).toHaveText('restart 2 of 3, iteration 41');
    await expect(row).not.toContainText('Waiting for a worker');
  } finally {
    sql(
      `UPDATE jobs SET status = 'cancelled', lease_owner = NULL, lease_expires_at = NULL WHERE run_id = ${run.runId} AND lease_owner = 'e2e-held'`,
    );
    sql(`UPDATE runs SET status = 'cancelled' WHERE id = ${run.runId}`);
  }
});
