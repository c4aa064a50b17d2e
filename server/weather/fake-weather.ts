import http from 'node:http';
import type { AddressInfo } from 'node:net';

/** How the fake answers: a forecast, late, with bytes that are not JSON, with JSON of the wrong shape, or with a 503. */
export const FAKE_WEATHER_MODES = ['normal', 'slow', 'garbage', 'wrong-shape', 'error'] as const;
export type FakeWeatherMode = (typeof FAKE_WEATHER_MODES)[number];

export interface FakeWeatherServer {
  /** Base URL for the client, e.g. http://127.0.0.1:40123. */
  url: string;
  port: number;
  mode: FakeWeatherMode;
  setMode(mode: FakeWeatherMode): void;
  /**
   * Fixed night minimums (tonight first, °C) for every location instead of the generated
   * ones; null goes back to the generated forecast.
   */
  setNightLows(lows: readonly number[] | null): void;
  /** Every request's URL, oldest first. */
  requests: URL[];
  close(): Promise<void>;
}

const DAY_MS = 86_400_000;

function hash01(text: string): number {
  // FNV-1a: a stable pseudo-random fraction per text.
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i += 1) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h / 0xffffffff;
}

/** Whole hours east of UTC, from the longitude alone: the fake's stand-in for `timezone=auto`. */
export const fakeUtcOffsetHours = (longitude: number) => Math.round(longitude / 15);

/** The local date at `longitude` at the instant `now`. */
export function fakeLocalDate(longitude: number, now: Date): string {
  return new Date(now.getTime() + fakeUtcOffsetHours(longitude) * 3_600_000).toISOString().slice(0, 10);
}

/**
 * Invented, deterministic daily minimums (°C) for `days` dates from `fromDate` at a location:
 * a season curve from the latitude (coldest in mid-January north of the equator, mid-July
 * south), a jitter of ±1.5 °C from the date and place, and a cold front every fourth night
 * (3.5 °C under the curve), so any four nights ahead hold one colder night. Not a climate
 * model: enough for the demo and development to show a night worth bringing plants in for.
 */
export function fakeDailyMinimums(latitude: number, longitude: number, fromDate: string, days: number): number[] {
  const absLat = Math.abs(latitude);
  const base = 28 - 0.4 * absLat;
  const amplitude = Math.min(12, 0.15 * absLat);
  const coldestDay = latitude >= 0 ? 15 : 196;
  const start = Date.parse(`${fromDate}T00:00:00Z`);
  const shift = Math.floor(Math.abs(latitude * 7 + longitude * 3)) % 4;
  const out: number[] = [];
  for (let i = 0; i < days; i += 1) {
    const t = start + i * DAY_MS;
    const date = new Date(t).toISOString().slice(0, 10);
    const dayOfYear = Math.floor((t - Date.UTC(new Date(t).getUTCFullYear(), 0, 1)) / DAY_MS) + 1;
    const season = base - amplitude * Math.cos((2 * Math.PI * (dayOfYear - coldestDay)) / 365.25);
    const jitter = (hash01(`${date}|${latitude.toFixed(2)}|${longitude.toFixed(2)}`) - 0.5) * 3;
    // The minimum of day D is the night before it: the front arrives on the evening of D−1.
    const front = (Math.floor(t / DAY_MS) + shift) % 4 === 0;
    out.push(Math.round((front ? season - 3.5 + jitter * 0.3 : season + jitter) * 10) / 10);
  }
  return out;
}

function send(res: http.ServerResponse, status: number, body: string, type = 'application/json') {
  res.writeHead(status, { 'content-type': type, 'content-length': Buffer.byteLength(body) });
  res.end(body);
}

/**
 * A local stand-in for an Open-Meteo-shaped forecast API on 127.0.0.1: GET /v1/forecast with
 * latitude, longitude, daily=temperature_2m_min and forecast_days answers the invented
 * forecast of `fakeDailyMinimums`. The start command, dev server and tests run it; test modes
 * answer late, with garbage or with an error.
 */
