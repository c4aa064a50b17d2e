import fs from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import path from 'node:path';
import iconv from 'iconv-lite';
import { currentCollectionId, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';

const FIXED = fs.readFileSync(path.join(__dirname, '..', 'tests', 'fixtures', 'import', 'fixed.csv'), 'utf8');

test('a grower imports the fixed spreadsheet: mapping, preview, progress bar, summary, and the plant in Plants', async ({ page }, info) => {
  // Each browser width imports its own copy of the file, under its own tags.
  const prefix = `SYM${info.project.name === 'phone' ? 'P' : 'D'}`;
  const csv = FIXED.replaceAll('SYM-', `${prefix}-`);
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);

  await page.goto('/collection');
  await page.getByTestId('collection-screen').getByTestId('open-import').click();
  const screen = page.getByTestId('import-screen');
  await expect(screen).toBeVisible();

  const chooser = page.waitForEvent('filechooser');
  await screen.getByRole('button', { name: 'Choose a CSV file' }).click();
  await (await chooser).setFiles({ name: 'past-records.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(screen.getByTestId('import-file-name')).toContainText('past-records.csv');

  // The guessed mapping, one labelled picker per field.
  const mapping = screen.getByTestId('import-mapping');
  await expect(mapping.getByLabel('Plant tag (needed)')).toHaveValue('Plant Tag');
  await expect(mapping.getByLabel('Grex or species')).toHaveValue('Grex / Species');
  await expect(mapping.getByLabel('Height')).toHaveValue('Height (cm)');
  await expect(mapping.getByLabel('Root tips')).toHaveValue('New roots');
  await expect(mapping.getByLabel('Spike count')).toHaveValue('');
  await keepScreenshot(page, 'import-mapping', info.project.name);

  await mapping.getByTestId('import-check').click();
  const report = screen.getByTestId('import-report');
  await expect(report.getByTestId('import-no-issues')).toBeVisible();
  await expect(report.getByTestId('import-summary')).toContainText('8 rows (2 blank skipped)');
  await expect(report.getByTestId('import-summary')).toContainText('New: 4 plants, 4 leads, 8 measurements, 2 bloom records');
  await expect(report.getByTestId('import-preview-row-3')).toContainText(`${prefix}-001 C. Hilltop Ember 'Dune' · lead 2024-A (2024)`);
  await expect(report.getByTestId('import-preview-row-3')).toContainText('2024-04-12: 62 mm, 3 leaves, sheath forming');
  await keepScreenshot(page, 'import-report', info.project.name);
  const axe = await new AxeBuilder({ page }).include('[data-testid="import-screen"]').analyze();
  expect(axe.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`)).toEqual([]);

  // Hold the import request a moment so the progress bar can be seen.
  await page.route(`**/api/collections/${collectionId}/imports?options=*`, async (route) => {
    await new Promise((resolve) => setTimeout(resolve, 1200));
    await route.continue();
  });
  await report.getByTestId('import-run').click();
  await expect(report.getByRole('progressbar', { name: 'Import progress' })).toBeVisible();
  await keepScreenshot(page, 'import-progress', info.project.name);

  const done = screen.getByTestId('import-done');
  await expect(done).toContainText('4 plants, 4 leads, 8 measurements and 2 bloom records added', { timeout: 20_000 });
  await keepScreenshot(page, 'import-done', info.project.name);

  await done.getByTestId('import-open-plants').click();
  const plants = page.getByTestId('plants-screen');
  await plants.getByTestId('plant-search').fill(`${prefix}-003`);
  await expect(plants.getByTestId(`plant-row-${prefix}-003`)).toContainText('Copper Lantern');
});

test('a grower sees the messy spreadsheet refused row by row, and nothing is written', async ({ page }, info) => {
  const messy = fs.readFileSync(path.join(__dirname, '..', 'tests', 'fixtures', 'import', 'messy.csv'), 'utf8').replaceAll('SYM-', `MESSY${info.project.name === 'phone' ? 'P' : 'D'}-`);
  await signInAs(page, 'grower');
  await page.goto('/import');
  const screen = page.getByTestId('import-screen');
  const chooser = page.waitForEvent('filechooser');
  await screen.getByRole('button', { name: 'Choose a CSV file' }).click();
  await (await chooser).setFiles({ name: 'messy.csv', mimeType: 'text/csv', buffer: Buffer.from(messy) });
  await screen.getByTestId('import-check').click();
  const issues = screen.getByTestId('import-issues');
  await expect(issues).toContainText('5 problems to fix');
  const rows = issues.getByRole('row');
  await expect(rows).toHaveCount(6);
  await expect(rows.nth(1)).toContainText('4Sheath"open" is not a sheath state');
  await expect(rows.nth(5)).toContainText('12Height (cm)3000 mm is above 1500 mm');
  await expect(screen.getByTestId('import-not-ready')).toBeVisible();
  await expect(screen.getByTestId('import-run')).toHaveCount(0);
  const prefix = `MESSY${info.project.name === 'phone' ? 'P' : 'D'}-`;
  const collectionId = await currentCollectionId(page);
  const found = await (await page.request.get(`/api/collections/${collectionId}/plants?q=${prefix}`)).json();
  expect(found.total).toBe(0);
  await issues.scrollIntoViewIfNeeded();
  await keepScreenshot(page, 'import-issues', info.project.name);
});

test('a spreadsheet saved as Windows-1252 is read as such: the screen says so and the preview shows the accents', async ({ page }, info) => {
  const tag = `LATIN${info.project.name === 'phone' ? 'P' : 'D'}-1`;
  // As older Excel saves "CSV (Comma delimited)" on a Western system: é is the single byte 0xE9.
  const csv = `Plant Tag,Genus,Grex / Species,Clone,Lead,Date,Height (mm)\r\n${tag},C.,Señorita Müller,Élan,2024-A,2024-03-25,45\r\n`;
  await signInAs(page, 'grower');
  await page.goto('/import');
  const screen = page.getByTestId('import-screen');
  const chooser = page.waitForEvent('filechooser');
  await screen.getByRole('button', { name: 'Choose a CSV file' }).click();
  await (await chooser).setFiles({ name: 'excel-latin.csv', mimeType: 'text/csv', buffer: iconv.encode(csv, 'windows-1252') });
  await screen.getByTestId('import-check').click();
  const report = screen.getByTestId('import-report');
  await expect(report.getByTestId('import-encoding')).toContainText('Read as Windows-1252');
  await expect(report.getByTestId('import-preview-row-2')).toContainText(`${tag} C. Señorita Müller 'Élan' · lead 2024-A (2024)`);
  await expect(report.getByTestId('import-preview-row-2')).not.toContainText('\uFFFD');
});
