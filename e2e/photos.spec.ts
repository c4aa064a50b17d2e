import { cameraJpeg } from '../tests/factories/photos';
import { currentCollectionId, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';

test('a grower adds a photo to a lead with a progress bar, sees the thumbnail, opens it large, and can cancel another', async ({ page }, info) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const plants = await (await page.request.get(`/api/collections/${collectionId}/plants?q=SH-001`)).json();
  const plant = plants.items[0];
  const lead = plant.currentLeads[0];
  await page.goto(`/plants/${plant.id}/leads/${lead.id}`);
  const strip = page.getByTestId('lead-photos');
  await expect(strip).toBeVisible();
  const before = (await (await page.request.get(`/api/collections/${collectionId}/photos?leadId=${lead.id}`)).json()).items.length;
  await expect(strip.getByTestId('photo-thumb')).toHaveCount(before);

  // A slow link, so the progress bar can be seen: about 300 KB/s up.
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 20, downloadThroughput: 5_000_000, uploadThroughput: 300_000 });

  const photo = await cameraJpeg({ width: 2000, height: 1500, orientation: 1 });
  expect(photo.length).toBeGreaterThan(600_000);
  const chooser = page.waitForEvent('filechooser');
  await strip.getByTestId('add-photos').click();
  await (await chooser).setFiles({ name: 'lead-sh001.jpg', mimeType: 'image/jpeg', buffer: photo });

  const bar = strip.getByRole('progressbar', { name: 'Sending lead-sh001.jpg' });
  await expect(bar).toBeVisible();
  await keepScreenshot(page, 'photo-uploading', info.project.name);
  await expect(strip.getByTestId('photo-thumb')).toHaveCount(before + 1, { timeout: 30_000 });
  await expect(bar).toHaveCount(0);

  // A second one, cancelled on the way: no thumbnail is added.
  const second = page.waitForEvent('filechooser');
  await strip.getByTestId('add-photos').click();
  await (await second).setFiles({ name: 'second.jpg', mimeType: 'image/jpeg', buffer: photo });
  await expect(strip.getByRole('progressbar', { name: 'Sending second.jpg' })).toBeVisible();
  await strip.getByRole('button', { name: 'Cancel sending second.jpg' }).click();
  await expect(strip.getByTestId('photo-upload')).toContainText('cancelled');
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
  await page.reload();
  await expect(page.getByTestId('lead-photos').getByTestId('photo-thumb')).toHaveCount(before + 1);

  // The thumbnail is a real picture the browser decoded, and opens large.
  const thumbImage = page.getByTestId('lead-photos').getByTestId('photo-thumb').last().locator('img');
  await expect.poll(() => thumbImage.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(400);
  await keepScreenshot(page, 'photo-strip', info.project.name);
  await page.getByTestId('lead-photos').getByTestId('photo-thumb').last().click();
  const viewer = page.getByTestId('photo-viewer');
  await expect(viewer).toBeVisible();
  await expect.poll(() => viewer.getByTestId('photo-large').locator('img').evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(1600);
  await keepScreenshot(page, 'photo-viewer', info.project.name);
  await page.keyboard.press('Escape');
  await expect(viewer).toHaveCount(0);
});
