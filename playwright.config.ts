import { defineConfig } from '@playwright/test';
import { E2E_PORT } from './e2e/support/constants';

/**
 * What the browser sees of this process's environment. A multi-date run (scripts/dates/run.sh)
 * moves the clock of every process through libfaketime, which Chromium does not survive (its
 * zygote dies): the browser gets Playwright's clock instead (e2e/support/fixtures.ts).
 */
const browserEnv = Object.fromEntries(
  Object.entries(process.env).filter(([name]) => name !== 'LD_PRELOAD' && !name.startsWith('FAKETIME')),
) as Record<string, string>;

/** Debian's Chromium; Playwright never downloads a browser of its own here. */
const chromium = {
  executablePath: '/usr/bin/chromium',
  env: browserEnv,
  args: [
    '--no-sandbox',
    '--disable-gpu',
    '--disable-background-networking',
    '--disable-component-update',
    '--disable-sync',
    '--no-first-run',
    '--disable-quic',
  ],
};

export default defineConfig({
  testDir: 'e2e',
  outputDir: 'test-results',
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  reporter: [['list']],
  use: {
    baseURL: `http://127.0.0.1:${E2E_PORT}`,
    launchOptions: chromium,
    trace: 'off',
    screenshot: 'only-on-failure',
    // The browser runs in the server's time zone (a multi-date run sets TZ for both).
    ...(process.env.TZ ? { timezoneId: process.env.TZ } : {}),
  },
  projects: [
    { name: 'phone', use: { viewport: { width: 390, height: 844 }, isMobile: false, hasTouch: true } },
    { name: 'desktop', use: { viewport: { width: 1280, height: 800 } } },
  ],
  webServer: {
    command: 'tsx e2e/support/serve.ts',
    url: `http://127.0.0.1:${E2E_PORT}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    stdout: 'ignore',
    stderr: 'pipe',
  },
});
