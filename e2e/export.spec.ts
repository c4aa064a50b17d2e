import fs from 'node:fs';
import AdmZip from 'adm-zip';
import { DEMO_COLLECTION_NAME } from '../db/seed/demo-accounts';
import { E2E_PORT } from './support/constants';
import { expect, keepScreenshot, test } from './support/fixtures';
import { currentCollectionId, signInAs, signUpThroughMailbox } from './support/session';

const ORIGIN = `http://127.0.0.1:${E2E_PORT}`;

test('a viewer downloads the zip export from Collection settings and gets the CSV files and photos', async ({ page }, info) => {
  await signInAs(page, 'viewer');
  await page.getByTestId('tab-collection').click();
  const card = page.getByTestId('collection-screen').getByTestId('export-card');
  await expect(card).toBeVisible();
  // A viewer may export but is never offered a restore.
  await expect(card.getByTestId('restore-section')).toHaveCount(0);
  await card.getByTestId('export-zip').scrollIntoViewIfNeeded();
  await keepScreenshot(page, 'export-card', info.project.name);

  const downloading = page.waitForEvent('download');
  await card.getByTestId('export-zip').click();
  const download = await downloading;
  expect(download.suggestedFilename()).toMatch(/^sympodia-saltmarsh-lane-shade-house-\d{4}-\d{2}-\d{2}\.zip$/);
  const file = await download.path();
  const zip = new AdmZip(fs.readFileSync(file));
  const names = zip.getEntries().map((e) => e.entryName);
  expect(names).toEqual(expect.arrayContaining(['README.txt', 'records.csv', 'plants.csv', 'leads.csv', 'measurements.csv', 'members.csv']));
  const records = zip.getEntry('records.csv')!.getData().toString('utf8');
  expect(records.split('\r\n')[0]).toBe('\uFEFF"tag","genus","epithet","clonal_name","lead","season","date","height_mm","leaves","sheath","root_tips","buds_seen","first_open","last_faded","flowers","spikes"');
  await expect(card.getByTestId('export-zip-done')).toContainText('.zip');
});

test('a new grower restores the owner’s JSON export into their empty collection and sees the summary', async ({ page }, info) => {
  await signInAs(page, 'owner');
  const sourceId = await currentCollectionId(page);
  const plantsBefore = (await (await page.request.get(`/api/collections/${sourceId}/plants?pageSize=1`)).json()).total as number;
  await page.getByTestId('tab-collection').click();
  const ownerCard = page.getByTestId('collection-screen').getByTestId('export-card');
  // The demo collection has records, so no restore is offered even to its owner.
  await expect(ownerCard.getByTestId('export-json')).toBeVisible();
  await expect(ownerCard.getByTestId('restore-section')).toHaveCount(0);
  const downloading = page.waitForEvent('download');
  await ownerCard.getByTestId('export-json').click();
  const download = await downloading;
  expect(download.suggestedFilename()).toMatch(/\.json$/);
  const json = fs.readFileSync(await download.path());
  expect(JSON.parse(json.toString('utf8')).collection.name).toBe(DEMO_COLLECTION_NAME);

  // Someone new: sign-up gives them an empty collection of their own.
  await page.context().clearCookies();
  const signedUp = await signUpThroughMailbox(page, ORIGIN, {
    email: `mover-${info.project.name}-${Date.now()}@example.test`,
    password: 'rhizome-and-mount-41',
    displayName: 'Mira Okafor',
  });
  const targetId = signedUp.collections[0].id;
  await page.goto('/collection');
  const card = page.getByTestId('collection-screen').getByTestId('export-card');
  const restore = card.getByTestId('restore-section');
  await expect(restore).toBeVisible();

  const chooser = page.waitForEvent('filechooser');
  await restore.getByTestId('restore-choose').click();
  await (await chooser).setFiles({ name: 'backup.json', mimeType: 'application/json', buffer: json });
  const confirm = restore.getByTestId('confirm');
  await expect(confirm).toContainText(`Restore “${DEMO_COLLECTION_NAME}”`);
  await expect(confirm).toContainText(`${plantsBefore} plants`);
  await keepScreenshot(page, 'restore-confirm', info.project.name);
  await confirm.getByTestId('confirm-yes').click();

  const done = card.getByTestId('restore-done');
  await expect(done).toBeVisible({ timeout: 30_000 });
  await expect(done).toContainText(`${plantsBefore} plants`);
  await keepScreenshot(page, 'restore-done', info.project.name);
  const restored = (await (await page.request.get(`/api/collections/${targetId}/plants?pageSize=1`)).json()).total;
  expect(restored).toBe(plantsBefore);
});
