import type { Logger } from 'pino';
import { FORECAST_DAYS, parseForecast, type NightLow } from './forecast';

export interface Location {
  latitude: number;
  longitude: number;
}

export type NightLows =
  | { status: 'ok'; nights: NightLow[]; fetchedAt: string }
  | { status: 'unavailable'; reason: string };

/** The night minimums ahead for a location; never throws: any failure is "unavailable". */
export interface WeatherClient {
  nightLows(location: Location): Promise<NightLows>;
  /** Forgets every cached answer (a changed fake, or a test). */
  clearCache(): void;
}

/** Long enough that Today, the digest and the hourly check share one request; forecasts update hourly at best. */
export const FORECAST_CACHE_MS = 10 * 60 * 1000;
/** A failed request is retried after this, not on every page view while the service is down. */
export const FAILURE_CACHE_MS = 30 * 1000;
/** A forecast service answers in well under a second; past this Today shows "forecast unavailable". */
export const DEFAULT_TIMEOUT_MS = 3000;
/** An Open-Meteo answer for five days is under 1 KB; anything far larger is not one. */
const MAX_ANSWER_BYTES = 256 * 1024;

export interface WeatherClientOptions {
  /** Base of the forecast API, e.g. https://api.open-meteo.com or the local fake's URL. */
  baseUrl: string;
  timeoutMs?: number;
  cacheMs?: number;
  failureCacheMs?: number;
  logger?: Logger;
  now?: () => number;
}

/** Locations closer than about a kilometre share a forecast (and a cache entry). */
const cacheKey = ({ latitude, longitude }: Location) => `${latitude.toFixed(2)},${longitude.toFixed(2)}`;

export function forecastUrl(baseUrl: string, { latitude, longitude }: Location): string {
  // A base with a path (behind a proxy) keeps it.
  const url = new URL(`${baseUrl.replace(/\/+$/, '')}/v1/forecast`);
  url.search = new URLSearchParams({
    latitude: latitude.toFixed(4),
    longitude: longitude.toFixed(4),
    daily: 'temperature_2m_min',
    timezone: 'auto',
    forecast_days: String(FORECAST_DAYS),
  }).toString();
  return url.toString();
}

/**
 * A client for an Open-Meteo-shaped forecast API over HTTP: a time-out on every request, a
 * short in-memory cache per location (concurrent misses share one request), and every failure
 * — no answer, a time-out, an HTTP error, a malformed body — turned into `unavailable` with
 * a reason that is logged and shown.
 */
export function createWeatherClient(options: WeatherClientOptions): WeatherClient {
  const timeoutMs = options.timeoutMs ?? DEFAULT_TIMEOUT_MS;
  const cacheMs = options.cacheMs ?? FORECAST_CACHE_MS;
  const failureCacheMs = options.failureCacheMs ?? FAILURE_CACHE_MS;
  const now = options.now ?? Date.now;
  const entries = new Map<string, { value: Promise<NightLows>; until: number }>();

  async function fetchNightLows(location: Location): Promise<NightLows> {
    const url = forecastUrl(options.baseUrl, location);
    const unavailable = (reason: string, err?: unknown): NightLows => {
      options.logger?.warn({ err, reason, location: cacheKey(location) }, 'night forecast unavailable');
      return { status: 'unavailable', reason };
    };
    let response: Response;
    try {
      response = await fetch(url, { signal: AbortSignal.timeout(timeoutMs), headers: { accept: 'application/json' } });
    } catch (error) {
      if (error instanceof DOMException && error.name === 'TimeoutError') return unavailable(`the weather service did not answer within ${timeoutMs / 1000} s`);
      return unavailable('the weather service could not be reached', error);
    }
    let text: string;
    try {
      text = await response.text();
    } catch (error) {
      if (error instanceof DOMException && error.name === 'TimeoutError') return unavailable(`the weather service did not answer within ${timeoutMs / 1000} s`);
      return unavailable('the weather service broke off its answer', error);
    }
    if (!response.ok) return unavailable(`the weather service answered ${response.status}`);
    if (text.length > MAX_ANSWER_BYTES) return unavailable('the weather service sent an answer far too large to be a forecast');
    let body: unknown;
    try {
      body = JSON.parse(text);
    } catch {
      return unavailable('the weather service sent something that is not JSON');
    }
    const parsed = parseForecast(body);
    if (!parsed.ok) return unavailable(`the weather service's ${parsed.reason}`);
    return { status: 'ok', nights: parsed.nights, fetchedAt: new Date(now()).toISOString() };
  }

  return {
    nightLows(location) {
      const key = cacheKey(location);
      const hit = entries.get(key);
      if (hit && hit.until > now()) return hit.value;
      const value = fetchNightLows(location).catch((error: unknown): NightLows => {
        options.logger?.error({ err: error }, 'night forecast failed unexpectedly');
        return { status: 'unavailable', reason: 'the forecast could not be read' };
      });
      // In flight: shared by concurrent callers until it settles, then kept for its own lifetime.
      entries.set(key, { value, until: Number.POSITIVE_INFINITY });
      void value.then((result) => {
        if (entries.get(key)?.value === value) entries.set(key, { value, until: now() + (result.status === 'ok' ? cacheMs : failureCacheMs) });
      });
      return value;
    },
    clearCache() {
      entries.clear();
    },
  };
}

/** The client when no forecast service is configured: every location is "unavailable". */
export const NO_WEATHER: WeatherClient = {
  nightLows: async () => ({ status: 'unavailable', reason: 'no weather service is configured on this server' }),
  clearCache: () => {},
};
