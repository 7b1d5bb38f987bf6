import { expect, type Page } from '@playwright/test';

/** The rating desk as a rater uses it: keys first. */
export class DeskPage {
  constructor(readonly page: Page) {}

  async open(runId: number) {
    await this.page.goto(`/runs/${runId}/rate`);
    await this.ready();
  }

  async ready() {
    await expect(this.page.getByTestId('rating-desk')).toBeVisible();
    await expect(this.page.getByTestId('viewer-ready')).toBeAttached({ timeout: 30_000 });
  }

  position() {
    return this.page.getByTestId('desk-position');
  }

  progressText() {
    return this.page.getByTestId('desk-progress-text');
  }

  syncStatus() {
    return this.page.getByTestId('sync-status');
  }

  async press(key: string) {
    await this.page.keyboard.press(key);
  }

  /** The label of each component in the strip ('' = not labelled). */
  async stripLabels(): Promise<string[]> {
    return this.page
      .getByTestId('component-strip')
      .locator('button')
      .evaluateAll((els) => els.map((e) => e.getAttribute('data-label') ?? ''));
  }

  async waitSaved() {
    await expect(this.syncStatus()).toHaveText('All votes saved');
  }
}
