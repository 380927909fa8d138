import { defineConfig } from '@playwright/test';

const baseURL = process.env.APP_URL ?? 'http://127.0.0.1:3100';

/** Browser tests against the production server `npm test` started, in Debian's chromium. */
export default defineConfig({
  testDir: '.',
  testMatch: /.*\.spec\.ts$/,
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  reporter: [['list'], ['json']],
  outputDir: '../../.data/test-results',
  use: {
    baseURL,
    viewport: { width: 1280, height: 900 },
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
    trace: 'off',
    screenshot: 'only-on-failure',
  },
});
