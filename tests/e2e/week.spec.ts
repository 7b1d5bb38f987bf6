/**
 * A week of real use (issue 15): a lead drops a BIDS folder (runs paired with their motion tables
 * and sidecars, the rest left out in one line), is warned before uploading two runs with the same
 * labels, corrects one run's labels in the runs table; releasing a study and revoking a token ask
 * for confirmation in an accessible dialog that says what follows; the printed report is dark ink
 * on white paper even with background graphics printed (page.pdf rendered by poppler's pdftoppm).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { StudyPage } from './pages/study-page';
import { ReleasesPage } from './pages/releases-page';
import { createDecidedStudy } from './helpers/decided-study';
import { sql } from './helpers/e2e-db';

async function signInAs(page: Page, email: string) {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

test('a lead drops a BIDS folder: only runs become cards, with their motion tables; taken labels are confirmed, then corrected', async ({
  page,
}) => {
  const dir = mkdtempSync(path.join(tmpdir(), 'quorum-e2e-folder-'));
  execFileSync('node', ['--import', 'tsx', 'scripts/make-demo-data.ts', '--out', dir, '--size', 'tiny', '--runs', '2'], {
    stdio: 'ignore',
  });
  const files = readdirSync(dir);
  expect(files.filter((f) => f.endsWith('_bold.nii.gz'))).toHaveLength(2);
  await signInAs(page, DEMO.lead);
  const study = new StudyPage(page);
  await study.createStudy(`Folder walk ${Date.now()}`);

  await page.getByTestId('upload-folder-input').setInputFiles(dir);
  const cards = page.getByTestId('upload-item');
  await expect(cards).toHaveCount(2);
  await expect(page.getByTestId('upload-start')).toHaveText('Upload 2 runs');
  await expect(page.locator('[data-phase="refused"]')).toHaveCount(0);
  const left = files.length - 2 - 2 * 2; // runs, and per run its motion table and bold sidecar, are used
  await expect(page.getByTestId('upload-ignored')).toContainText(`Not runs, left out (${left} files)`);
  await expect(page.getByTestId('upload-ignored')).toContainText('desc-truth_maps.nii.gz');
  const first = study.uploadItem('sub-01_ses-1_task-rest_bold.nii.gz');
  await expect(first.getByTestId('upload-companions')).toContainText('motion table sub-01_ses-1_task-rest_desc-motion_timeseries.tsv');
  await expect(first.getByTestId('upload-companions')).toContainText('sidecar sub-01_ses-1_task-rest_bold.json');

  // give the second run the first one's labels: the card says so, and Upload asks first
  const second = study.uploadItem('sub-02_ses-1_task-rest_bold.nii.gz');
  await second.getByTestId('entity-sub').fill('01');
  // the later of the two cards (the folder's order) names the other one
  const clash = page.getByTestId('upload-duplicate');
  await expect(clash).toHaveCount(1);
  await expect(clash).toContainText(/sub-01_ses-1_task-rest is also the labels of sub-0[12]_ses-1_task-rest_bold\.nii\.gz above/);
  await study.startUpload();
  const dialog = page.getByRole('dialog', { name: 'Upload runs whose labels are taken?' });
  await expect(dialog).toBeVisible();
  await expect(dialog).toContainText('cannot be released until a lead changes the labels');
  await expect(dialog.getByRole('button', { name: 'Go back and change the labels' })).toBeFocused();
  await page.keyboard.press('Escape');
  await expect(dialog).toBeHidden();
  await expect(second.getByTestId('upload-status')).toHaveAttribute('data-phase', 'pending');
  await study.startUpload();
  await dialog.getByRole('button', { name: 'Upload anyway' }).click();
  for (const card of [first, second])
    await expect(card.getByTestId('upload-status')).toHaveAttribute('data-phase', 'queued', { timeout: 60_000 });

  // both rows carry the same name; the lead corrects the second one's run label
  const twins = study.runRow('sub-01_ses-1_task-rest');
  await expect(twins).toHaveCount(2);
  await twins.nth(1).getByTestId('run-labels').click();
  const form = page.getByTestId('run-labels-form');
  await form.getByTestId('run-label-run').fill('2');
  await expect(form).toContainText('sub-01_ses-1_task-rest_run-2');
  await form.getByTestId('run-labels-save').click();
  await expect(study.runRow('sub-01_ses-1_task-rest_run-2')).toHaveCount(1);
  await expect(study.runRow('sub-01_ses-1_task-rest')).toHaveCount(1);
});

test('releasing asks for confirmation saying what is frozen; Escape keeps the study unreleased', async ({ page }) => {
  const studyId = createDecidedStudy('Confirm walk');
  await signInAs(page, DEMO.lead);
  const releases = new ReleasesPage(page);
  await releases.open(studyId);
  await releases.releaseButton().click();
  const dialog = page.getByRole('dialog', { name: 'Release the study?' });
  await expect(dialog).toBeVisible();
  await expect(dialog).toContainText('1 run with 6 components');
  await expect(dialog).toContainText('Every vote on the released runs is frozen');
  await expect(dialog).toContainText('This cannot be undone.');
  await expect(dialog.getByRole('button', { name: 'Cancel' })).toBeFocused();
  await page.keyboard.press('Escape');
  await expect(dialog).toBeHidden();
  await expect(page.getByTestId('no-releases')).toBeVisible();
  await releases.release();
  await expect(page.getByTestId('release-entry')).toHaveCount(1);
});

test('revoking a token asks first and names what stops working', async ({ page }) => {
  await signInAs(page, DEMO.lead);
  await page.goto('/account');
  const name = `week pipeline ${Date.now()}`;
  await page.locator('#token-name').fill(name);
  await page.getByTestId('token-create').click();
  await expect(page.getByTestId('token-secret')).toBeVisible();
  const row = page.locator('tr', { hasText: name });
  await row.getByRole('button', { name: 'Revoke' }).click();
  const dialog = page.getByRole('dialog', { name: `Revoke the token “${name}”?` });
  await expect(dialog).toContainText('refused from now on (401)');
  await dialog.getByRole('button', { name: 'Cancel' }).click();
  await expect(dialog).toBeHidden();
  await expect(row.getByRole('button', { name: 'Revoke' })).toBeVisible();
  await row.getByRole('button', { name: 'Revoke' }).click();
  await dialog.getByRole('button', { name: 'Revoke the token' }).click();
  await expect(row).toContainText('revoked');
});

/** Mean grey level (0 black … 255 white) and the share of dark pixels of a binary PGM (P5, 8-bit). */
function pgmStats(file: string): { mean: number; dark: number } {
  const buf = readFileSync(file);
  const m = /^P5\s+(\d+)\s+(\d+)\s+(\d+)\s/.exec(buf.subarray(0, 64).toString('latin1'));
  expect(m?.[3]).toBe('255');
  const pixels = buf.subarray(m![0].length);
  expect(pixels.length).toBe(Number(m![1]) * Number(m![2]));
  let sum = 0;
  let dark = 0;
  for (const p of pixels) {
    sum += p;
    if (p < 96) dark += 1;
  }
  return { mean: sum / pixels.length, dark: dark / pixels.length };
}

