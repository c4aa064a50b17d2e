import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createWeatherClient } from '../../../server/weather/client';
import { startFakeWeather, type FakeWeatherServer } from '../../../server/weather/fake-weather';

let fake: FakeWeatherServer;
const HERE = { latitude: 26.1, longitude: -80.3 };

beforeAll(async () => {
  fake = await startFakeWeather({ slowMs: 10_000 });
});
afterAll(async () => {
  await fake.close();
});
beforeEach(() => {
  fake.setMode('normal');
  fake.setNightLows(null);
});

describe('weather client against the fake on loopback', () => {
  it("reads the fake's forecast: four nights, tonight dated today at the place", async () => {
    fake.setNightLows([10.8, 14.1, 13, 16.4]);
    const result = await createWeatherClient({ baseUrl: fake.url }).nightLows(HERE);
    expect(result.status).toBe('ok');
    if (result.status !== 'ok') return;
    expect(result.nights.map((n) => n.lowC)).toEqual([10.8, 14.1, 13, 16.4]);
    expect(result.nights.map((n) => n.date)).toEqual([...result.nights.map((n) => n.date)].sort());
    expect(new Set(result.nights.map((n) => n.date)).size).toBe(4);
  });

  it('gives up after the time-out on a slow answer, without throwing', async () => {
    fake.setMode('slow');
    const started = Date.now();
    const result = await createWeatherClient({ baseUrl: fake.url, timeoutMs: 300 }).nightLows(HERE);
    expect(result).toEqual({ status: 'unavailable', reason: 'the weather service did not answer within 0.3 s' });
    // The fake would answer after 10 s.
    expect(Date.now() - started).toBeLessThan(5000);
  });

  it.each([
    ['garbage', /not JSON/],
    ['wrong-shape', /not a forecast/],
    ['error', /answered 503/],
  ] as const)('%s → unavailable with the reason', async (mode, reason) => {
    fake.setMode(mode);
    const result = await createWeatherClient({ baseUrl: fake.url }).nightLows(HERE);
    expect(result.status).toBe('unavailable');
    if (result.status === 'unavailable') expect(result.reason).toMatch(reason);
  });

  it('an address nothing listens on → unavailable', async () => {
    const closed = await startFakeWeather();
    const url = closed.url;
    await closed.close();
    expect(await createWeatherClient({ baseUrl: url }).nightLows(HERE)).toEqual({ status: 'unavailable', reason: 'the weather service could not be reached' });
  });

  it('asks once per location while the answer is fresh, concurrent callers sharing the request', async () => {
    let clock = 1_000_000;
    const client = createWeatherClient({ baseUrl: fake.url, cacheMs: 60_000, now: () => clock });
    const before = fake.requests.length;
    const [a, b] = await Promise.all([client.nightLows(HERE), client.nightLows({ latitude: 26.1004, longitude: -80.2996 })]);
    expect(b).toBe(a);
    await client.nightLows(HERE);
    expect(fake.requests.length - before).toBe(1);
    await client.nightLows({ latitude: 40, longitude: 10 });
    expect(fake.requests.length - before).toBe(2);
    clock += 61_000;
    await client.nightLows(HERE);
    expect(fake.requests.length - before).toBe(3);
    client.clearCache();
    await client.nightLows(HERE);
    expect(fake.requests.length - before).toBe(4);
  });

  it('retries a failure sooner than it refreshes a forecast', async () => {
    let clock = 5_000_000;
    const client = createWeatherClient({ baseUrl: fake.url, cacheMs: 600_000, failureCacheMs: 30_000, now: () => clock });
    fake.setMode('error');
    expect((await client.nightLows(HERE)).status).toBe('unavailable');
    fake.setMode('normal');
    expect((await client.nightLows(HERE)).status).toBe('unavailable');
    clock += 31_000;
    expect((await client.nightLows(HERE)).status).toBe('ok');
  });
});
