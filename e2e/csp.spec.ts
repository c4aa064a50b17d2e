import type { Page } from '@playwright/test';
import { expect, keepScreenshot, test, withRunClock } from './support/fixtures';
import { currentCollectionId, signInAs } from './support/session';

/**
 * The production build runs under the server's strict Content-Security-Policy: every
 * `securitypolicyviolation` event and every console message about the policy fails the test.
 */
declare global {
  interface Window {
    __cspViolations?: string[];
  }
}

async function watchPolicy(page: Page): Promise<string[]> {
  await page.addInitScript(() => {
    window.__cspViolations = [];
    document.addEventListener('securitypolicyviolation', (event) => {
      window.__cspViolations!.push(`${event.violatedDirective} blocked ${event.blockedURI || '(inline)'} at ${event.sourceFile}:${event.lineNumber}`);
    });
  });
  const messages: string[] = [];
  page.on('console', (message) => {
    if (/Content[- ]Security[- ]Policy/i.test(message.text())) messages.push(`${message.type()}: ${message.text()}`);
  });
  return messages;
}

async function violations(page: Page): Promise<string[]> {
  return page.evaluate(() => window.__cspViolations ?? []);
}

test('Today, Plants, a Lead with its chart, and Calendar run under the CSP without a violation', async ({ page }, info) => {
  const messages = await watchPolicy(page);
  const first = await page.goto('/sign-in');
  const policy = first?.headers()['content-security-policy'] ?? '';
  // The page really is served under the strict policy.
  expect(policy).toContain("default-src 'self'");
  const scriptSources = /script-src ([^;]*)/.exec(policy)?.[1].split(' ') ?? [];
  expect(scriptSources).toContain("'self'");
  expect(scriptSources).not.toContain("'unsafe-eval'");
  expect(scriptSources).not.toContain("'unsafe-inline'");

  await signInAs(page, 'owner');
  await expect(page.getByTestId('today-screen')).toBeVisible();
  expect(await violations(page), 'Today').toEqual([]);

  await page.getByTestId('tab-plants').click();
  await expect(page.getByTestId('plant-list')).toBeVisible();
  expect(await violations(page), 'Plants').toEqual([]);

  const collectionId = await currentCollectionId(page);
  const plants = await (await page.request.get(`/api/collections/${collectionId}/plants?q=SH-001`)).json();
  const plant = plants.items[0];
  const lead = plant.currentLeads[0];
  await page.goto(`/plants/${plant.id}/leads/${lead.id}`);
  // The chart compiles CanvasKit's WebAssembly and draws: the one thing 'wasm-unsafe-eval' is for.
  await expect(page.getByTestId('lead-chart-canvas').locator('canvas').first()).toBeVisible({ timeout: 20_000 });
  await page.waitForTimeout(500);
  await keepScreenshot(page, 'csp-lead', info.project.name);
  expect(await violations(page), 'Lead').toEqual([]);

  await page.getByTestId('tab-calendar').click();
  await expect(page.getByTestId('calendar-screen')).toBeVisible();
  await page.waitForTimeout(300);
  expect(await violations(page), 'Calendar').toEqual([]);
  expect(messages).toEqual([]);
});

test('Collection → Sign out everywhere asks first, then ends every session', async ({ page, browser }, info) => {
  const messages = await watchPolicy(page);
  // A second device signed in as the same person.
  const other = await withRunClock(await browser.newContext());
  const otherPage = await other.newPage();
  await signInAs(otherPage, 'viewer');

  await signInAs(page, 'viewer');
  await page.getByTestId('tab-collection').click();
  const screen = page.getByTestId('collection-screen');
  await screen.getByTestId('sign-out-everywhere').click();
  const confirm = screen.getByRole('alertdialog');
  await expect(confirm).toContainText('Sign out on every phone and computer');
  await confirm.scrollIntoViewIfNeeded();
  await keepScreenshot(page, 'sign-out-everywhere', info.project.name);
  await confirm.getByTestId('confirm-no').click();
  await expect(confirm).toBeHidden();
  expect((await (await page.request.get('/api/session')).json()).me).not.toBeNull();

  await screen.getByTestId('sign-out-everywhere').click();
  await screen.getByTestId('confirm-yes').click();
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  expect((await (await page.request.get('/api/session')).json()).me).toBeNull();
  expect((await (await otherPage.request.get('/api/session')).json()).me).toBeNull();
  await other.close();
  expect(await violations(page)).toEqual([]);
  expect(messages).toEqual([]);
});
