import type { Page } from '@playwright/test';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../db/seed/demo-accounts';
import { signInAs } from './support/session';
import { expect, test } from './support/fixtures';
import { fakeWeather, resetFakeWeather } from './support/weather';

// What the page does for a slow phone before the first screen draws: the server draws the
// screen from the session and the screen's first answers, the page carries both, and the
// scripts (precompressed) take the drawn page over instead of asking again.

/** Every request the page makes from now on, by URL. */
function watchRequests(page: Page) {
  const urls: string[] = [];
  const unused: string[] = [];
  page.on('request', (request) => urls.push(request.url()));
  // Chromium says so on the console when a preload is not used within a few seconds of load.
  page.on('console', (message) => {
    if (/preloaded using link preload but not used/i.test(message.text())) unused.push(message.text());
  });
  return {
    urls,
    unused,
    /** The API paths asked for (without /api). */
    api: () => urls.map((url) => new URL(url).pathname).filter((p) => p.startsWith('/api/')).map((p) => p.slice('/api'.length)),
    preloads: (as: string) =>
      page.locator(`link[rel="preload"][as="${as}"]`).evaluateAll((links) => links.map((l) => (l as HTMLLinkElement).href)),
    /** Preloaded URLs not asked for exactly once. */
    async unmatchedPreloads() {
      const hrefs = await page.locator('link[rel="preload"]').evaluateAll((links) => links.map((l) => (l as HTMLLinkElement).href));
      return hrefs.filter((href) => urls.filter((url) => url === href).length !== 1);
    },
  };
}

test.afterEach(async ({ page }) => {
  await resetFakeWeather(page);
});

test('Today comes drawn by the server: readable before any script runs', async ({ browser, baseURL }) => {
  const context = await browser.newContext({ javaScriptEnabled: false, baseURL });
  const page = await context.newPage();
  const grower = DEMO_ACCOUNTS.find((a) => a.role === 'grower')!;
  const signIn = await page.request.post('/api/auth/sign-in', {
    data: { email: grower.email, password: DEMO_PASSWORD },
    headers: { Origin: new URL(baseURL!).origin },
  });
  expect(signIn.ok()).toBe(true);
  await page.goto('/');
  await expect(page.getByTestId('attention-list')).toBeVisible();
  await expect(page.getByTestId('attention-aborted')).toContainText('Stalled or aborted');
  await expect(page).toHaveTitle('Sympodia');
  await context.close();
});

test("the server draws the layout this browser last had: the side rail on a wide screen, the tab bar on a phone", async ({ page, browser, baseURL }, info) => {
  await signInAs(page, 'grower');
  await expect(page.getByTestId('attention-list')).toBeVisible();
  // The same browser's cookies, with scripts off: what arrives is the server's drawing alone.
  const viewport = page.viewportSize()!;
  const context = await browser.newContext({ javaScriptEnabled: false, baseURL, viewport });
  await context.addCookies(await page.context().cookies());
  const drawn = await context.newPage();
  await drawn.goto('/');
  const tab = await drawn.getByTestId('tab-plants').boundingBox();
  expect(tab).not.toBeNull();
  if (info.project.name === 'phone') {
    expect(tab!.y).toBeGreaterThan(viewport.height - 100);
  } else {
    expect(tab!.x).toBeLessThan(260);
    expect(tab!.y).toBeLessThan(viewport.height / 2);
  }
  await context.close();
});

test('a signed-in reload of Today asks for nothing the page carries, and its scripts come Brotli-compressed', async ({ page }) => {
  // Tonight is cold enough to bring in more plants than the card lists at first (whatever the date).
  await fakeWeather(page, { nightLows: [5, 20, 20, 20] });
  await signInAs(page, 'grower');
  const requests = watchRequests(page);
  const scripts: Array<{ url: string; encoding: string | undefined }> = [];
  page.on('response', async (response) => {
    if (response.request().resourceType() === 'script') scripts.push({ url: response.url(), encoding: (await response.allHeaders())['content-encoding'] });
  });
  await page.reload();
  await expect(page.getByTestId('attention-list')).toBeVisible();
  await page.waitForLoadState('networkidle');
  // The scripts took the drawn page over: its buttons work.
  await page.getByTestId('cold-night-tonight-more').click();
  await expect(page.getByTestId('cold-night-tonight-more')).toHaveText('Show fewer');
  expect(scripts.length).toBeGreaterThanOrEqual(3);
  // Files under 1 KiB are sent as they are; every other script as its Brotli copy.
  for (const script of scripts) expect([undefined, 'br'], script.url).toContain(script.encoding);
  const bundles = scripts.filter((s) => /\/(entry|__common)-[0-9a-f]+\.js$/.test(s.url));
  expect(bundles).toHaveLength(2);
  for (const bundle of bundles) expect(bundle.encoding, bundle.url).toBe('br');
  // Neither who is signed in nor Today's attention list and cold nights were asked again.
  expect(requests.api().filter((p) => p === '/session' || p.endsWith('/attention') || p.endsWith('/cold-nights'))).toEqual([]);
  // The three faces of Source Sans 3, each fetched once: the preload is the font the page uses.
  expect(await requests.preloads('font')).toHaveLength(3);
  expect(await requests.unmatchedPreloads()).toEqual([]);
  await page.waitForTimeout(4000);
  expect(requests.unused).toEqual([]);
});

test('a signed-out visit to Today goes straight to sign-in', async ({ page }) => {
  const sessionRequests: string[] = [];
  page.on('request', (request) => {
    if (new URL(request.url()).pathname === '/api/session') sessionRequests.push(request.url());
  });
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in$/);
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  expect(sessionRequests).toEqual([]);
});

test('a lead page fetches each chunk once and asks for none of the records the page carries', async ({ page }) => {
  await signInAs(page, 'grower');
  await page.locator('[data-testid^="attention-item-"]').first().click();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  const requests = watchRequests(page);
  await page.reload();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  await page.waitForLoadState('networkidle');
  const chunks = requests.urls.filter((url) => url.includes('/[leadId]-') || url.includes('/%5BleadId%5D-'));
  expect(chunks).toHaveLength(1);
  expect(requests.urls.filter((url) => url.includes('%5B'))).toEqual([]);
  const leadId = new URL(page.url()).pathname.split('/').at(-1)!;
  // The collection, the lead and its forecast came with the page.
  expect(requests.api().filter((p) => /^\/collections\/[^/]+$/.test(p) || p.endsWith(`/leads/${leadId}`) || p.endsWith(`/leads/${leadId}/forecast`))).toEqual([]);
  expect(await requests.unmatchedPreloads()).toEqual([]);
  // The chart still draws once the page is the browser's own.
  await expect(page.getByTestId('lead-chart').locator('canvas')).toBeVisible();
});
