import type { Logger } from 'pino';
import type { ServerEnv } from '../env';
import { createWeatherClient, NO_WEATHER, type WeatherClient } from './client';
import { startFakeWeather, type FakeWeatherServer } from './fake-weather';

/**
 * The forecast client the environment asks for: the service at WEATHER_URL when set; otherwise
 * (WEATHER_FAKE=1, or development) the local fake forecast on loopback. Production with
 * neither runs without forecasts: the cold-night lists say "forecast unavailable".
 */
export async function weatherFromEnv(env: ServerEnv, logger: Logger): Promise<{ weather: WeatherClient; fake?: FakeWeatherServer }> {
  const timeoutMs = env.WEATHER_TIMEOUT_MS;
  if (env.WEATHER_URL) {
    logger.info(`Night forecasts come from ${new URL(env.WEATHER_URL).origin}`);
    return { weather: createWeatherClient({ baseUrl: env.WEATHER_URL, timeoutMs, logger }) };
  }
  if (env.WEATHER_FAKE || env.NODE_ENV !== 'production') {
    const fake = await startFakeWeather({ port: env.WEATHER_FAKE_PORT });
    logger.info(`Night forecasts come from the local fake forecast service at ${fake.url} (invented values)`);
    return { weather: createWeatherClient({ baseUrl: fake.url, timeoutMs, logger }), fake };
  }
  logger.warn('No WEATHER_URL set: cold-night checks will say "forecast unavailable"');
  return { weather: NO_WEATHER };
}
