import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { coldNightAlerts, plants } from '../../db/schema';
import { createSmtpMailer, type Mailer } from '../../server/mail/mailer';
import { runColdNightAlerts } from '../../server/services/cold-night-alerts';
import { runDigest } from '../../server/services/digest';
import { fakeLocalDate } from '../../server/weather/fake-weather';
import { buildAreaInput, buildPlantInput } from '../factories/records';
import { mailTo } from '../factories/mail';
import { testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, TEST_WEATHER_TIMEOUT_MS, type TestServer } from './support/server';

let server: TestServer;
let world: Awaited<ReturnType<typeof collectionWorld>>;
let mailer: Mailer;
const HERE = { latitude: 26.1, longitude: -80.3 };
const tags: Record<string, string> = {};
const ids: Record<string, string> = {};

beforeAll(async () => {
  server = await startTestServer();
  world = await collectionWorld(server);
  mailer = createSmtpMailer({ host: server.mail.host, port: server.mail.port, secure: false, from: 'Sympodia <alerts@sympodia.invalid>', publicUrl: server.url });
  expect((await world.owner.patch(world.at(''), HERE)).status).toBe(200);
  const outside = (await world.grower.post(world.at('/areas'), buildAreaInput({ name: 'Shade bench', indoors: false }))).body.id as string;
  const inside = (await world.grower.post(world.at('/areas'), buildAreaInput({ name: 'Kitchen window', indoors: true }))).body.id as string;
  const plant = async (key: string, input: Record<string, unknown>) => {
    const res = await world.grower.post(world.at('/plants'), buildPlantInput({ tag: `CN-${key}`, ...input }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    tags[key] = res.body.tag;
    ids[key] = res.body.id;
    return res.body;
  };
  await plant('catt', { genus: 'C.', epithet: 'Quillon Dawn', clonalName: 'Oriel', areaId: outside });
  await plant('laelia', { genus: 'L.', epithet: 'anceps', isSpecies: true, clonalName: null, areaId: outside });
  await plant('hardy', { genus: 'C.', areaId: outside, minNightTempC: 9 });
  const tender = await plant('tender', { genus: 'L.', areaId: outside });
  // The override set on an existing plant through the edit route.
  const edited = await world.grower.patch(world.at(`/plants/${tender.id}`), { version: tender.version, minNightTempC: 15 });
  expect(edited.body.minNightTempC).toBe(15);
  await plant('indoors', { genus: 'C.', areaId: inside, minNightTempC: 30 });
  await plant('given', { genus: 'C.', areaId: outside, minNightTempC: 30 });
  await plant('history', { genus: 'C.', areaId: outside, minNightTempC: 30 });
  await plant('nowhere', { genus: 'C.', areaId: null });
  await testDb().update(plants).set({ givenAwayOn: '2026-11-01', givenTo: 'a friend' }).where(eq(plants.id, ids.given));
  await testDb().update(plants).set({ historyOnly: true }).where(eq(plants.id, ids.history));
});
afterAll(async () => {
  await server.close();
});
beforeEach(() => {
  server.weather.setMode('normal');
  server.weather.setNightLows(null);
  server.forecasts.clearCache();
  server.mail.clear();
});

const coldNights = () => world.viewer.get(world.at('/cold-nights'));
const listed = (night: { plants: Array<{ plantId: string }> }) => night.plants.map((p) => Object.entries(ids).find(([, id]) => id === p.plantId)![0]);

describe('cold nights', () => {
  it('lists the outdoor plants under their limit for tonight and the next three nights, coldest margin first', async () => {
    server.weather.setNightLows([10, 14, 6, 20]);
    const before = new Date();
    const res = await coldNights();
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', latitude: HERE.latitude, longitude: HERE.longitude, unplacedPlants: 1 });
    const { nights } = res.body;
    expect(nights.map((n: { lowC: number }) => n.lowC)).toEqual([10, 14, 6, 20]);
    // Tonight is today at the collection's place (the fake dates its days from the longitude).
    expect([fakeLocalDate(HERE.longitude, before), fakeLocalDate(HERE.longitude, new Date())]).toContain(nights[0].date);

    // Limits: tender 15 (own), catt 13 (C. default), hardy 9 (own), laelia 7 (L. default).
    expect(listed(nights[0])).toEqual(['tender', 'catt']);
    expect(listed(nights[1])).toEqual(['tender']);
    expect(listed(nights[2])).toEqual(['tender', 'catt', 'hardy', 'laelia']);
    expect(listed(nights[3])).toEqual([]);
    expect(nights[0].plants).toEqual([
      { plantId: ids.tender, tag: tags.tender, name: "L. Harbor Lantern 'Dune'", areaId: expect.any(String), areaName: 'Shade bench', limitC: 15, limitSource: 'plant', lowC: 10, marginC: 5 },
      // 13 °C: the Cattleya figure of the issue and the AOS culture sheet (REFERENCES.md).
      { plantId: ids.catt, tag: tags.catt, name: "C. Quillon Dawn 'Oriel'", areaId: expect.any(String), areaName: 'Shade bench', limitC: 13, limitSource: 'genus', lowC: 10, marginC: 3 },
    ]);

    const asked = server.weather.requests.at(-1)!;
    expect(asked.pathname).toBe('/v1/forecast');
    expect(Object.fromEntries(asked.searchParams)).toMatchObject({ latitude: '26.1000', longitude: '-80.3000', daily: 'temperature_2m_min', timezone: 'auto' });
  });

  it('never lists indoor, given-away or history-only plants, however tender', async () => {
    server.weather.setNightLows([-5, -5, -5, -5]);
    const res = await coldNights();
    for (const night of res.body.nights) expect(listed(night).sort()).toEqual(['catt', 'hardy', 'laelia', 'tender']);
  });

  it('says when the collection has no location, without asking the service', async () => {
    const created = await world.owner.post('/api/collections', { name: 'No place yet' });
    const before = server.weather.requests.length;
    const res = await world.owner.get(`/api/collections/${created.body.id}/cold-nights`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'no_location' });
    expect(server.weather.requests.length).toBe(before);
  });

  it('a slow service → "unavailable" once the time-out passes', async () => {
    server.weather.setMode('slow');
    const started = Date.now();
    const res = await coldNights();
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'unavailable', reason: `the weather service did not answer within ${TEST_WEATHER_TIMEOUT_MS / 1000} s` });
    // The fake would answer after 20 s; the route answers soon after the 1 s time-out.
    expect(Date.now() - started).toBeLessThan(TEST_WEATHER_TIMEOUT_MS + 3000);
  });

  it.each([
    ['garbage', /not JSON/],
    ['wrong-shape', /not a forecast/],
    ['error', /answered 503/],
  ] as const)('a service answering %s → "unavailable" with the reason', async (mode, reason) => {
    server.weather.setMode(mode);
    const res = await coldNights();
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('unavailable');
    expect(res.body.reason).toMatch(reason);
  });

  it('asks the service once for several readers while the forecast is fresh', async () => {
    const before = server.weather.requests.length;
    await Promise.all([coldNights(), world.owner.get(world.at('/cold-nights')), world.grower.get(world.at('/cold-nights'))]);
    await coldNights();
    expect(server.weather.requests.length - before).toBe(1);
  });

  it('refuses a night limit out of range or not a number, naming the field', async () => {
    expectRefused(await world.grower.post(world.at('/plants'), buildPlantInput({ minNightTempC: 50 })), 400, 'minNightTempC', /between -20 and 35/);
    expectRefused(await world.grower.post(world.at('/plants'), buildPlantInput({ minNightTempC: 'cold' })), 400, 'minNightTempC', /number/);
    const plant = (await world.grower.get(world.at(`/plants/${ids.hardy}`))).body;
    expect(plant.minNightTempC).toBe(9);
    // Blank again: back to the genus default.
    const cleared = await world.grower.patch(world.at(`/plants/${ids.hardy}`), { version: plant.version, minNightTempC: null });
    expect(cleared.body.minNightTempC).toBeNull();
    server.weather.setNightLows([12, 20, 20, 20]);
    expect(listed((await coldNights()).body.nights[0])).toContain('hardy');
    const again = await world.grower.patch(world.at(`/plants/${ids.hardy}`), { version: cleared.body.version, minNightTempC: 9 });
    expect(again.status).toBe(200);
  });
});

