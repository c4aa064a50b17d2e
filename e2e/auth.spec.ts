import { DEMO_ACCOUNTS, DEMO_COLLECTION_NAME, DEMO_PASSWORD } from '../db/seed/demo-accounts';
import { expect, keepScreenshot, test } from './support/fixtures';
import { signUpLinkFor } from './support/session';

const owner = DEMO_ACCOUNTS.find((a) => a.role === 'owner')!;
const viewer = DEMO_ACCOUNTS.find((a) => a.role === 'viewer')!;

async function signIn(page: import('@playwright/test').Page, email: string) {
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in$/);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();
}

/** The font actually used to draw a heading, as the browser resolved it. */
async function renderedFontOf(page: import('@playwright/test').Page, text: string): Promise<string> {
  return page.getByText(text, { exact: true }).first().evaluate((el) => getComputedStyle(el).fontFamily);
}

test('a new grower signs up, lands on Today, signs out and back in', async ({ page }, info) => {
  const email = `new-${info.project.name}-${Date.now()}@example.test`;
  await page.goto('/sign-up');
  await keepScreenshot(page, 'sign-up', info.project.name);

  // Mistakes are explained beside the fields and nothing is sent.
  await page.getByTestId('sign-up-submit').click();
  await expect(page.getByText('Enter your name')).toBeVisible();
  await page.getByTestId('sign-up-name').fill('Ines Marlowe');
  await page.getByTestId('sign-up-email').fill(email);
  await page.getByTestId('sign-up-password').fill('short');
  await page.getByTestId('sign-up-submit').click();
  await expect(page.getByText('Use at least 10 characters')).toBeVisible();

  // The server's own rule (common passwords) comes back under the field too.
  await page.getByTestId('sign-up-password').fill('1234567890');
  await page.getByTestId('sign-up-submit').click();
  await expect(page.getByText(/commonly used passwords/)).toBeVisible();

  await page.getByTestId('sign-up-password').fill('terracotta-and-bark-9');
  await page.getByTestId('sign-up-submit').click();
  // The account is made by the link mailed to the address (the answer is the same for a taken one).
  await expect(page.getByTestId('sign-up-check-mail')).toContainText(email);
  await keepScreenshot(page, 'sign-up-check-mail', info.project.name);
  await page.goto(await signUpLinkFor(page, email));
  await keepScreenshot(page, 'welcome', info.project.name);
  await page.getByTestId('welcome-finish').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();
  await expect(page.getByText('Ines Marlowe’s collection').first()).toBeVisible();
  await expect(page.getByText('Nothing needs a look today')).toBeVisible();

  await page.getByTestId('tab-collection').click();
  await page.getByTestId('sign-out').click();
  await expect(page).toHaveURL(/\/sign-in$/);

  // Signed out, the app's pages send you to sign in.
  await page.goto('/plants');
  await expect(page).toHaveURL(/\/sign-in$/);

  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill('terracotta-and-bark-9');
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();
});

test('a wrong password is refused with a message', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByTestId('sign-in-email').fill(owner.email);
  await page.getByTestId('sign-in-password').fill('not-the-password');
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('form-error')).toContainText('do not match');
});

test('the demo owner signs in, sees Today and every tab, in Source Sans 3', async ({ page }, info) => {
  await page.goto('/sign-in');
  await keepScreenshot(page, 'sign-in', info.project.name);
  await signIn(page, owner.email);
  await expect(page.getByText(DEMO_COLLECTION_NAME).first()).toBeVisible();
  await keepScreenshot(page, 'today', info.project.name);
  expect(await renderedFontOf(page, 'Today')).toContain('SourceSans3');
  // The font file really loaded (not a fallback).
  expect(await page.evaluate(() => document.fonts.check('16px SourceSans3_400Regular'))).toBe(true);

  for (const [tab, screen, content] of [
    ['plants', 'plants-screen', 'plant-list'],
    ['rounds', 'rounds-screen', 'rounds-stop'],
    ['calendar', 'calendar-screen', null],
  ] as const) {
    await page.getByTestId(`tab-${tab}`).click();
    await expect(page.getByTestId(screen)).toBeVisible();
    if (content) await expect(page.getByTestId(screen).getByTestId(content)).toBeVisible();
    await keepScreenshot(page, tab, info.project.name);
  }

  await page.getByTestId('tab-collection').click();
  await expect(page.getByTestId('member-list')).toContainText('grower@demo.test');
  await expect(page.getByTestId('member-list')).toContainText('viewer@demo.test');
  await keepScreenshot(page, 'collection', info.project.name);
});

test('the tabs sit at the bottom on a phone and in a side rail on a wide screen', async ({ page }, info) => {
  await signIn(page, owner.email);
  const tab = await page.getByTestId('tab-plants').boundingBox();
  const viewport = page.viewportSize()!;
  expect(tab).not.toBeNull();
  // A long screen scrolls inside itself: the page never grows past the window.
  for (const name of ['today', 'collection']) {
    await page.getByTestId(`tab-${name}`).click();
    await expect(page.getByTestId(`${name}-screen`)).toBeVisible();
    expect(await page.evaluate(() => document.scrollingElement!.scrollHeight)).toBeLessThanOrEqual(viewport.height);
  }
  if (info.project.name === 'phone') {
    expect(tab!.y).toBeGreaterThan(viewport.height - 100);
  } else {
    expect(tab!.x).toBeLessThan(260);
    expect(tab!.y).toBeLessThan(viewport.height / 2);
  }
});

test('a viewer sees the settings but cannot change them', async ({ page }) => {
  await signIn(page, viewer.email);
  await page.getByTestId('tab-collection').click();
  await expect(page.getByText('Only an owner can change these settings.')).toBeVisible();
  await expect(page.getByTestId('collection-save')).toHaveCount(0);
});
