/**
 * The structural underlay (issue 14): a study lead attaches a structural image on the run's grid from
 * the read-only run view (a file on another grid is refused in words); the rater's desk then offers
 * "structural" beside "mean image" and the viewer swaps the underlay without reloading the maps.
 * The structural image here is the run's own mean image (a real NIfTI on the run's grid, as the
 * worker wrote it); the refused one is the same voxels written one slice shorter.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { decodeNifti, encodeNifti1 } from '../../lib/nifti';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

async function signIn(page: Page, email: string) {
  await page.context().clearCookies();
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(email);
  await expect(page.getByTestId('home-heading')).toBeVisible();
}

test('a lead attaches a structural image on the run grid; the rater switches the underlay', async ({ page }) => {
  test.setTimeout(180_000);
  const run = createE2eRun({ raters: [DEMO.rater], size: 'small', seed: 41 });
  const meanKey = sql<{ k: string }>(`SELECT mean_key AS k FROM decompositions WHERE id = ${run.decompositionId}`)[0].k;
  const uploads = process.env.QUORUM_UPLOADS_DIR ?? path.join(process.cwd(), '.data/e2e-uploads');
  const meanBytes = readFileSync(path.join(uploads, meanKey));
  const dir = mkdtempSync(path.join(os.tmpdir(), 'quorum-underlay-'));
  const good = path.join(dir, 'sub-01_T1w_on-bold.nii.gz');
  writeFileSync(good, meanBytes);
  const mean = decodeNifti(new Uint8Array(meanBytes));
  const [nx, ny, nz] = mean.header.dims;
  const wrong = path.join(dir, 'sub-01_T1w_other-grid.nii');
  writeFileSync(
    wrong,
    encodeNifti1({
      dims: [nx, ny, nz - 1],
      pixdim: mean.header.pixdim.slice(1, 4),
      affine: mean.header.affine,
      datatype: 'float32',
      data: mean.readVolume(0).subarray(0, nx * ny * (nz - 1)),
    }),
  );

  await signIn(page, DEMO.lead);
  await page.goto(`/runs/${run.runId}/view`);
  await expect(page.getByTestId('viewer-ready')).toBeAttached({ timeout: 60_000 });
  await expect(page.getByTestId('structural-current')).toHaveText('None: the desk shows the mean image.');
  await expect(page.getByTestId('underlay-structural')).toHaveCount(0);
  // another grid: refused with what differs
  await page.getByTestId('structural-file').setInputFiles(wrong);
  await expect(page.getByTestId('structural-message')).toContainText(
    `is ${nx} × ${ny} × ${nz - 1} voxels; this run's grid is ${nx} × ${ny} × ${nz}`,
  );
  // the run's grid: attached
  await page.getByTestId('structural-file').setInputFiles(good);
  await expect(page.getByTestId('structural-message')).toHaveText("sub-01_T1w_on-bold.nii.gz is the run's structural underlay now.");
  await expect(page.getByTestId('structural-current')).toHaveText('Attached: sub-01_T1w_on-bold.nii.gz');

  await signIn(page, DEMO.rater);
  const mapRequests: string[] = [];
  page.on('request', (r) => {
    if (/\/maps\/layout/.test(r.url())) mapRequests.push(r.url()); // the desk's map payload (issue 14)
  });
  const desk = new DeskPage(page);
  await desk.open(run.runId);
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'mean');
  const before = mapRequests.length;
  expect(before, 'the desk loaded its map payload').toBeGreaterThan(0);
  await page.getByTestId('underlay-structural').click();
  await expect(page.getByTestId('underlay-structural')).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'structural');
  await expect(page.getByTestId('viewer-error')).toHaveCount(0);
  await page.getByTestId('underlay-mean').click();
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'mean');
  // the B key does the same (listed in the help overlay)
  await desk.press('b');
  await expect(page.getByTestId('underlay-structural')).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'structural');
  await desk.press('b');
  await expect(page.getByTestId('viewer-ready')).toHaveAttribute('data-underlay', 'mean');
  await desk.press('?');
  await expect(page.getByTestId('help-overlay')).toContainText('Underlay: mean image ↔ structural');
  await desk.press('Escape');
  await expect(page.getByTestId('help-overlay')).toHaveCount(0);
  expect(mapRequests.length, 'switching the underlay does not fetch the maps again').toBe(before);
  // the map still follows the components
  await desk.press('j');
  await expect(desk.position()).toHaveText(/^Component 2 of /);
});