describe('same-day cold-night warning', () => {
  it('claims nothing when the forecast fails or tonight is mild', async () => {
    server.weather.setMode('error');
    expect((await runColdNightAlerts({ db: testDb(), mailer, weather: server.forecasts })).alerts).toEqual([]);
    server.weather.setMode('normal');
    server.forecasts.clearCache();
    server.weather.setNightLows([25, 5, 5, 5]);
    expect((await runColdNightAlerts({ db: testDb(), mailer, weather: server.forecasts })).alerts).toEqual([]);
    expect(await testDb().select().from(coldNightAlerts)).toEqual([]);
  });

  it('is sent once per collection and night by one of two racing runs, to members who have not opted out', async () => {
    server.weather.setNightLows([10, 20, 20, 20]);
    expect((await world.grower.put(world.at('/digest'), { optedOut: true })).status).toBe(200);
    const ctx = { db: testDb(), mailer, weather: server.forecasts };
    const [a, b] = await Promise.all([runColdNightAlerts(ctx, { runner: 'process-a' }), runColdNightAlerts(ctx, { runner: 'process-b' })]);
    const ours = [...a.alerts, ...b.alerts].filter((x) => x.collectionId === world.collectionId);
    expect(ours.map((x) => x.claimed).sort()).toEqual([false, true]);
    expect(ours.reduce((n, x) => n + x.sent, 0)).toBe(2);

    const [ownerMail] = await mailTo(server.mail, world.people.owner.email);
    await mailTo(server.mail, world.people.viewer.email);
    expect(server.mail.to(world.people.grower.email)).toEqual([]);
    expect(ownerMail.subject).toBe('Sympodia: bring in 2 plants tonight, low 10 °C at Test bench');
    expect(ownerMail.text).toContain(`${tags.tender} L. Harbor Lantern 'Dune' (Shade bench): limit 15 °C (this plant's own), forecast 10 °C, 5 °C under`);
    expect(ownerMail.text).toContain(`${tags.catt} C. Quillon Dawn 'Oriel' (Shade bench): limit 13 °C (C. default), forecast 10 °C, 3 °C under`);
    expect(ownerMail.text).not.toContain(tags.laelia);
    expect(ownerMail.headers['list-unsubscribe']).toMatch(new RegExp(`^<${server.url}/digest/unsubscribe/[A-Za-z0-9_-]+>$`));
    expect(ownerMail.text).toMatch(new RegExp(`${server.url}/digest/unsubscribe/[A-Za-z0-9_-]+`));

    const [row] = await testDb().select().from(coldNightAlerts).where(and(eq(coldNightAlerts.collectionId, world.collectionId)));
    expect(row).toMatchObject({ sent: 2 });
    // A later hour on the same night sends nothing more.
    server.mail.clear();
    const later = await runColdNightAlerts(ctx);
    expect(later.alerts.filter((x) => x.collectionId === world.collectionId).map((x) => x.claimed)).toEqual([false]);
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(server.mail.messages).toEqual([]);
    expect((await world.grower.put(world.at('/digest'), { optedOut: false })).status).toBe(200);
  });
});

describe('weekly digest', () => {
  it('carries the bring-in list, even for a collection with no lead to look at', async () => {
    server.weather.setNightLows([10, 20, 6, 20]);
    const result = await runDigest({ db: testDb(), mailer, weather: server.forecasts }, { now: new Date(), runner: 'digest-test' });
    expect(result.claimed).toBe(true);
    const [mail] = await mailTo(server.mail, world.people.owner.email);
    expect(mail.subject).toBe('Sympodia: cold nights ahead for Test bench');
    expect(mail.text).toContain('Cold nights: plants to bring in:');
    expect(mail.text).toMatch(/- Tonight \d{4}-\d{2}-\d{2}, forecast low 10 °C:/);
    expect(mail.text).toMatch(/- Night of \d{4}-\d{2}-\d{2}, forecast low 6 °C:/);
    expect(mail.text).toContain(`${tags.catt} C. Quillon Dawn 'Oriel' (Shade bench): limit 13 °C (C. default), forecast 6 °C, 7 °C under`);
    expect(mail.text).toContain(`${tags.laelia} L. anceps (Shade bench): limit 7 °C (L. default), forecast 6 °C, 1 °C under`);
    expect(mail.html).toContain('<h3>Cold nights: plants to bring in</h3>');
  });
});
