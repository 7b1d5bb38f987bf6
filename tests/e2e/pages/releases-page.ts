import { expect, type Page } from '@playwright/test';

/** The release page and the printable report as a lead uses them. */
export class ReleasesPage {
  constructor(private readonly page: Page) {}

  async open(studyId: number) {
    await this.page.goto(`/studies/${studyId}/releases`);
    await expect(this.page.getByTestId('releases-heading')).toBeVisible();
  }

  releaseButton() {
    return this.page.getByTestId('release-button');
  }

  /** Clicks Release and confirms in the dialog that says what follows. */
  async clickReleaseAndConfirm() {
    await this.releaseButton().click();
    const dialog = this.page.getByRole('dialog');
    await expect(dialog).toBeVisible();
    await dialog.getByTestId('release-confirm-confirm').click();
    await expect(dialog).toBeHidden();
  }

  /** Releases and waits until the worker's release job has built it (the page follows the job). */
  async release() {
    await this.clickReleaseAndConfirm();
    await expect(this.page.getByTestId('release-message')).toContainText('Released as version', { timeout: 60_000 });
  }

  /** Clicks "Download ZIP" of a version and saves the file; returns its path. */
  async downloadZip(version: number, to: string) {
    const [download] = await Promise.all([
      this.page.waitForEvent('download'),
      this.page.getByTestId(`download-release-${version}`).click(),
    ]);
    await download.saveAs(to);
    return { path: to, name: download.suggestedFilename() };
  }

  async openReport() {
    await this.page.getByTestId('report-link').click();
    await expect(this.page.getByTestId('report-heading')).toBeVisible();
  }
}
