import AxeBuilder from '@axe-core/playwright';
import { currentCollectionId, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';
import { fakeWeather, resetFakeWeather } from './support/weather';

test.afterEach(async ({ page }) => {
  await resetFakeWeather(page);
});

test('Today lists the outdoor plants to bring in tonight, each with its limit and the forecast low', async ({ page }, info) => {
  await page.goto('/sign-in');
  // Tonight 11 °C, then 20, 9 and 20 °C.
  await fakeWeather(page, { mode: 'normal', nightLows: [11, 20, 9, 20] });
  await signInAs(page, 'owner');
  const collectionId = await currentCollectionId(page);
  const api = await (await page.request.get(`/api/collections/${collectionId}/cold-nights`)).json();
  expect(api.status).toBe('ok');
  const tonight = api.nights[0];

  const card = page.getByTestId('today-screen').getByTestId('cold-nights');
  await expect(card).toBeVisible();
  await expect(card.getByRole('heading', { name: `Bring in tonight (${tonight.plants.length})` })).toBeVisible();
  // Coldest margin first; the rest of a long list opens on request.
  const rows = card.getByTestId('cold-night-tonight').locator('[data-testid^="bring-in-"]');
  await expect(rows).toHaveCount(Math.min(6, tonight.plants.length));
  await expect(rows.first()).toHaveAttribute('data-testid', `bring-in-${tonight.plants[0].tag}`);
  expect(tonight.plants.length).toBeGreaterThan(6);
  await card.getByTestId('cold-night-tonight-more').click();
  await expect(rows).toHaveCount(tonight.plants.length);
    // A Brassavola on the bright shelf: its genus limit of 12 °C is above tonight's 11 °C.
  const nodosa = card.getByTestId('bring-in-BS-001');
  await expect(nodosa).toContainText('BS-001 · B. nodosa');
  await expect(nodosa).toContainText("Bright shelf: limit 12 °C (B. default), forecast 11 °C, 1 °C under");
  // SH-001 carries its own 10 °C limit (the demo's shade-house bench), so not tonight …
  await expect(card.getByTestId('cold-night-tonight').getByTestId('bring-in-SH-001')).toHaveCount(0);
  // … and plants in the indoor window never.
  await expect(card.locator('[data-testid^="bring-in-IW-"]')).toHaveCount(0);
  // The rest of Today is there too.
  await expect(page.getByTestId('attention-list')).toBeVisible();
  await keepScreenshot(page, 'today-cold-nights', info.project.name);

  // The 9 °C night, two nights on: SH-001 comes in then, under its own limit.
  const cold = api.nights[2];
  const later = card.getByTestId(`cold-night-${cold.date}`);
  await expect(later).toContainText(`forecast low 9 °C, ${cold.plants.length} plants to bring in`);
  await later.getByRole('button').click();
  await expect(later.getByTestId('bring-in-SH-001')).toContainText('limit 10 °C (own limit), forecast 9 °C, 1 °C under');
  const axe = await new AxeBuilder({ page }).include('[data-testid="cold-nights"]').analyze();
  expect(axe.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => v.id)).toEqual([]);
});

test('with the forecast service answering garbage, Today still renders and says "forecast unavailable"', async ({ page }, info) => {
  await page.goto('/sign-in');
  await fakeWeather(page, { mode: 'garbage' });
  await signInAs(page, 'owner');
  const today = page.getByTestId('today-screen');
  await expect(today.getByTestId('cold-nights-unavailable')).toContainText('Cold nights: forecast unavailable.');
  await expect(today.getByTestId('cold-nights')).toHaveCount(0);
  await expect(today.getByTestId('query-error')).toHaveCount(0);
  await expect(page.getByTestId('attention-list')).toBeVisible();
  await keepScreenshot(page, 'today-forecast-unavailable', info.project.name);
});

test('the owner sets the location and marks an area indoors on the Collection screen', async ({ page }, info) => {
  await signInAs(page, 'owner');
  await page.goto('/collection');
  const screen = page.getByTestId('collection-screen');
  await expect(screen.getByTestId('location-latitude')).toHaveValue('26.1');
  await expect(screen.getByTestId('location-longitude')).toHaveValue('-80.3');
  await screen.getByTestId('location-setting').scrollIntoViewIfNeeded();
  await keepScreenshot(page, 'collection-cold-night-settings', info.project.name);
  await screen.getByTestId('location-latitude').fill('north');
  await screen.getByTestId('location-save').click();
  await expect(screen.getByText('Write the latitude in decimal degrees')).toBeVisible();
  await screen.getByTestId('location-latitude').fill('26.2');
  await screen.getByTestId('location-save').click();
  await expect(screen.getByTestId('location-setting').getByText('Saved')).toBeVisible();

  const collectionId = await currentCollectionId(page);
  const areas = await (await page.request.get(`/api/collections/${collectionId}/areas`)).json();
  const shelf = areas.find((a: { name: string }) => a.name === 'Bright shelf');
  await screen.getByTestId(`area-place-${shelf.id}-indoors`).click();
  await expect(screen.getByTestId(`area-place-${shelf.id}-indoors`)).toHaveAttribute('aria-checked', 'true');
  const after = await (await page.request.get(`/api/collections/${collectionId}/areas`)).json();
  expect(after.find((a: { id: string }) => a.id === shelf.id).indoors).toBe(true);
  // Put both back for the other specs.
  await screen.getByTestId(`area-place-${shelf.id}-outdoors`).click();
  await expect(screen.getByTestId(`area-place-${shelf.id}-outdoors`)).toHaveAttribute('aria-checked', 'true');
  await screen.getByTestId('location-latitude').fill('26.1');
  await screen.getByTestId('location-save').click();
  await expect(screen.getByTestId('location-setting').getByText('Saved')).toBeVisible();
});
