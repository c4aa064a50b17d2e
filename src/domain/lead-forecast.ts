/**
 * One call for everything the lead page shows: growth curve, comparison with earlier seasons,
 * flags and bloom window, computed consistently from the same inputs.
 */
import { earlierLeadShapes } from './attention';
import { forecastBloom, type BloomForecast, type BloomHistory } from './bloom-window';
import { leadFlags, type LeadFlag } from './flags';
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import { fitLeadCurve, type LeadCurveFit, type LeadShape } from './growth-curve';
import { compareWithPriorYears, type PriorYearsComparison } from './prior-years';
import type { IsoDate, Plant, TemperatureReading } from './types';

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
 * cached list to save the work). Returns null when the lead is not among `leads`.
 */
export function forecastLead(input: {
  plant: Plant;
  leads: readonly BloomHistory[];
  leadId: string;
  today: IsoDate;
  genusDefaults?: GenusDefaults;
  priorShapes?: readonly LeadShape[];
  readings?: readonly TemperatureReading[];
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
  });
  return { leadId: current.lead.id, fit, priorYears, flags, bloom };
}
