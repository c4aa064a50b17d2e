import fs from 'node:fs';
import path from 'node:path';
import { test as base, expect, type BrowserContext, type Page } from '@playwright/test';

const ARTIFACTS = path.join(__dirname, '..', 'artifacts');

/**
 * Every page fails its test on a console error, an uncaught exception, or a request
 * that leaves this machine (fonts and assets must ship with the app). The one console
 * error allowed is Chromium's note about an API refusal below 500 (a wrong password is
 * answered 401 by design); a 5xx or a failed asset still fails the test.
 */
export const test = base.extend<{ page: Page }>({
  // A multi-date run (npm run test:dates) moves the clock of this runner, the server and
  // PostgreSQL (libfaketime); the browser's clock starts at the same moment, so the page, the
  // server and the test agree on today. Time then passes as usual. A plain run changes nothing.
  context: async ({ context }, use) => {
    await withRunClock(context);
    await use(context);
  },
  page: async ({ page }, use) => {
    const problems: string[] = [];
    page.on('console', (message) => {
      if (message.type() !== 'error') return;
      const refusal = /^Failed to load resource: the server responded with a status of (4\d\d)/.exec(message.text());
      if (refusal && new URL(message.location().url).pathname.startsWith('/api/')) return;
      problems.push(`console error: ${message.text()} (${message.location().url})`);
    });
    page.on('pageerror', (error) => problems.push(`page error: ${error.message}`));
    page.on('request', (request) => {
      const { hostname, protocol } = new URL(request.url());
      if ((protocol === 'http:' || protocol === 'https:') && hostname !== '127.0.0.1') {
        problems.push(`request left the machine: ${request.url()}`);
      }
    });
    // An app page arrives drawn by the server; its scripts take it over a moment later (the
    // root layout then marks <html data-ready>). A person waits for a page to respond; so do the
    // tests, after every load they ask for.
    const goto = page.goto.bind(page);
    const reload = page.reload.bind(page);
    // Pages that are not the app's (the dev mailbox) have no #root and nothing to wait for.
    const ready = () => page.waitForFunction(() => !document.getElementById('root') || document.documentElement.dataset.ready === 'true');
    page.goto = async (...args) => {
      const response = await goto(...args);
      await ready();
      return response;
    };
    page.reload = async (...args) => {
      const response = await reload(...args);
      await ready();
      return response;
    };
    await use(page);
    expect(problems, problems.join('\n')).toEqual([]);
  },
});

/**
 * Starts a browser context's clock at the runner's own time in a multi-date run (a context a test
 * makes itself needs this; the `context` fixture does it already). A plain run changes nothing.
 */
export async function withRunClock(context: BrowserContext): Promise<BrowserContext> {
  if (process.env.FAKETIME) await context.clock.install({ time: Date.now() });
  return context;
}

/** Saves a screenshot of the viewport as an artifact named after the screen and width. */
export async function keepScreenshot(page: Page, name: string, project: string): Promise<void> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  await page.screenshot({ path: path.join(ARTIFACTS, `${project}-${name}.png`) });
}

export { expect };
