import type { Page } from '@playwright/test';
import { signInAs } from './support/session';
import { expect, test } from './support/fixtures';

// What the page does for a slow phone before the first screen draws: scripts come
// precompressed, the route's chunks are named up front, and the session rides in the page.

/** Every request the page makes from now on, by URL, and the hrefs it preloads as `as`. */
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
    preloads: (as: string) =>
      page.locator(`link[rel="preload"][as="${as}"]`).evaluateAll((links) => links.map((l) => (l as HTMLLinkElement).href)),
    /** Preloaded URLs not asked for exactly once: a preload the page's own request did not match (or never made). */
    async unmatchedPreloads() {
      const hrefs = await page.locator('link[rel="preload"]').evaluateAll((links) => links.map((l) => (l as HTMLLinkElement).href));
      return hrefs.filter((href) => urls.filter((url) => url === href).length !== 1);
    },
  };
}

test('a signed-in reload draws Today without asking who is signed in, from Brotli-compressed scripts', async ({ page }) => {
  await signInAs(page, 'grower');
  const requests = watchRequests(page);
  const sessionRequests: string[] = [];
  const scripts: Array<{ url: string; encoding: string | undefined }> = [];
  page.on('request', (request) => {
    if (new URL(request.url()).pathname === '/api/session') sessionRequests.push(request.url());
  });
  page.on('response', async (response) => {
    if (response.request().resourceType() === 'script') scripts.push({ url: response.url(), encoding: (await response.allHeaders())['content-encoding'] });
  });
  await page.reload();
  await expect(page.getByTestId('attention-list')).toBeVisible();
  expect(sessionRequests).toEqual([]);
  // The page named Today's screen chunk before any script ran.
  const preloads = await page.locator('link[rel="preload"][as="script"]').evaluateAll((links) => links.map((l) => (l as HTMLLinkElement).href));
  expect(preloads.length).toBeGreaterThanOrEqual(3);
  expect(scripts.length).toBeGreaterThanOrEqual(3);
  // Files under 1 KiB are sent as they are; every other script as its Brotli copy.
  for (const script of scripts) expect([undefined, 'br'], script.url).toContain(script.encoding);
  const bundles = scripts.filter((s) => /\/(entry|__common)-[0-9a-f]+\.js$/.test(s.url));
  expect(bundles).toHaveLength(2);
  for (const bundle of bundles) expect(bundle.encoding, bundle.url).toBe('br');
  for (const href of preloads) expect(scripts.map((s) => s.url)).toContain(href);
  // Today's first API requests left with the page, and the screen took their answers.
  await page.waitForLoadState('networkidle');
  const fetches = await requests.preloads('fetch');
  expect(fetches.map((href) => new URL(href).pathname.split('/').at(-1))).toEqual(['attention', 'cold-nights']);
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

test('a lead page fetches each chunk and record once: the preloads are the requests the page makes', async ({ page }) => {
  await signInAs(page, 'grower');
  await page.locator('[data-testid^="attention-item-"]').first().click();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  const requests = watchRequests(page);
  await page.reload();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  await page.waitForLoadState('networkidle');
  expect(requests.urls.some((url) => url.includes('/[leadId]-') || url.includes('/%5BleadId%5D-'))).toBe(true);
  expect(requests.urls.filter((url) => url.includes('%5B'))).toEqual([]);
  expect(await requests.preloads('fetch')).toHaveLength(3);
  expect(await requests.unmatchedPreloads()).toEqual([]);
});
