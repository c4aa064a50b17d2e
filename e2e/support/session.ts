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
