import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { StudyPage } from './pages/study-page';

// The walkthrough's Monday: a lead creates a study, drags in runs (two good, one truncated), sees
// each file's progress, and watches the good runs go from queued to ready in the runs table.
// Reaching "ready" needs the worker that scripts/e2e-server.sh starts beside the server.
const WORKER = existsSync(path.resolve('scripts/worker.ts'));

let dir: string;
test.beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'quorum-e2e-demo-'));
  execFileSync('node', ['--import', 'tsx', 'scripts/make-demo-data.ts', '--out', dir, '--size', 'tiny', '--runs', '2', '--with-broken'], {
    stdio: 'ignore',
  });
});

test('a lead uploads two runs and a truncated file: the truncated one is refused, the others reach ready', async ({ page }) => {
  test.setTimeout(240_000);
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();

  const study = new StudyPage(page);
  await study.createStudy(`Upload walk ${Date.now()}`, { dropVolumes: 4 });

  const good = ['sub-01_ses-1_task-rest_bold.nii.gz', 'sub-02_ses-1_task-rest_bold.nii.gz'];
  const broken = 'sub-12_ses-1_task-rest_bold.nii.gz';
  await study.chooseRuns([...good, broken].map((f) => path.join(dir, f)));

  // entities parsed from the names, editable before confirming: fix the second run's subject
  await expect(study.uploadItem(good[0]).getByTestId('entity-sub')).toHaveValue('01');
  await expect(study.uploadItem(good[0]).getByTestId('entity-task')).toHaveValue('rest');
  await study.uploadItem(good[1]).getByTestId('entity-sub').fill('22');
  await study.attachMotion(good[0], path.join(dir, 'sub-01_ses-1_task-rest_desc-motion_timeseries.tsv'));
  await study.startUpload();

  // the truncated file is refused with its own message; the other two go on
  const refused = study.uploadItem(broken);
  await expect(refused.getByTestId('upload-status')).toHaveAttribute('data-phase', 'refused');
  await expect(refused.getByTestId('upload-error')).toContainText('The file is truncated: ');
  for (const f of good) {
    await expect(study.uploadItem(f).getByTestId('upload-status')).toHaveAttribute('data-phase', 'queued');
    await expect(study.uploadItem(f).getByTestId('upload-progress')).toHaveAttribute('aria-valuenow', '100');
  }

  const rows = [study.runRow('sub-01_ses-1_task-rest'), study.runRow('sub-22_ses-1_task-rest')];
  for (const row of rows) await expect(row).toBeVisible();
  await expect(page.locator('[data-testid="run-row"]')).toHaveCount(2);

  if (!WORKER) {
    for (const row of rows) await expect(row.getByTestId('run-status')).toHaveText(/queued|processing/);
    test.skip(true, 'scripts/worker.ts is not there yet: runs stay queued, so "ready" cannot be checked.');
    return;
  }
  // polled live by the table: queued → processing (stage + percent) → ready, with the components count
  for (const row of rows) {
    await expect(row.getByTestId('run-status')).toHaveText('ready', { timeout: 180_000 });
    await expect(row.getByTestId('run-components')).toHaveText(/^\d+$/);
  }
  await expect(page.getByTestId('progress-ready')).toHaveText('2');
});
