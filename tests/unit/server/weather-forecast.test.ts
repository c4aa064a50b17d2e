import { describe, expect, it } from 'vitest';
import { forecastUrl } from '../../../server/weather/client';
import { fakeDailyMinimums, fakeLocalDate } from '../../../server/weather/fake-weather';
import { FORECAST_DAYS, parseForecast } from '../../../server/weather/forecast';

const answer = (time: unknown, lows: unknown) => ({ latitude: 26.1, longitude: -80.3, daily_units: { time: 'iso8601', temperature_2m_min: '°C' }, daily: { time, temperature_2m_min: lows } });
const DAYS = ['2026-12-02', '2026-12-03', '2026-12-04', '2026-12-05', '2026-12-06'];

describe('parseForecast', () => {
  it("gives each night the next day's minimum, tonight first", () => {
    expect(parseForecast(answer(DAYS, [15.2, 10.8, 14.1, 13, 16.4]))).toEqual({
      ok: true,
      nights: [
        { date: '2026-12-02', lowC: 10.8 },
        { date: '2026-12-03', lowC: 14.1 },
        { date: '2026-12-04', lowC: 13 },
        { date: '2026-12-05', lowC: 16.4 },
      ],
    });
  });

  it('leaves out a night whose minimum is missing, and stops at four nights', () => {
    const parsed = parseForecast(answer([...DAYS, '2026-12-07'], [15, null, 9, 8, 7, 6]));
    expect(parsed).toEqual({ ok: true, nights: [{ date: '2026-12-03', lowC: 9 }, { date: '2026-12-04', lowC: 8 }, { date: '2026-12-05', lowC: 7 }, { date: '2026-12-06', lowC: 6 }] });
  });

  it('reads fields it does not know past, and extra daily series', () => {
    const body = { ...answer(DAYS.slice(0, 2), [12, 11]), hourly: { time: [] }, daily: { time: DAYS.slice(0, 2), temperature_2m_min: [12, 11], temperature_2m_max: [20, 21] } };
    expect(parseForecast(body)).toEqual({ ok: true, nights: [{ date: '2026-12-02', lowC: 11 }] });
  });

  it.each([
    ['not an object', 'Service overloaded'],
    ['null', null],
    ['no daily block', { latitude: 1 }],
    ['an Open-Meteo error body', { error: true, reason: 'Latitude must be in range of -90 to 90°.' }],
    ['lengths that differ', answer(DAYS, [1, 2, 3])],
    ['a single day (no night)', answer(DAYS.slice(0, 1), [4])],
    ['temperatures as text', answer(DAYS.slice(0, 2), ['cold', 'colder'])],
    ['a temperature no thermometer shows', answer(DAYS.slice(0, 2), [12, 400])],
    ['dates that are not dates', answer(['soon', 'later'], [1, 2])],
    ['dates out of order', answer(['2026-12-03', '2026-12-02'], [1, 2])],
    ['every night missing', answer(DAYS.slice(0, 3), [5, null, null])],
  ])('is not a forecast: %s', (_name, body) => {
    const parsed = parseForecast(body);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.reason).toMatch(/not a forecast|no night minimum/);
  });
});

describe('forecastUrl', () => {
  it('asks an Open-Meteo-shaped API for daily minimums in local time, one day more than the nights', () => {
    const url = new URL(forecastUrl('https://api.open-meteo.com', { latitude: 26.1, longitude: -80.3 }));
    expect(url.origin + url.pathname).toBe('https://api.open-meteo.com/v1/forecast');
    expect(Object.fromEntries(url.searchParams)).toEqual({
      latitude: '26.1000',
      longitude: '-80.3000',
      daily: 'temperature_2m_min',
      timezone: 'auto',
      forecast_days: String(FORECAST_DAYS),
    });
    expect(FORECAST_DAYS).toBe(5);
  });

  it('keeps a base path (a proxy in front of the service)', () => {
    expect(forecastUrl('https://proxy.example.org/weather/', { latitude: 1, longitude: 2 })).toMatch(/^https:\/\/proxy\.example\.org\/weather\/v1\/forecast\?/);
  });
});

describe('the fake forecast', () => {
  it('is the same for the same date and place, and differs between places', () => {
    expect(fakeDailyMinimums(26.1, -80.3, '2026-12-02', 5)).toEqual(fakeDailyMinimums(26.1, -80.3, '2026-12-02', 5));
    expect(fakeDailyMinimums(26.1, -80.3, '2026-12-02', 5)).not.toEqual(fakeDailyMinimums(-33.9, 151.2, '2026-12-02', 5));
  });

  it('holds a night clearly colder than the rest in any four nights ahead', () => {
    for (const [lat, lon] of [[26.1, -80.3], [51.5, -0.1], [-33.9, 151.2], [0, 0]]) {
      const lows = fakeDailyMinimums(lat, lon, '2026-01-01', 400);
      for (let i = 0; i + 4 <= lows.length; i += 1) {
        const window = lows.slice(i, i + 4);
        expect(Math.max(...window) - Math.min(...window), `${lat},${lon} from day ${i}`).toBeGreaterThan(1.2);
      }
    }
  });

  it('is colder in the local winter and toward the poles', () => {
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    expect(mean(fakeDailyMinimums(45, 10, '2026-01-01', 28))).toBeLessThan(mean(fakeDailyMinimums(45, 10, '2026-07-01', 28)));
    expect(mean(fakeDailyMinimums(-45, 10, '2026-07-01', 28))).toBeLessThan(mean(fakeDailyMinimums(-45, 10, '2026-01-01', 28)));
    expect(mean(fakeDailyMinimums(55, 10, '2026-01-01', 28))).toBeLessThan(mean(fakeDailyMinimums(20, 10, '2026-01-01', 28)));
  });

  it('dates its days in the local time of the longitude', () => {
    const now = new Date('2026-12-02T20:30:00Z');
    expect(fakeLocalDate(-80.3, now)).toBe('2026-12-02');
    expect(fakeLocalDate(151.2, now)).toBe('2026-12-03');
  });
});
