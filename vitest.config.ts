import { defineConfig } from 'vitest/config';
import path from 'node:path';

// 'server-only' throws outside React's server build; tests import server modules directly.
const alias = {
  '@': path.resolve(import.meta.dirname),
  'server-only': path.resolve(import.meta.dirname, 'node_modules/server-only/empty.js'),
};

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/integration/global-setup.ts'],
          setupFiles: ['tests/integration/setup-env.ts'],
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 120_000,
          execArgv: ['--import', 'tsx'],
        },
      },
    ],
  },
});
