import type { Page } from '@playwright/test';
import { expect } from '@playwright/test';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../db/seed/demo-accounts';

export type DemoRole = 'owner' | 'grower' | 'viewer';

/** Signs in as one of the demo accounts through the sign-in page and waits for Today. */
export async function signInAs(page: Page, role: DemoRole): Promise<void> {
  const account = DEMO_ACCOUNTS.find((a) => a.role === role)!;
  await page.goto('/sign-in');
  await page.getByTestId('sign-in-email').fill(account.email);
  await page.getByTestId('sign-in-password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('today-screen')).toBeVisible();
}

/** The id of the signed-in person's first collection, read from the API with the page's cookie. */
export async function currentCollectionId(page: Page): Promise<string> {
  const res = await page.request.get('/api/session');
  const body = await res.json();
  return body.me.collections[0].id as string;
}

/** A calendar date `days` before today, as YYYY-MM-DD in the browser's local time. */
export function daysAgo(days: number, from = new Date()): string {
  const d = new Date(from.getFullYear(), from.getMonth(), from.getDate() - days);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
}

/** The newest mail to `email` in the dev mailbox whose subject matches, once it has arrived (SMTP is asynchronous). */
export async function mailFor(page: Page, email: string, subject: RegExp): Promise<{ subject: string; text: string }> {
  let found: { subject: string; text: string } | undefined;
  await expect(async () => {
    const { messages } = (await (await page.request.get('/dev/mailbox.json')).json()) as { messages: { to: string[]; subject: string; text: string }[] };
    found = messages.find((m) => m.to.includes(email) && subject.test(m.subject));
    expect(found, `a mail "${subject}" to ${email}`).toBeDefined();
  }).toPass({ timeout: 10_000 });
  return found!;
}

/** The sign-up link's path in the mail a new account's address was sent: `/welcome/<token>`. */
export async function signUpLinkFor(page: Page, email: string): Promise<string> {
  const mail = await mailFor(page, email, /^Finish creating your Sympodia account$/);
  return /\/welcome\/[A-Za-z0-9_-]{43}/.exec(mail.text)![0];
}

/**
 * Makes an account as a person does, through the API with the page's cookies: the sign-up, the
 * link from the dev mailbox, the confirmation. The page is then signed in as it; resolves with
 * the confirmation's answer (the account and its collections).
 */
export async function signUpThroughMailbox(page: Page, origin: string, input: { email: string; password: string; displayName: string }) {
  const requested = await page.request.post('/api/auth/sign-up', { headers: { Origin: origin }, data: input });
  expect(requested.status(), await requested.text()).toBe(202);
  const token = (await signUpLinkFor(page, input.email)).split('/').pop();
  const confirmed = await page.request.post('/api/auth/sign-up/confirm', { headers: { Origin: origin }, data: { token } });
  expect(confirmed.status(), await confirmed.text()).toBe(201);
  return (await confirmed.json()) as { user: { id: string; email: string }; collections: { id: string; name: string }[] };
}
