import { DEMO_COLLECTION_NAME } from '../db/seed/demo-accounts';
import { E2E_PORT } from './support/constants';
import { expect, keepScreenshot, test } from './support/fixtures';
import { signInAs, signUpLinkFor, signUpThroughMailbox } from './support/session';

const ORIGIN = `http://127.0.0.1:${E2E_PORT}`;

test('an owner invites a partner, who follows the link from the dev mailbox, signs up and joins as grower', async ({ page }, info) => {
  const email = `partner-${info.project.name}-${Date.now()}@example.test`;
  await signInAs(page, 'owner');
  await page.getByTestId('tab-collection').click();
  const screen = page.getByTestId('collection-screen');
  await screen.getByTestId('invite-email').fill(email);
  await screen.getByTestId('invite-role-grower').click();
  await screen.getByTestId('invite-send').click();
  await expect(screen.getByTestId('invite-sent')).toContainText(email);
  await expect(screen.getByTestId(`invitation-${email}`)).toBeVisible();
  await keepScreenshot(page, 'invitations', info.project.name);

  await screen.getByTestId('sign-out').click();
  await expect(page).toHaveURL(/\/sign-in$/);

  await page.goto('/dev/mailbox');
  const mail = page.locator('article', { hasText: email });
  await expect(mail).toContainText(DEMO_COLLECTION_NAME);
  await mail.getByRole('link').first().click();

  await expect(page).toHaveURL(/\/invite\/[A-Za-z0-9_-]{43}$/);
  const invitePath = new URL(page.url()).pathname;
  const invite = page.getByTestId('invite-screen');
  await expect(invite.getByTestId('invite-collection')).toHaveText(DEMO_COLLECTION_NAME);
  await expect(invite.getByTestId('invite-account-email')).toHaveValue(email);
  // Someone with an account who forgot its password has a way out from here.
  await expect(invite.getByTestId('invite-forgot-password')).toHaveCount(0);
  await invite.getByRole('radio', { name: 'I have an account' }).click();
  await expect(invite.getByTestId('invite-forgot-password')).toHaveAttribute('href', '/forgot-password');
  await invite.getByRole('radio', { name: 'I am new here' }).click();
  await invite.getByTestId('invite-name').fill('Anouk Brenner');
  await invite.getByTestId('invite-password').fill('rhizome-and-mount-41');
  await keepScreenshot(page, 'invite', info.project.name);
  await invite.getByTestId('invite-submit').click();
  // The new account is made by the link mailed to its address, which brings the person back here.
  await expect(invite.getByTestId('invite-check-mail')).toContainText(email);
  await page.goto(await signUpLinkFor(page, email));
  await page.getByTestId('welcome-finish').click();
  await expect(page).toHaveURL(new RegExp(`${invitePath}$`));
  await page.getByTestId('invite-screen').getByTestId('invite-accept').click();

  const collection = page.getByTestId('collection-screen');
  await expect(collection).toBeVisible();
  await expect(collection.getByText(`${DEMO_COLLECTION_NAME} · you are grower`)).toBeVisible();
  await expect(collection.getByTestId('invitations')).toHaveCount(0);

  // The link worked once.
  await page.goto(invitePath);
  await expect(page.getByTestId('invite-refused')).toContainText('already been accepted');
});

test('a grower who forgot the password gets a link through the dev mailbox and signs in with the new one', async ({ page }, info) => {
  const email = `forgetful-${info.project.name}-${Date.now()}@example.test`;
  await signUpThroughMailbox(page, ORIGIN, { email, password: 'first-password-long-1', displayName: 'Odile Fenwick' });
  await page.context().clearCookies();

  await page.goto('/sign-in');
  await page.getByTestId('to-forgot-password').click();
  await page.getByTestId('reset-email').fill(email);
  await page.getByTestId('reset-request').click();
  await expect(page.getByTestId('reset-requested')).toContainText(email);

  // The reset mail leaves after the answer (so its timing tells nothing): reload until it is in.
  // (The sign-up link went to the same address first.)
  const mail = page.locator('article', { hasText: email }).filter({ hasText: 'Set a new Sympodia password' });
  await expect(async () => {
    await page.goto('/dev/mailbox');
    await expect(mail).toBeVisible({ timeout: 500 });
  }).toPass({ timeout: 10_000 });
  await mail.getByRole('link').first().click();

  await expect(page).toHaveURL(/\/reset-password\/[A-Za-z0-9_-]{43}$/);
  await page.getByTestId('new-password').fill('second-password-long-2');
  await page.getByTestId('new-password-repeat').fill('second-password-long-2');
  await page.getByTestId('new-password-save').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();

  await page.getByTestId('tab-collection').click();
  await page.getByTestId('sign-out').click();
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill('second-password-long-2');
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();
});
