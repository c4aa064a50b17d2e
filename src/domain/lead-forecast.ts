/**
 * One call for everything the lead page shows: growth curve, comparison with earlier seasons,
 * flags and bloom window, computed consistently from the same inputs.
 */
import type { LengthUnit } from './words';
import { backtestBloomForecasts, type BacktestSummary } from './backtest';
import { forecastBloom, forecastStageOf, type BloomForecast, type BloomHistory } from './bloom-window';
import { leadStory, trustWords, type LeadStory } from './story';
import { seasonOf } from './dates';
import { leadFlags, type LeadFlag } from './flags';
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import { fitAsOfLastMeasurement, fitLeadCurve, type LeadCurveFit, type LeadShape } from './growth-curve';
import { compareWithPriorYears, type PriorYearsComparison } from './prior-years';
import type { IsoDate, Plant, TemperatureReading } from './types';

/** Earlier leads fitted for a plant's shape (the most recent seasons), to bound the work. */
export const SHAPE_SEASONS = 3;

/**
 * Shapes (midpoint, scale, mature height) of a plant's finished earlier leads that support a free
 * logistic fit, from the `SHAPE_SEASONS` most recent seasons before `beforeSeason`.
 */
export function earlierLeadShapes(leads: readonly BloomHistory[], genus: GenusDefaults, beforeSeason: number, today: IsoDate): LeadShape[] {
  const seasons = [...new Set(leads.map((h) => h.lead.season).filter((s) => s < beforeSeason))].sort((a, b) => b - a).slice(0, SHAPE_SEASONS);
  const shapes: LeadShape[] = [];
  for (const h of leads) {
    if (!seasons.includes(h.lead.season) || h.lead.status === 'growing') continue;
    // The curve as of the lead's last measurement is the one fitted on `today` (same points),
    // and is shared with the maturity dates the bloom forecast reads.
    const fit = fitAsOfLastMeasurement(h.measurements, h.lead, genus, today);
    if (fit && fit.method === 'free') shapes.push({ midpointDays: fit.midpointDays, scaleDays: fit.scaleDays, matureHeightMm: fit.matureHeightMm });
  }
  return shapes;
}

/**
 * The plant's self-check (`backtestBloomForecasts`) on its own leads, the history it inherits
 * counting as history only: the headline figures and those by stage, for its trust line.
 */
export function plantTrust(plant: Pick<Plant, 'id' | 'genus'>, leads: readonly BloomHistory[], genus?: GenusDefaults): Omit<BacktestSummary, 'rows'> {
  const { rows: _rows, ...figures } = backtestBloomForecasts([{ plant, leads }], genus ? () => genus : undefined);
  return figures;
}

/** The trust line of a lead: how far its plant's past forecasts made at the lead's stage were off. */
export function trustSentence(forecast: LeadForecast, trust: Omit<BacktestSummary, 'rows'>): string {
  const stage = forecastStageOf(forecast.bloom.stage);
  return trustWords(stage, stage ? trust.byStage[stage] : null);
}

/** The story of a forecast lead (`leadStory`). */
export function storyOf(h: Pick<BloomHistory, 'lead'>, forecast: LeadForecast, today: IsoDate, units: LengthUnit): LeadStory {
  return leadStory({ lead: h.lead, forecast, today, units });
}

export interface LeadForecast {
  leadId: string;
  fit: LeadCurveFit;
  priorYears: PriorYearsComparison;
  flags: LeadFlag[];
  bloom: BloomForecast;
}

/**
 * Forecast for the lead `leadId` of `plant` on `today`. `leads` are all the plant's leads with
 * their measurements and bloom records (the division's parent history included, if the caller
 * wants it counted). Earlier-lead shapes are fitted here unless `priorShapes` is given (pass a
 * cached list to save the work). Returns null when the lead is not among `leads`. The bloom
 * forecast takes the lead's flags, so a lead aborted by a stall gets no bloom window.
 */
export function forecastLead(input: {
  plant: Plant;
  leads: readonly BloomHistory[];
  leadId: string;
  today: IsoDate;
  genusDefaults?: GenusDefaults;
  priorShapes?: readonly LeadShape[];
  readings?: readonly TemperatureReading[];
  /** The collection's season start month: a lead two or more growth years old gets no forecast. */
  seasonStartMonth?: number;
}): LeadForecast | null {
  const current = input.leads.find((h) => h.lead.id === input.leadId);
  if (!current) return null;
  const genus = input.genusDefaults ?? genusDefaultsFor(input.plant.genus);
  const shapes = input.priorShapes ?? earlierLeadShapes(input.leads, genus, current.lead.season, input.today);
  const fit = fitLeadCurve(current.measurements, current.lead, { genusDefaults: genus, priorShapes: shapes, today: input.today });
  const priorYears = compareWithPriorYears({ current, plant: input.plant, plantLeads: input.leads, today: input.today });
  const flags = leadFlags({ current, plantLeads: input.leads, plant: input.plant, genusDefaults: genus, priorShapes: shapes, today: input.today });
  const bloom = forecastBloom({
    current,
    history: input.leads.filter((h) => h.lead.season !== current.lead.season),
    genusDefaults: genus,
    fit,
    today: input.today,
    readings: input.readings,
    flags,
    currentSeason: input.seasonStartMonth === undefined ? undefined : seasonOf(input.today, input.seasonStartMonth),
  });
  return { leadId: current.lead.id, fit, priorYears, flags, bloom };
}
