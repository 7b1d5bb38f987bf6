/**
 * Friday (WALKTHROUGH.md): a lead releases a study whose decisions are complete, downloads the ZIP
 * (its manifest checksums match the files in it), and opens the printable agreement report with
 * its methods paragraph and cautions. An observer sees the releases but no Release action.
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { ReleasesPage } from './pages/releases-page';

let studyId: number;

/** A fresh study with one tiny ready run, votes from two submitted raters and complete decisions. */
function createDecidedStudy(pendingFirst = false): number {
  const out = execFileSync(
    'node',
    [
      '--import',
      'tsx',
      '-e',
      `
    Promise.all([import('./lib/db/knex.ts'), import('./tests/e2e/helpers/ready-run.ts'), import('./tests/integration/helpers/submitted.ts')]).then(async ([{ createDb }, { createReadyRun }, { markSubmitted }]) => {
      const db = createDb();
      const ids = Object.fromEntries((await db('users').select('id', 'email')).map((u) => [u.email.split('@')[0], u.id]));
      const [studyId] = await db('studies').insert({ name: 'Release walk ' + Date.now(), created_by: ids.lead, raters_per_run: 2, consensus_rule: 'majority',
        label_set: JSON.stringify(['signal', 'noise', 'uncertain']), noise_kinds: JSON.stringify(['motion', 'other']) });
      for (const [who, role] of [['lead', 'lead'], ['rater1', 'rater'], ['rater2', 'rater'], ['observer', 'observer']]) await db('study_members').insert({ study_id: studyId, user_id: ids[who], study_role: role });
      const run = await createReadyRun(db, { studyId, createdBy: ids.lead, raterIds: [ids.rater1, ids.rater2], size: 'tiny', seed: 21, sub: 'walk01', components: 6 });
      for (const [n, componentId] of run.componentIds.entries()) {
        const label = n % 3 === 2 ? 'noise' : 'signal';
        for (const r of ['rater1', 'rater2']) await db('votes').insert({ component_id: componentId, run_id: run.runId, rater_id: ids[r], label, noise_kind: label === 'noise' ? 'motion' : null });
        const pending = ${pendingFirst} && n === 0;
        await db('decisions').insert({ component_id: componentId, run_id: run.runId, label: pending ? null : label, noise_kind: label === 'noise' ? 'motion' : null, method: pending ? 'pending' : 'unanimous' });
      }
      await markSubmitted(db, { runId: run.runId }); // as the desk's submit does: agreement reads the votes as first submitted
      process.stdout.write(JSON.stringify({ studyId }));
      await db.destroy();
    });`,
    ],
    {
      env: {
        ...process.env,
        QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e',
        QUORUM_UPLOADS_DIR: process.env.QUORUM_UPLOADS_DIR ?? path.resolve('.data/e2e-uploads'),
      },
      encoding: 'utf8',
    },
  );
  return JSON.parse(out).studyId;
}

test.beforeAll(() => {
  studyId = createDecidedStudy();
});

test('a lead releases the study, downloads the ZIP with a verified manifest, and opens the report', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const releases = new ReleasesPage(page);
  await releases.open(studyId);
  await expect(page.getByTestId('no-releases')).toBeVisible();
  await releases.release();
  await expect(page.getByTestId('release-entry')).toHaveCount(1);
  await expect(page.getByTestId('release-files')).toContainText('sub-walk01_ses-1_task-rest_desc-noiselist_components.txt');

  const dir = mkdtempSync(path.join(os.tmpdir(), 'quorum-e2e-zip-'));
  const zip = await releases.downloadZip(1, path.join(dir, 'release.zip'));
  expect(zip.name).toBe(`study-${studyId}_release-v1.zip`);
  execFileSync('unzip', ['-q', zip.path, '-d', path.join(dir, 'x')]);
  const root = path.join(dir, 'x', readdirSync(path.join(dir, 'x'))[0]!);
  const manifest = JSON.parse(readFileSync(path.join(root, 'manifest.json'), 'utf8'));
  expect(manifest.files.length).toBeGreaterThan(10);
  for (const f of manifest.files)
    expect(
      createHash('sha256')
        .update(readFileSync(path.join(root, f.path)))
        .digest('hex'),
      f.path,
    ).toBe(f.sha256);
  expect(readFileSync(path.join(root, 'sub-walk01/ses-1/sub-walk01_ses-1_task-rest_desc-noiselist_components.txt'), 'utf8')).toBe('3,6\n');

  // denoised data from the worker (partial regression by default); the link appears when done
  await page.locator('[data-testid^="denoise-request-"]').first().click();
  const link = page.locator('[data-testid^="denoise-download-"]').first();
  await expect(link).toBeVisible({ timeout: 45_000 });
  await expect(link).toContainText('sub-walk01_ses-1_task-rest_desc-denoisedpartial_bold.nii.gz');
  const [denoised] = await Promise.all([page.waitForEvent('download'), link.click()]);
  await denoised.saveAs(path.join(dir, 'denoised.nii.gz'));
  expect(readFileSync(path.join(dir, 'denoised.nii.gz')).subarray(0, 2)).toEqual(Buffer.from([0x1f, 0x8b]));

  await releases.openReport();
  await expect(page.getByTestId('report-runs')).toHaveText('1');
  await expect(page.getByTestId('methods-paragraph')).toContainText('symmetric FastICA');
  await expect(page.getByTestId('methods-paragraph')).toContainText('1000 resamples, seed 1');
  await expect(page.getByTestId('report-cautions')).toContainText('not for diagnosis');
  await expect(page.getByTestId('print-report')).toBeVisible();
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByTestId('print-report')).toBeHidden();
  const decisionsNow = (await page.getByTestId('report-decisions').textContent()) ?? '';
  const ratersNow = (await page.getByTestId('report-raters').textContent()) ?? '';

  // the release's own report shows the statistics its release job stored: nothing changed since, so
  // they are the figures of the current state
  await page.emulateMedia({ media: 'screen' });
  await releases.open(studyId);
  await page.getByRole('link', { name: 'Report for this release' }).first().click();
  await expect(page.getByTestId('report-scope')).toContainText('Release version 1');
  await expect(page.getByTestId('report-runs')).toHaveText('1');
  await expect(page.getByTestId('report-decisions')).toHaveText(decisionsNow);
  await expect(page.getByTestId('report-raters')).toHaveText(ratersNow);
  await expect(page.getByTestId('methods-paragraph')).toContainText('1000 resamples, seed 1');
});

test('an observer sees the release and its checksums but no Release action', async ({ page }) => {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.observer);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const releases = new ReleasesPage(page);
  await releases.open(studyId);
  await expect(page.getByTestId('release-entry').first()).toBeVisible();
  await expect(releases.releaseButton()).toHaveCount(0);
});

test('a lead is told why a study with a pending decision cannot be released, with a way to Reconcile', async ({ page }) => {
  const pendingStudy = createDecidedStudy(true);
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.lead);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const releases = new ReleasesPage(page);
  await releases.open(pendingStudy);
  const refusal = page.getByTestId('release-refusal');
  await expect(refusal).toContainText('1 of 6 components have no final decision yet (1 pending');
  await expect(refusal.getByRole('link', { name: 'Open Reconcile' })).toHaveAttribute('href', `/studies/${pendingStudy}/reconcile`);
  await releases.clickReleaseAndConfirm();
  await expect(page.getByTestId('release-message')).toContainText('no final decision yet');
  await expect(page.getByTestId('no-releases')).toBeVisible();
});
