import { defineConfig } from '@playwright/test';
import { CHROMIUM_ARGS, CHROMIUM_PATH, VIEWPORT } from './bench/browserChromium.ts';
import { PREVIEW_PORT } from './vite.config.ts';

/**
 * End-to-end tests of the visualiser in Debian's Chromium (no browser download), against the
 * production build served by `vite preview`. Spec files are tests/e2e/*.e2e.ts, a name vitest
 * does not pick up.
 */
export default defineConfig({
  testDir: 'tests/e2e',
  testMatch: '**/*.e2e.ts',
  outputDir: 'test-results/e2e',
  timeout: 60_000,
  expect: { timeout: 15_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: process.env.CI ? [['list'], ['json', { outputFile: 'test-results/e2e-report.json' }]] : 'list',
  use: {
    baseURL: `http://127.0.0.1:${PREVIEW_PORT}`,
    viewport: VIEWPORT,
    browserName: 'chromium',
    launchOptions: { executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS },
    screenshot: 'only-on-failure',
    trace: 'off',
  },
  webServer: {
    command: `npx vite build --logLevel warn && npx vite preview --host 127.0.0.1 --port ${PREVIEW_PORT} --strictPort`,
    url: `http://127.0.0.1:${PREVIEW_PORT}`,
    reuseExistingServer: !process.env.CI,
    timeout: 120_000,
    stdout: 'ignore',
    stderr: 'pipe',
  },
});
