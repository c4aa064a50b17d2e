import { z } from 'zod';
import { COLD_NIGHTS_AHEAD } from '@/shared/schemas/cold-nights';

/*
 * The forecast service's answer, in the shape of the Open-Meteo forecast API
 * (https://open-meteo.com/en/docs): GET /v1/forecast?latitude=…&longitude=…
 * &daily=temperature_2m_min&timezone=auto&forecast_days=N answers
 * { daily: { time: ['YYYY-MM-DD', …], temperature_2m_min: [°C or null, …] } } with the dates
 * local to the location. Other fields are ignored.
 */

/**
 * Days asked for. A day's minimum falls in its early hours, so the low of the night that
 * starts on the evening of day D is day D+1's minimum: four nights need five days.
 */
export const FORECAST_DAYS = COLD_NIGHTS_AHEAD + 1;

/** Colder or warmer than anything measured near the ground: the answer is not a temperature. */
const PLAUSIBLE_C = { min: -90, max: 60 };

export const forecastAnswerSchema = z.object({
  daily: z
    .object({
      time: z.array(z.iso.date()).min(2),
      temperature_2m_min: z.array(z.number().min(PLAUSIBLE_C.min).max(PLAUSIBLE_C.max).nullable()).min(2),
    })
    .refine((d) => d.time.length === d.temperature_2m_min.length, { message: 'time and temperature_2m_min differ in length' })
    .refine((d) => d.time.every((t, i) => i === 0 || d.time[i - 1] < t), { message: 'dates are not in order' }),
});

export interface NightLow {
  /** The local date on whose evening the night starts. */
  date: string;
  /** Forecast minimum, °C. */
  lowC: number;
}

export type ParsedForecast = { ok: true; nights: NightLow[] } | { ok: false; reason: string };

/**
 * The nights of a forecast answer, tonight first: night i takes day i+1's minimum. A night
 * whose minimum is missing (null) is left out; an answer that does not match the shape, or
 * that yields no night at all, is not a forecast.
 */
export function parseForecast(body: unknown): ParsedForecast {
  const parsed = forecastAnswerSchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    return { ok: false, reason: `the answer is not a forecast (${issue.path.join('.') || 'body'}: ${issue.message})` };
  }
  const { time, temperature_2m_min: lows } = parsed.data.daily;
  const nights: NightLow[] = [];
  for (let i = 0; i + 1 < time.length && nights.length < COLD_NIGHTS_AHEAD; i += 1) {
    const low = lows[i + 1];
    if (low !== null) nights.push({ date: time[i], lowC: low });
  }
  if (nights.length === 0) return { ok: false, reason: 'the answer has no night minimum' };
  return { ok: true, nights };
}
