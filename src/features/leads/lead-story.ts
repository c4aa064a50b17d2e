import { daysBetween } from '@/domain/dates';
import { fromMm, type LengthUnit } from '@/lib/units';
import type { LeadForecastResponse } from '@/shared/schemas/engine';
import type { LeadDetail } from '@/shared/schemas/records';
import type { LeadChartData } from './components/chart-data';

/** Days between curve samples: fine enough for a smooth line, few enough to draw fast. */
const CURVE_STEP_DAYS = 4;

/** Everything the chart draws, in the display unit. `lastSeason` is last season's lead, if known. */
export function leadChartData(lead: LeadDetail, forecast: LeadForecastResponse, lastSeason: LeadDetail | null, units: LengthUnit): LeadChartData {
  const dayOf = (date: string, from: string) => daysBetween(from, date);
  const measured = lead.measurements.map((m) => ({
    day: dayOf(m.date, lead.firstSeen),
    height: fromMm(m.heightMm, units),
    date: m.date,
    leafCount: m.leafCount,
    rootTips: m.rootTips,
    sheath: m.sheath,
  }));
  const { fit } = forecast;
  const lastDay = Math.max(measured.at(-1)?.day ?? 0, Math.ceil(fit.maturityDays) + 20, 60);
  const logistic = (a: number, t: number) => a / (1 + Math.exp((fit.midpointDays - t) / fit.scaleDays));
  const curve: LeadChartData['curve'] = [];
  if (fit.method !== 'insufficient' && fit.scaleDays > 0) {
    for (let t = 0; t <= lastDay; t += CURVE_STEP_DAYS) {
      curve.push({
        day: t,
        fit: fromMm(logistic(fit.matureHeightMm, t), units),
        lo: fromMm(logistic(fit.interval80.lowMm, t), units),
        hi: fromMm(logistic(fit.interval80.highMm, t), units),
      });
    }
  }
  const previous = (lastSeason?.measurements ?? [])
    .map((m) => ({ day: dayOf(m.date, lastSeason!.firstSeen), height: fromMm(m.heightMm, units) }))
    .filter((p) => p.day <= lastDay);

  const events: LeadChartData['events'] = [];
  let sheath = 'none';
  for (const m of lead.measurements) {
    if (m.sheath !== sheath) events.push({ day: dayOf(m.date, lead.firstSeen), label: `sheath ${m.sheath}` });
    sheath = m.sheath;
  }
  for (const [date, label] of [
    [lead.bloom?.budsSeenOn, 'buds seen'],
    [lead.bloom?.firstOpenOn, 'first flower'],
  ] as const) {
    if (date) events.push({ day: dayOf(date, lead.firstSeen), label });
  }
  return { measured, curve, lastSeason: previous, events, unit: units === 'mm' ? 'mm' : 'in' };
}
