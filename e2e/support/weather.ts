import type { Page } from '@playwright/test';
import { expect } from '@playwright/test';
import { E2E_PORT } from './constants';

export interface FakeWeatherSettings {
  mode?: 'normal' | 'slow' | 'garbage' | 'wrong-shape' | 'error';
  /** Night minimums from tonight on (°C), for every location; null goes back to the generated forecast. */
  nightLows?: number[] | null;
}

/**
 * Switches the fake forecast service (/dev/weather, mounted only with the fake). The generated
 * forecast follows the date (a cold front every fourth night), so a test that needs a cold or a
 * mild night sets it here, and sets it back afterwards with `resetFakeWeather`.
 */
export async function fakeWeather(page: Page, settings: FakeWeatherSettings): Promise<void> {
  const res = await page.request.post('/dev/weather', { data: settings, headers: { Origin: `http://127.0.0.1:${E2E_PORT}` } });
  expect(res.status()).toBe(200);
}

export const resetFakeWeather = (page: Page) => fakeWeather(page, { mode: 'normal', nightLows: null });
