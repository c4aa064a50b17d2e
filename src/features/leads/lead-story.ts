import { daysBetween } from '@/domain/dates';
import { formatDate } from '@/lib/dates';
import { formatLength, fromMm, type LengthUnit } from '@/lib/units';
import type { LeadForecastResponse } from '@/shared/schemas/engine';
import type { LeadDetail } from '@/shared/schemas/records';
import type { LeadChartData } from './components/chart-data';

/** Days between curve samples: fine enough for a smooth line, few enough to draw fast. */
const CURVE_STEP_DAYS = 4;

/**
 * The lead's story in one sentence, from the engine's own figures, e.g. "82% of last
 * season's size at day 60, about 9 days behind; likely mature around 14 Mar 2027 at about
 * 210 mm (80%: 190–230 mm)."
 */
export function leadSummary(forecast: LeadForecastResponse, units: LengthUnit): string {
  const { priorYears, fit, lead } = forecast;
  const parts: string[] = [];
  const last = priorYears.lastSeason;
  if (priorYears.ageDays === null || priorYears.heightMm === null) {
    parts.push('Not measured yet');
  } else if (last && last.sizeRatio !== null) {
    let comparison = `${Math.round(last.sizeRatio * 100)}% of last season's size at day ${priorYears.ageDays}`;
    if (last.daysAhead !== null) {
      comparison +=
        last.daysAhead > 0
          ? `, about ${last.daysAhead} ${last.daysAhead === 1 ? 'day' : 'days'} ahead`
          : last.daysAhead < 0
            ? `, about ${-last.daysAhead} ${last.daysAhead === -1 ? 'day' : 'days'} behind`
            : ', level with last season';
    }
    parts.push(comparison);
  } else {
    parts.push(`${formatLength(priorYears.heightMm, units)} at day ${priorYears.ageDays}, with no earlier lead at this age to compare`);
  }
  if (lead.status === 'growing' && fit.method !== 'insufficient') {
    const range = `${fromMm(fit.interval80.lowMm, units)}–${formatLength(fit.interval80.highMm, units)}`;
    parts.push(`likely mature around ${formatDate(fit.maturityDate)} at about ${formatLength(fit.matureHeightMm, units)} (80%: ${range})`);
  } else if (lead.status === 'growing') {
    parts.push(`expected to reach about ${formatLength(fit.matureHeightMm, units)}`);
  }
  return `${parts.join('; ')}.`;
}

/** The bloom forecast in words, or null when there is nothing to forecast. */
export function bloomSummary(forecast: LeadForecastResponse): string | null {
  const { bloom } = forecast;
  if (bloom.stage === 'lost') return 'No bloom expected from this lead.';
  if (!bloom.firstOpen) return null;
  const w = bloom.firstOpen;
  return `Likely first flower ${formatDate(w.p50)} (80%: ${formatDate(w.p10)} – ${formatDate(w.p90)}); chance of blooming ${Math.round(bloom.chance * 100)}%, about ${bloom.expectedFlowers.count} flowers.`;
}

/** How far this plant's earlier forecasts were off, in words. */
export function trustSummary(forecast: LeadForecastResponse): string {
  const t = forecast.trust;
  if (t.n === 0 || t.medianAbsErrorDays === null) return 'Not enough history yet to check the forecasts for this plant.';
  const inside = t.shareInside80 === null ? '' : `; ${Math.round(t.shareInside80 * 5)} in 5 fell inside the window`;
  const memory =
    t.naive.medianAbsErrorDays === null
      ? ''
      : ` Expecting last season's date would have been off by ${Math.round(t.naive.medianAbsErrorDays)} days${t.beatsNaive === false ? ', so trust your memory as much as this forecast' : ''}.`;
  return `Last seasons' forecasts for this plant were off by a median of ${Math.round(t.medianAbsErrorDays)} days${inside}.${memory}`;
}

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
