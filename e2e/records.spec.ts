import { currentCollectionId, daysAgo, signInAs } from './support/session';
import { expect, keepScreenshot, test } from './support/fixtures';

test('a grower adds a plant and a lead, records three measurements, marks the sheath budded, and it all survives a reload', async ({ page }, info) => {
  await signInAs(page, 'grower');
  const tag = `E2E-${info.project.name}-${Date.now() % 100000}`;

  await page.getByTestId('tab-plants').click();
  await page.getByTestId('add-plant').click();
  await expect(page.getByTestId('new-plant-screen')).toBeVisible();
  await page.getByTestId('plant-tag').fill(tag);
  // With no genus yet, the night-limit hint promises no number.
  await expect(page.getByText('Bring in below this. Left blank, the genus default is used once the genus is filled in.')).toBeVisible();
  await page.getByTestId('plant-genus').fill('C.');
  await page.getByTestId('plant-epithet').fill('Tidewater Glow');
  await page.getByTestId('plant-clonal').fill('Morning');
  await page.getByTestId('plant-medium').fill('bark');
  await expect(page.getByText('Bring in below this. Blank uses the C. default of 13 °C.')).toBeVisible();
  await page.getByTestId('plant-min-night').fill('11.5');
  await page.getByTestId('save-plant').click();

  await expect(page.getByTestId('plant-screen')).toBeVisible();
  await expect(page.getByTestId('plant-screen').getByText("C. Tidewater Glow 'Morning'")).toBeVisible();
  // The night limit typed when the plant was added is the one its edit form shows.
  await page.getByTestId('edit-plant').click();
  await expect(page.getByTestId('plant-min-night')).toHaveValue('11.5');
  await page.getByTestId('plant-screen').getByRole('button', { name: 'Cancel' }).click();

  await page.getByTestId('add-lead').click();
  await page.getByTestId('lead-first-seen').fill(daysAgo(40));
  await page.getByTestId('save-lead').click();
  await expect(page.getByTestId('add-lead-form')).toHaveCount(0);
  await page.locator('[data-testid^="lead-link-"]').first().click();
  await expect(page.getByTestId('lead-screen')).toBeVisible();

  const entries = [
    [daysAgo(28), '41'],
    [daysAgo(14), '63'],
    [daysAgo(0), '88'],
  ] as const;
  for (const [date, height] of entries) {
    await page.getByTestId('measure-date').fill(date);
    await page.getByTestId('measure-height').fill(height);
    await page.getByTestId('measure-leaves').fill('2');
    await page.getByTestId('measure-save').click();
    await expect(page.getByTestId(`measurement-${date}`)).toBeVisible();
  }

  // Today already has a look: the mark sets its sheath and invents no new height.
  await page.getByTestId('mark-sheath-budded').click();
  await expect(page.getByTestId('lead-summary')).toContainText('buds in sheath');
  await expect(page.getByTestId('mark-height')).toHaveCount(0);

  await page.reload();
  await expect(page.getByTestId('lead-screen')).toBeVisible();
  for (const [date, height] of entries) await expect(page.getByTestId(`measurement-${date}`)).toContainText(`${height} mm`);
  // One row per look (header + three): no copied height.
  await expect(page.getByTestId('measurement-table').getByRole('row')).toHaveCount(4);
  await expect(page.getByTestId('lead-summary')).toContainText('88 mm');
  await expect(page.getByTestId('lead-summary')).toContainText('buds in sheath');
  await keepScreenshot(page, 'lead', info.project.name);
});

test('a measurement that makes no sense is refused before anything is saved', async ({ page }) => {
  await signInAs(page, 'grower');
  await page.getByTestId('tab-plants').click();
  await page.locator('[data-testid^="plant-row-"]').first().click();
  await page.locator('[data-testid^="lead-link-"]').first().click();
  await page.getByTestId('measure-height').fill('-5');
  await page.getByTestId('measure-save').click();
  await expect(page.getByText('Height cannot be negative')).toBeVisible();
  await page.getByTestId('measure-height').fill('80');
  await page.getByTestId('measure-date').fill('2999-01-01');
  await page.getByTestId('measure-save').click();
  await expect(page.getByText(/future/i)).toBeVisible();
});

