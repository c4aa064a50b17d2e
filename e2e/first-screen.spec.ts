import { signInAs } from './support/session';
import { expect, test } from './support/fixtures';

// What the page does for a slow phone before the first screen draws: scripts come
// precompressed, the route's chunks are named up front, and the session rides in the page.

test('a signed-in reload draws Today without asking who is signed in, from Brotli-compressed scripts', async ({ page }) => {
  await signInAs(page, 'grower');
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

test('a lead page fetches each of its chunks once: the preloads are the requests the router makes', async ({ page }) => {
  await signInAs(page, 'grower');
  await page.locator('[data-testid^="attention-item-"]').first().click();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  const requested: string[] = [];
  page.on('request', (request) => {
    if (request.resourceType() === 'script') requested.push(request.url());
  });
  await page.reload();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  await page.waitForLoadState('networkidle');
  expect(requested.some((url) => url.includes('/[leadId]-') || url.includes('/%5BleadId%5D-'))).toBe(true);
  expect(requested.filter((url, i) => requested.indexOf(url) !== i)).toEqual([]);
  expect(requested.filter((url) => url.includes('%5B'))).toEqual([]);
});
