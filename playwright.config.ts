import { defineConfig } from '@playwright/test';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './tests/e2e/helpers/chromium';

const port = Number(process.env.QUORUM_E2E_PORT ?? 3100);

// Browser tests run Debian's Chromium (no browser download) against a production build served by
// scripts/e2e-server.sh on its own database (quorum_e2e), never a remote one (see tests/e2e/guard.ts).
export default defineConfig({
  testDir: 'tests/e2e',
  timeout: 60_000,
  expect: { timeout: 15_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: process.env.CI
    ? [['list'], ['json', { outputFile: '.data/test-results/playwright.json' }]]
    : [['list'], ['json', { outputFile: '.data/test-results/playwright.json' }]],
  globalSetup: './tests/e2e/guard.ts',
  use: {
    baseURL: `http://localhost:${port}`,
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: { executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS },
  },
  webServer: {
    command: `bash scripts/e2e-server.sh ${port}`,
    url: `http://localhost:${port}/api/health`,
    timeout: 240_000,
    reuseExistingServer: !process.env.CI,
    stdout: 'pipe',
    stderr: 'pipe',
  },
});