test('Rounds: three plants measured with the network cut are each stored exactly once when it returns', async ({ page, context }, info) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const rounds = await (await page.request.get(`/api/collections/${collectionId}/rounds`)).json();
  // A lead takes one look a day: leads already looked at today (by the other browser project) show what was recorded instead of a form.
  const today = await page.evaluate(() => {
    const d = new Date();
    return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
  });
  type RoundLead = { id: string; label: string; status: string; latest: { date: string } | null };
  const measurable = (rounds.stops as Array<{ leads: RoundLead[] }>).map((s) =>
    s.leads.filter((l) => (l.status === 'growing' || l.status === 'mature') && l.latest?.date !== today),
  );

  await page.getByTestId('tab-rounds').click();
  await expect(page.getByTestId('rounds-stop')).toBeVisible();
  // Start the walk from the first plant.
  while (await page.getByTestId('rounds-previous').isEnabled()) await page.getByTestId('rounds-previous').click();

  await context.setOffline(true);
  const marker = `walk-${info.project.name}-${Date.now()}`;
  const saved: Array<{ leadId: string; label: string; note: string }> = [];
  for (let stop = 0; stop < measurable.length && saved.length < 3; stop += 1) {
    const lead = measurable[stop][0];
    if (lead) {
      const note = `${marker}-${saved.length}`;
      await page.getByTestId(`rounds-${lead.label}-note`).fill(note);
      await page.getByTestId(`rounds-${lead.label}-save`).click();
      await expect(page.getByTestId('outbox-status')).toContainText('kept on this device');
      saved.push({ leadId: lead.id, label: lead.label, note });
    }
    await page.getByTestId('rounds-next').click();
  }
  expect(saved).toHaveLength(3);
  await expect(page.getByTestId('outbox-status')).toContainText('3 entries are kept on this device');
  await keepScreenshot(page, 'rounds-offline', info.project.name);

  await context.setOffline(false);
  await page.evaluate(() => window.dispatchEvent(new Event('online')));
  await expect(page.getByText(/kept on this device/)).toHaveCount(0, { timeout: 20_000 });
  await expect(page.getByText(/was refused/)).toHaveCount(0);
  await expect(page.getByTestId('outbox-status')).toHaveCount(0);

  for (const { leadId, note } of saved) {
    const lead = await (await page.request.get(`/api/collections/${collectionId}/leads/${leadId}`)).json();
    const matching = (lead.measurements as Array<{ note: string | null }>).filter((m) => m.note === note);
    expect(matching, `lead ${leadId}`).toHaveLength(1);
  }

  // Back at the last plant measured, the lead shows today's look and no second form.
  const last = saved[saved.length - 1];
  await page.getByTestId('rounds-previous').click();
  await expect(page.getByTestId(`rounds-${last.label}-done`)).toContainText('Looked at today');
  await expect(page.getByTestId(`rounds-${last.label}-save`)).toHaveCount(0);
  await page.getByTestId('rounds-next').click();

  // Leaving and coming back resumes at the same plant.
  const here = await page.getByTestId('rounds-progress').textContent();
  await page.getByTestId('tab-today').click();
  await page.getByTestId('tab-rounds').click();
  await expect(page.getByTestId('rounds-progress')).toHaveText(here!);
});

test('a lead the grower marked dried off offers no sheath marks and nothing to end', async ({ page }) => {
  await signInAs(page, 'grower');
  const collectionId = await currentCollectionId(page);
  const attention = await (await page.request.get(`/api/collections/${collectionId}/attention`)).json();
  const driedOff = attention.items.find((i: { kind: string; reason: string }) => i.kind === 'aborted' && i.reason.includes('dried off'));
  expect(driedOff, 'the demo collection has a lead marked dried off').toBeTruthy();
  await page.goto(`/plants/${driedOff.target.plantId}/leads/${driedOff.target.leadId}`);
  const screen = page.getByTestId('lead-screen');
  await expect(screen.getByTestId('lead-status')).toContainText('Dried off');
  await expect(screen.getByTestId('lead-summary')).toContainText('Last measured');
  await expect(screen.getByText('Mark the sheath today')).toHaveCount(0);
  await expect(screen.getByTestId('mark-sheath-budded')).toHaveCount(0);
  await expect(screen.getByTestId('mark-dried-off')).toHaveCount(0);
  // A late measurement can still be written down.
  await expect(screen.getByTestId('add-measurement')).toBeVisible();
});