test('stale report figures are shown with their time while the worker brings them up to date', async ({ page }) => {
  const studyId = createDecidedStudy('Stale report walk', 'sr01');
  await signInAs(page, DEMO.lead);
  await page.goto(`/studies/${studyId}/report`);
  await expect(page.getByTestId('report-heading')).toBeVisible();
  await expect(page.getByTestId('report-computing')).toHaveCount(0); // the first view computes and stores them
  // anything the report depends on changes (here the study's protocol row): the stored figures are stale
  sql(`UPDATE studies SET description = 'changed after the first report', updated_at = NOW(3) WHERE id = ${studyId}`);
  await page.reload();
  await expect(page.getByTestId('report-heading')).toBeVisible();
  await expect(page.getByTestId('report-computing')).toBeVisible();
  expect(
    sql<{ n: number }>(`SELECT COUNT(*) AS n FROM jobs WHERE kind = 'agreement-report' AND study_id = ${studyId}`)[0]!.n,
  ).toBeGreaterThan(0);
  // the worker's agreement-report job stores the new figures; the page refreshes itself until they are current
  await expect(page.getByTestId('report-computing')).toHaveCount(0, { timeout: 60_000 });
  expect(
    sql<{ status: string }>(`SELECT status FROM jobs WHERE kind = 'agreement-report' AND study_id = ${studyId}`).map((j) => j.status),
  ).toContain('succeeded');
});

test('the printed report is dark ink on white paper, with background graphics printed and nothing hidden', async ({ page }) => {
  const studyId = createDecidedStudy('Print walk', 'pr01');
  await signInAs(page, DEMO.lead);
  await page.goto(`/studies/${studyId}/report`);
  await expect(page.getByTestId('report-heading')).toBeVisible();
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByTestId('print-report')).toBeHidden();
  // the print media styles: white paper, near-black text, light panels, methods and cautions shown
  const styles = await page.evaluate(() => {
    const css = (el: Element | null) => (el ? getComputedStyle(el) : null);
    const panel = document.querySelector('[data-testid="report"] section');
    const muted = document.querySelector('[data-testid="report"] .text-ink-muted');
    return {
      body: css(document.body)!.backgroundColor,
      bodyText: css(document.body)!.color,
      panel: css(panel)!.backgroundColor,
      heading: css(document.querySelector('[data-testid="report-heading"]'))!.color,
      muted: css(muted)!.color,
      nav: document.querySelector('header.no-print') ? css(document.querySelector('header.no-print'))!.display : 'none',
    };
  });
  expect(styles).toEqual({
    body: 'rgb(255, 255, 255)',
    bodyText: 'rgb(17, 17, 17)',
    panel: 'rgb(255, 255, 255)',
    heading: 'rgb(17, 17, 17)',
    muted: 'rgb(51, 51, 51)',
    nav: 'none',
  });
  for (const id of ['methods-paragraph', 'report-cautions', 'report-runs']) await expect(page.getByTestId(id)).toBeVisible();

  // print to PDF as Chromium does with "Background graphics" ticked, and look at page 1
  const dir = mkdtempSync(path.join(tmpdir(), 'quorum-e2e-print-'));
  const pdf = path.join(dir, 'report.pdf');
  writeFileSync(pdf, await page.pdf({ format: 'A4', printBackground: true }));
  execFileSync('pdftoppm', ['-f', '1', '-l', '1', '-r', '60', '-gray', '-singlefile', pdf, path.join(dir, 'page')]);
  execFileSync('pdftoppm', ['-f', '1', '-l', '1', '-r', '80', '-png', '-singlefile', pdf, path.join(dir, 'page')]); // for a person to look at
  const text = execFileSync('pdftotext', ['-layout', pdf, '-'], { encoding: 'utf8' });
  expect(text).toContain('Agreement report');
  expect(text).toContain('Methods paragraph');
  const { mean, dark } = pgmStats(path.join(dir, 'page.pgm'));
  expect(mean).toBeGreaterThan(225); // mostly white paper (a dark theme page averages far below)
  expect(dark).toBeGreaterThan(0.002); // and there is dark ink on it
  console.log(`printed report: ${path.join(dir, 'page.png')} (mean grey ${mean.toFixed(1)}, dark share ${(dark * 100).toFixed(2)} %)`);
});
