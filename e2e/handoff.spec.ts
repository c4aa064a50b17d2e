import { E2E_PORT } from './support/constants';
import { expect, keepScreenshot, test } from './support/fixtures';
import { currentCollectionId, daysAgo, signInAs, signUpLinkFor } from './support/session';

const ORIGIN = `http://127.0.0.1:${E2E_PORT}`;

test('a grower gives a division away; the recipient follows the mailed link, signs up and gets it with its history', async ({ page }, info) => {
  const stamp = `${info.project.name}-${Date.now()}`;
  const email = `new-keeper-${stamp}@example.test`;
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const api = (path: string, data: unknown) =>
    page.request.post(`/api/collections/${collectionId}${path}`, { headers: { Origin: ORIGIN }, data }).then(async (res) => {
      expect(res.status(), await res.text()).toBeLessThan(300);
      return res.json();
    });

  // A parent with last season's lead (grown before the division), divided a month ago.
  const parent = await api('/plants', { tag: `HX-${stamp}`, genus: 'Enc.', epithet: 'Lantern Moth', isSpecies: false });
  const lastSeason = await api(`/plants/${parent.id}/leads`, { season: 2025, label: '2025-A', firstSeen: daysAgo(330), status: 'mature' });
  for (const [ago, heightMm] of [[320, 10], [280, 40], [240, 90], [200, 120]] as const) {
    await api(`/leads/${lastSeason.id}/measurements`, { date: daysAgo(ago), heightMm });
  }
  const current = await api(`/plants/${parent.id}/leads`, { season: 2026, label: '2026-A', firstSeen: daysAgo(45), status: 'growing' });
  await api(`/leads/${current.id}/measurements`, { date: daysAgo(40), heightMm: 8 });
  const divided = await api(`/plants/${parent.id}/divide`, { dividedOn: daysAgo(30), pieces: [{ tag: `HX-${stamp}-a`, leadIds: [current.id], bulbCount: 3 }] });
  const divisionId = divided.plants[0].id as string;

  await page.goto(`/plants/${divisionId}`);
  const plantScreen = page.getByTestId('plant-screen');
  const section = plantScreen.getByTestId('handoff-section');
  await expect(section).toContainText('Give this division away');
  await section.getByTestId('handoff-open').click();
  await section.getByTestId('handoff-email').fill(email);
  await section.getByTestId('handoff-note').fill('Likes bright shade and a dry rest in winter.');
  await section.getByTestId('handoff-send').click();
  await expect(section.getByTestId('handoff-sent')).toContainText(email);
  await expect(section.getByTestId(`handoff-pending-${email}`)).toBeVisible();
  await keepScreenshot(page, 'handoff-send', info.project.name);

  await page.context().clearCookies();
  await page.goto('/dev/mailbox');
  const mail = page.locator('article', { hasText: email });
  await expect(mail).toContainText('Lantern Moth');
  await mail.getByRole('link').first().click();

  await expect(page).toHaveURL(/\/handoff\/[A-Za-z0-9_-]{43}$/);
  const handoffPath = new URL(page.url()).pathname;
  const screen = page.getByTestId('handoff-screen');
  await expect(screen.getByTestId('handoff-plant')).toHaveText('Enc. Lantern Moth');
  await expect(screen.getByTestId('handoff-contents')).toContainText('1 lead, 4 measurements');
  await expect(screen).toContainText('Likes bright shade');
  await expect(screen.getByTestId('handoff-account-email')).toHaveValue(email);
  await screen.getByTestId('handoff-name').fill('Ottilie Marsh');
  await screen.getByTestId('handoff-password').fill('bulb-and-backbulb-52');
  await keepScreenshot(page, 'handoff-accept', info.project.name);
  await screen.getByTestId('handoff-submit').click();
  // The account is made by the link mailed to the address, which brings the person back here.
  await expect(screen.getByTestId('handoff-check-mail')).toContainText(email);
  await page.goto(await signUpLinkFor(page, email));
  await page.getByTestId('welcome-finish').click();
  await expect(page).toHaveURL(new RegExp(`${handoffPath}$`));

  // Signed up: the new account's own collection is offered.
  await expect(screen.getByRole('radio', { name: 'Ottilie Marsh’s collection' })).toHaveAttribute('aria-checked', 'true');
  await screen.getByTestId('handoff-accept').click();

  const received = page.getByTestId('plant-screen');
  await expect(received.getByTestId('received-from')).toHaveText('Received from Tomas Okafor');
  await expect(received.getByTestId('handoff-section')).toBeVisible();
  await expect(received.getByTestId('lead-link-2026-A')).toBeVisible();
  await keepScreenshot(page, 'handoff-received', info.project.name);

  // Its parent came along as read-only history: last season's lead, and no way to change it.
  await received.getByRole('link', { name: new RegExp(`HX-${stamp}-history`) }).click();
  const history = page.getByTestId('plant-screen').filter({ has: page.getByTestId('history-only-banner') });
  await expect(history.getByTestId('history-only-banner')).toContainText('Read-only history from Tomas Okafor');
  await expect(history.getByTestId('lead-link-2025-A')).toBeVisible();
  await expect(history.getByTestId('lead-link-2026-A')).toHaveCount(0);
  await expect(history.getByTestId('edit-plant')).toHaveCount(0);
  await expect(history.getByTestId('add-lead')).toHaveCount(0);
  // …but its owner may still drop it.
  await expect(history.getByTestId('delete-plant')).toContainText('Delete this history copy');
  await keepScreenshot(page, 'handoff-history', info.project.name);

  // The link worked once.
  await page.goto(handoffPath);
  await expect(page.getByTestId('handoff-refused')).toContainText('already been accepted');

  // The giver's record notes where the division went.
  await page.context().clearCookies();
  await signInAs(page, 'grower');
  await page.goto(`/plants/${divisionId}`);
  await expect(page.getByTestId('plant-screen').getByTestId('given-to')).toContainText(`Given to Ottilie Marsh (${email})`);
  await expect(page.getByTestId('plant-screen').getByTestId('handoff-section')).toHaveCount(0);
});
