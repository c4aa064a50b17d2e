import AxeBuilder from '@axe-core/playwright';
import sharp from 'sharp';
import { currentCollectionId, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';

async function seriousViolations(page: import('@playwright/test').Page) {
  const results = await new AxeBuilder({ page }).analyze();
  return results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help} (${v.nodes.length})`);
}

test('Today lists what the engine says needs a look, each linking to its lead', async ({ page }, info) => {
  await signInAs(page, 'owner');
  const collectionId = await currentCollectionId(page);
  const api = await (await page.request.get(`/api/collections/${collectionId}/attention`)).json();
  await expect(page.getByTestId('attention-list')).toBeVisible();
  const shown = page.locator('[data-testid^="attention-item-"]');
  await expect(shown).toHaveCount(api.items.length);
  await keepScreenshot(page, 'today-attention', info.project.name);
  expect(await seriousViolations(page)).toEqual([]);

  const first = api.items[0];
  await page.getByTestId(`attention-item-${first.plantTag}-${first.leadLabel}`).first().click();
  await expect(page).toHaveURL(new RegExp(`/plants/${first.target.plantId}/leads/${first.target.leadId}$`));
  await expect(page.getByTestId('lead-screen')).toBeVisible();
});

test('a lead chart draws, and its summary states the engine’s figures', async ({ page }, info) => {
  await signInAs(page, 'owner');
  const collectionId = await currentCollectionId(page);
  const plants = await (await page.request.get(`/api/collections/${collectionId}/plants?q=SH-001`)).json();
  const plant = plants.items[0];
  const lead = plant.currentLeads[0];
  const forecast = await (await page.request.get(`/api/collections/${collectionId}/leads/${lead.id}/forecast`)).json();

  await page.goto(`/plants/${plant.id}/leads/${lead.id}`);
  const canvas = page.getByTestId('lead-chart-canvas').locator('canvas').first();
  await expect(canvas).toBeVisible({ timeout: 20_000 });
  await page.waitForTimeout(500);

  // The chart drew: count pixels that are clearly not the white card behind it.
  const { data, info: image } = await sharp(await canvas.screenshot()).raw().toBuffer({ resolveWithObject: true });
  let drawn = 0;
  for (let i = 0; i < data.length; i += image.channels) if (data[i] + data[i + 1] + data[i + 2] < 600) drawn += 1;
  expect(drawn / (image.width * image.height)).toBeGreaterThan(0.01);

  // The page says what the engine's one story says, word for word.
  const story = forecast.story;
  await expect(page.getByTestId('chart-summary')).toHaveText([story.size, story.growth].filter(Boolean).join(' '));
  await expect(page.getByTestId('bloom-summary')).toContainText(story.bloom);
  await expect(page.getByTestId('trust-summary')).toHaveText(forecast.trustSentence);
  await expect(page.getByTestId('lead-story-chip')).toHaveText(story.chip.label);
  await keepScreenshot(page, 'lead-chart', info.project.name);
  expect(await seriousViolations(page)).toEqual([]);

  // The text alternative carries the same numbers.
  await page.getByTestId('chart-toggle').click();
  await expect(page.getByTestId('chart-table').getByRole('row')).toHaveCount(1 + forecast.fit.n);
});

test('Plants, Rounds and Collection pass axe with no serious or critical violations', async ({ page }) => {
  await signInAs(page, 'owner');
  for (const [tab, screen] of [
    ['plants', 'plant-list'],
    ['rounds', 'rounds-stop'],
    ['collection', 'member-list'],
  ] as const) {
    await page.getByTestId(`tab-${tab}`).click();
    await expect(page.getByTestId(screen)).toBeVisible();
    expect(await seriousViolations(page), tab).toEqual([]);
  }
});

test('a screen still loading passes axe: its spinner is named', async ({ page }) => {
  await signInAs(page, 'owner');
  // Hold the walk's answer back so the loading state stays on screen.
  let release: () => void = () => {};
  const held = new Promise<void>((resolve) => (release = resolve));
  await page.route(/\/api\/collections\/[^/]+\/rounds$/, async (route) => {
    await held;
    await route.continue();
  });
  await page.getByTestId('tab-rounds').click();
  await expect(page.getByTestId('rounds-screen').getByTestId('query-loading')).toBeVisible();
  expect(await seriousViolations(page)).toEqual([]);
  release();
  await expect(page.getByTestId('rounds-stop')).toBeVisible();
});