export async function startFakeWeather(options: { port?: number; mode?: FakeWeatherMode; slowMs?: number; now?: () => Date } = {}): Promise<FakeWeatherServer> {
  const slowMs = options.slowMs ?? 20_000;
  const now = options.now ?? (() => new Date());
  const timers = new Set<ReturnType<typeof setTimeout>>();
  let fixedLows: readonly number[] | null = null;
  const requests: URL[] = [];

  const fake: FakeWeatherServer = {
    url: '',
    port: 0,
    mode: options.mode ?? 'normal',
    setMode: (mode) => void (fake.mode = mode),
    setNightLows: (lows) => void (fixedLows = lows ? [...lows] : null),
    requests,
    close: async () => {
      for (const timer of timers) clearTimeout(timer);
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };

  const answer = (url: URL, res: http.ServerResponse) => {
    if (url.pathname !== '/v1/forecast') return send(res, 404, JSON.stringify({ error: true, reason: 'Not found' }));
    const latitude = Number(url.searchParams.get('latitude'));
    const longitude = Number(url.searchParams.get('longitude'));
    const days = Number(url.searchParams.get('forecast_days') ?? 7);
    if (!url.searchParams.has('latitude') || !Number.isFinite(latitude) || Math.abs(latitude) > 90) {
      return send(res, 400, JSON.stringify({ error: true, reason: 'Latitude must be in range of -90 to 90°.' }));
    }
    if (!url.searchParams.has('longitude') || !Number.isFinite(longitude) || Math.abs(longitude) > 180) {
      return send(res, 400, JSON.stringify({ error: true, reason: 'Longitude must be in range of -180 to 180°.' }));
    }
    if (!Number.isInteger(days) || days < 1 || days > 16) return send(res, 400, JSON.stringify({ error: true, reason: 'Forecast days is invalid.' }));
    if (url.searchParams.get('daily') !== 'temperature_2m_min') {
      return send(res, 400, JSON.stringify({ error: true, reason: 'This fake knows only daily=temperature_2m_min.' }));
    }
    switch (fake.mode) {
      case 'garbage':
        return send(res, 200, '<html><body>Service temporarily overloaded \u0000\u0001</body></html>', 'text/html');
      case 'wrong-shape':
        return send(res, 200, JSON.stringify({ daily: { time: ['soon', 'later'], temperature_2m_min: ['cold', 'colder'] } }));
      case 'error':
        return send(res, 503, JSON.stringify({ error: true, reason: 'Service unavailable' }));
      default: {
        const today = fakeLocalDate(longitude, now());
        const generated = fakeDailyMinimums(latitude, longitude, today, days);
        const minimums = fixedLows ? generated.map((v, i) => (i === 0 ? v : (fixedLows![i - 1] ?? v))) : generated;
        const time = generated.map((_, i) => new Date(Date.parse(`${today}T00:00:00Z`) + i * DAY_MS).toISOString().slice(0, 10));
        const offset = fakeUtcOffsetHours(longitude);
        return send(
          res,
          200,
          JSON.stringify({
            latitude: Math.round(latitude * 100) / 100,
            longitude: Math.round(longitude * 100) / 100,
            generationtime_ms: 0.1,
            utc_offset_seconds: offset * 3600,
            timezone: offset === 0 ? 'GMT' : `Etc/GMT${offset > 0 ? '-' : '+'}${Math.abs(offset)}`,
            timezone_abbreviation: `GMT${offset >= 0 ? '+' : ''}${offset}`,
            elevation: 0,
            daily_units: { time: 'iso8601', temperature_2m_min: '°C' },
            daily: { time, temperature_2m_min: minimums },
          }),
        );
      }
    }
  };

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://127.0.0.1');
    requests.push(url);
    if (req.method !== 'GET') return send(res, 405, JSON.stringify({ error: true, reason: 'GET only' }));
    if (fake.mode === 'slow' && url.pathname === '/v1/forecast') {
      const timer = setTimeout(() => {
        timers.delete(timer);
        if (!res.destroyed) answer(url, res);
      }, slowMs);
      timers.add(timer);
      return;
    }
    answer(url, res);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, '127.0.0.1', () => resolve());
  });
  fake.port = (server.address() as AddressInfo).port;
  fake.url = `http://127.0.0.1:${fake.port}`;
  return fake;
}
