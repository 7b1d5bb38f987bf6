import { expect, type Locator, type Page } from '@playwright/test';

/** The studies screens as a lead uses them: create a study, upload runs, read the runs table. */
export class StudyPage {
  constructor(private readonly page: Page) {}

  async createStudy(name: string, opts: { dropVolumes?: number } = {}) {
    await this.page.goto('/studies/new');
    const form = this.page.getByTestId('study-form');
    await expect(form).toBeVisible();
    await form.getByLabel('Name').fill(name);
    await form.getByLabel('Raters per run (1–5)').fill('2');
    if (opts.dropVolumes !== undefined) await form.getByLabel('Initial volumes to drop').fill(String(opts.dropVolumes));
    await this.page.getByTestId('study-save').click();
    await expect(this.page.getByTestId('study-name')).toHaveText(name);
  }

  async chooseRuns(files: string[]) {
    await this.page.getByTestId('upload-input').setInputFiles(files);
  }

  uploadItem(fileName: string): Locator {
    return this.page.locator(`[data-testid="upload-item"][data-file="${fileName}"]`);
  }

  async attachMotion(fileName: string, motionFile: string) {
    await this.uploadItem(fileName).getByLabel('Motion parameters (optional; translations in mm)').setInputFiles(motionFile);
  }

  async startUpload() {
    await this.page.getByTestId('upload-start').click();
  }

  runRow(bids: string): Locator {
    return this.page.locator(`[data-testid="run-row"][data-run="${bids}"]`);
  }
}
