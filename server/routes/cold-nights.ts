import express, { Router } from 'express';
import { z } from 'zod';
import { coldNightsSchema } from '@/shared/schemas/cold-nights';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { loopbackClientsOnly } from '../middleware/loopback';
import { originCheck } from '../middleware/origin';
import { coldNightsFor } from '../services/cold-nights';
import { parse } from '../validate';
import type { WeatherClient } from '../weather/client';
import { FAKE_WEATHER_MODES, type FakeWeatherServer } from '../weather/fake-weather';

/**
 * Tonight and the next three nights with the outdoor plants to bring in (any member). A failed
 * forecast is an ordinary 200 answer with status "unavailable", never an error page.
 */
export function coldNightRoutes(ctx: AppContext): Router {
  const { db } = ctx;
  const router = Router();
  router.get('/collections/:collectionId/cold-nights', requireRole(db, 'viewer'), async (_req, res) => {
    const report = await coldNightsFor(db, ctx.weather, res.locals.membership!.collectionId);
    res.set('Cache-Control', 'private, no-cache');
    res.json(coldNightsSchema.parse(report));
  });
  return router;
}

const fakeSettingsSchema = z.object({
  mode: z.enum(FAKE_WEATHER_MODES, { error: `Mode is one of ${FAKE_WEATHER_MODES.join(', ')}` }).optional(),
  /** Fixed night minimums, tonight first (°C); null goes back to the generated forecast. */
  nightLows: z.array(z.number().min(-60).max(50)).min(1).max(15).nullable().optional(),
});

/**
 * The fake forecast service's switch, beside /dev/mailbox: GET shows the mode, POST
 * { mode, nightLows } makes it answer slowly, with garbage or with an error, or with fixed
 * night minimums (and forgets cached forecasts). Mounted only when the fake is in use, never
 * with a real WEATHER_URL; answers only clients on this machine, and a POST must carry this
 * server's Origin like every other write.
 */
export function fakeWeatherRoutes(fake: FakeWeatherServer, weather: WeatherClient, allowedOrigins: readonly string[] = []): Router {
  const router = Router();
  router.use('/dev/weather', loopbackClientsOnly, originCheck(allowedOrigins));
  router.get('/dev/weather', (_req, res) => {
    res.set('Cache-Control', 'no-store');
    res.json({ mode: fake.mode, modes: FAKE_WEATHER_MODES, url: fake.url });
  });
  router.post('/dev/weather', express.json({ limit: '1kb' }), (req, res) => {
    const { mode, nightLows } = parse(fakeSettingsSchema, req.body);
    if (mode) fake.setMode(mode);
    if (nightLows !== undefined) fake.setNightLows(nightLows);
    weather.clearCache();
    res.set('Cache-Control', 'no-store');
    res.json({ mode: fake.mode, modes: FAKE_WEATHER_MODES, url: fake.url });
  });
  return router;
}
