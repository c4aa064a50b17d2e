import type { Page } from '@playwright/test';
import { plantWithHistory, pastSeason } from './support/history';
import { currentCollectionId, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';

// What the forecast says on a phone for a lead that is late, one whose sheath looked empty, and
// a genus that does not flower from a sheath — each written through the API relative to today.
test.use({ viewport: { width: 390, height: 844 } });

const unique = (name: string, project: string) => `${name}-${project.slice(0, 1)}${Date.now() % 10000}`;
const WHEN_WORDS = /about \d{1,2} [A-Z][a-z]{2} \d{4}|sometime from/;

test('a late lead says it is late on its page, on Today and on the Calendar, with no past date as a forecast', async ({ page }, info) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const tag = unique('LATE', info.project.name);
  // Two earlier seasons opened 180 days after first seen; this lead, first seen 186 days ago with
  // its sheath at day 150, would have opened about 6 days ago and has not.
  const { plantId, leadIds } = await plantWithHistory(page, collectionId, { tag, genus: 'C.', epithet: 'Slow Harbour' }, [
    pastSeason('A1', 186 + 730),
    pastSeason('A2', 186 + 365),
    { label: 'A3', firstSeenDaysAgo: 186, status: 'mature', looks: [[0, 4], [30, 25], [60, 70], [90, 120], [120, 150], [150, 160, 'forming'], [184, 161, 'forming']] },
  ]);
  const forecast = await (await page.request.get(`/api/collections/${collectionId}/leads/${leadIds.A3}/forecast`)).json();
  expect(forecast.bloom.timing).toBe('late');
  const today = forecast.today as string;
  if (forecast.bloom.firstOpen) expect(forecast.bloom.firstOpen.p10 >= today).toBe(true);

  await page.goto(`/plants/${plantId}/leads/${leadIds.A3}`);
  await expect(page.getByTestId('lead-story-chip')).toHaveText('Late to flower');
  await expect(page.getByTestId('bloom-summary')).toContainText(/^(●|○)+ Late: its record made \d{1,2} [A-Z][a-z]{2} \d{4} likely, \d+ days? ago\. If it still flowers, /);
  await expect(page.getByTestId('bloom-summary')).toContainText('falling each day it stays closed');
  await keepScreenshot(page, 'lead-late', info.project.name);

  // Today lists it among the windows opening (its window starts within two weeks), in the same words.
  const attention = await (await page.request.get(`/api/collections/${collectionId}/attention`)).json();
  const item = attention.items.find((i: { kind: string; target: { leadId: string } }) => i.kind === 'bloom' && i.target.leadId === leadIds.A3);
  expect(item?.reason).toBe(forecast.story.bloom);
  await page.getByTestId('tab-today').click();
  const row = page.getByTestId('attention-bloom').getByTestId(`attention-item-${tag}-A3`);
  await expect(row).toContainText(`${tag} · lead A3 · Late to flower`);
  await expect(row).toContainText(forecast.story.bloom);

  // The Calendar says the same story.
  await page.getByTestId('tab-calendar').click();
  const calendarRow = page.getByTestId(`calendar-row-${tag}-A3`);
  await expect(calendarRow).toContainText('Late to flower');
  await expect(calendarRow.getByTestId('calendar-row-story')).toHaveText(forecast.story.bloom);
  await keepScreenshot(page, 'calendar-late', info.project.name);
});

test('an empty sheath moves the window later, lowers the chance and says why', async ({ page }, info) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const tag = unique('EMPTY', info.project.name);
  const history = [pastSeason('B1', 160 + 730), pastSeason('B2', 160 + 365)];
  const grown: Array<[number, number, ('forming' | 'empty')?]> = [[0, 4], [30, 25], [60, 70], [90, 120], [120, 150], [150, 160, 'forming']];
  const { plantId, leadIds } = await plantWithHistory(page, collectionId, { tag, genus: 'C.', epithet: 'Hollow Bay' }, [...history, { label: 'B3', firstSeenDaysAgo: 160, status: 'mature', looks: grown }]);
  const before = await (await page.request.get(`/api/collections/${collectionId}/leads/${leadIds.B3}/forecast`)).json();
  expect(before.bloom.stage).toBe('sheath_forming');

  await page.goto(`/plants/${plantId}/leads/${leadIds.B3}`);
  await expect(page.getByTestId('lead-story-chip')).toHaveText('Sheath forming');
  // Today's look was at day 150, ten days ago: marking the sheath empty today asks for the height.
  await page.getByTestId('mark-sheath-empty').click();
  await page.getByTestId('mark-height-value').fill('160');
  await page.getByTestId('mark-height-save').click();
  await expect(page.getByTestId('lead-story-chip')).toHaveText('Sheath empty');
  const after = await (await page.request.get(`/api/collections/${collectionId}/leads/${leadIds.B3}/forecast`)).json();
  expect(after.bloom.stage).toBe('sheath_empty');
  expect(after.bloom.firstOpen.p50 > before.bloom.firstOpen.p50).toBe(true);
  expect(after.bloom.chance).toBeLessThan(before.bloom.chance);
  await expect(page.getByTestId('bloom-summary')).toContainText(WHEN_WORDS);
  await expect(page.getByTestId('bloom-summary')).toContainText('it may still bud later, or wait for next season');
  await keepScreenshot(page, 'lead-empty-sheath', info.project.name);
  await sameStoryOnTodayAndCalendar(page, collectionId, tag, 'B3', leadIds.B3);
});

/** Today (when the engine lists the lead) and the Calendar say the lead's one story. */
async function sameStoryOnTodayAndCalendar(page: Page, collectionId: string, tag: string, label: string, leadId: string) {
  const forecast = await (await page.request.get(`/api/collections/${collectionId}/leads/${leadId}/forecast`)).json();
  const attention = await (await page.request.get(`/api/collections/${collectionId}/attention`)).json();
  const listed = attention.items.filter((i: { target: { leadId: string } }) => i.target.leadId === leadId);
  await page.getByTestId('tab-today').click();
  await expect(page.getByTestId('attention-list')).toBeVisible();
  for (const item of listed) await expect(page.getByTestId(`attention-${item.kind === 'stalled' ? 'aborted' : item.kind}`).getByTestId(`attention-item-${tag}-${label}`)).toContainText(forecast.story.chip.label);
  await page.getByTestId('tab-calendar').click();
  const row = page.getByTestId(`calendar-row-${tag}-${label}`);
  if (forecast.bloom.firstOpen) {
    await expect(row.getByTestId('calendar-row-story')).toHaveText(forecast.story.bloom);
    await expect(row).toContainText(forecast.story.chip.label);
  } else await expect(row).toHaveCount(0);
}

test('a Stanhopea is offered no sheath marks and no sheath field, but can be marked in bud', async ({ page }, info) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const tag = unique('STAN', info.project.name);
  const { plantId, leadIds } = await plantWithHistory(page, collectionId, { tag, genus: 'Stan.', epithet: 'Hanging Lantern' }, [
    { label: 'S1', firstSeenDaysAgo: 120, status: 'mature', looks: [[0, 3], [30, 15], [60, 40], [90, 55], [110, 56]] },
  ]);
  await page.goto(`/plants/${plantId}/leads/${leadIds.S1}`);
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  await expect(page.locator('[data-testid^="mark-sheath-"]')).toHaveCount(0);
  await expect(page.locator('[data-testid^="measure-sheath-"]')).toHaveCount(0);
  await expect(page.getByTestId('lead-story-chip')).toHaveText('Bulb mature');
  await keepScreenshot(page, 'lead-stanhopea', info.project.name);
  await page.getByTestId('mark-buds-visible').click();
  await expect(page.getByTestId('lead-story-chip')).toHaveText('Buds or spike visible');
  await expect(page.getByTestId('bloom-summary')).toContainText(/First flower about \d{1,2} [A-Z][a-z]{2} \d{4}/);
  await sameStoryOnTodayAndCalendar(page, collectionId, tag, 'S1', leadIds.S1);
});

test('an entry that looks wrong asks first; a second look on one day is refused with the reason', async ({ page }) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const tag = unique('SLIP', 'x');
  const { plantId, leadIds } = await plantWithHistory(page, collectionId, { tag, genus: 'C.', epithet: 'Steady Hand' }, [
    { label: 'C1', firstSeenDaysAgo: 200, status: 'mature', looks: [[0, 4], [60, 90], [120, 180], [150, 184, 'forming']] },
  ]);
  await page.goto(`/plants/${plantId}/leads/${leadIds.C1}`);
  await page.getByTestId('measure-height').fill('100');
  await page.getByTestId('measure-save').click();
  await expect(page.getByTestId('measure-doubt')).toContainText('Is this right?');
  await expect(page.getByTestId('measure-doubt')).toContainText("100 mm is 84 mm below this lead's tallest, 184 mm");
  await page.getByTestId('measure-doubt-change').click();
  await page.getByTestId('measure-height').fill('185');
  await page.getByTestId('measure-save').click();
  await expect(page.getByTestId('measurement-table')).toContainText('185 mm');
  // The same day again: refused, with what to do instead.
  await page.getByTestId('measure-height').fill('186');
  await page.getByTestId('measure-save').click();
  await expect(page.getByRole('alert').filter({ hasText: 'already has a measurement on' })).toContainText('edit that one instead');
});
