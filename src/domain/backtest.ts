/**
 * Self-check: leave-one-season-out backtest of the first-flower forecast over a collection's own
 * history, against the naive forecast "same day of the season as the last bloom".
 */
import { median } from 'simple-statistics';
import { forecastBloom, maturedOn, type BloomHistory } from './bloom-window';
import { daysBetween, isIsoDate, shiftYears } from './dates';
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import type { IsoDate, Plant } from './types';

export interface BacktestRow {
  plantId: string;
  leadId: string;
  season: number;
  actual: IsoDate;
  /** Forecast made on the day the lead matured, with that season left out of the history. */
  forecast: { p10: IsoDate; p50: IsoDate; p90: IsoDate };
  errorDays: number;
  inside80: boolean;
  /** Same month and day as the plant's latest earlier first flower, moved to this season. */
  naive: IsoDate | null;
  naiveErrorDays: number | null;
}

export interface BacktestSummary {
  /** Seasons tested (a matured lead with a recorded first flower). */
  n: number;
  medianAbsErrorDays: number | null;
  /** Share of actual dates inside the forecast's 80% window (10th–90th percentile). */
  shareInside80: number | null;
  naive: { n: number; medianAbsErrorDays: number | null };
  /** On the seasons both forecasts cover: is the model's median error smaller than the naive one's? */
  beatsNaive: boolean | null;
  rows: BacktestRow[];
}

export interface BacktestPlant {
  plant: Pick<Plant, 'id' | 'genus'>;
  /** The plant's leads with measurements and bloom records. */
  leads: readonly BloomHistory[];
}

/**
 * Leave-one-season-out backtest. For each lead with a maturity date (`maturedOn`) and a recorded
 * first-open date, the bloom window is forecast as of its maturity date from the plant's other
 * seasons only (the lead's own bloom record hidden), and compared with the actual date. The naive
 * forecast takes the plant's latest earlier first-open date and moves it to this season (same
 * month and day). Errors are absolute days. `genusDefaults` overrides the lookup by abbreviation.
 * Only leads whose `plantId` is the plant's own are scored (a division's inherited parent leads
 * count as history only, so a parent's season is never scored twice).
 */
export function backtestBloomForecasts(
  plants: readonly BacktestPlant[],
  genusDefaults?: (genus: string) => GenusDefaults,
): BacktestSummary {
  const rows: BacktestRow[] = [];
  for (const { plant, leads } of plants) {
    const genus = (genusDefaults ?? genusDefaultsFor)(plant.genus);
    for (const target of leads) {
      // Seasons are scored only on the plant's own leads: a division's inherited parent leads
      // (another plantId) inform its forecasts but are the parent's seasons, scored there.
      if (target.lead.plantId !== plant.id) continue;
      const actual = target.bloom?.firstOpen;
      if (!actual || !isIsoDate(actual)) continue;
      const matured = maturedOn(target, genus);
      if (!matured || matured > actual) continue;
      const others = leads.filter((h) => h.lead.season !== target.lead.season);
      const hidden: BloomHistory = {
        lead: { ...target.lead, status: target.lead.status === 'growing' ? 'growing' : 'mature' },
        measurements: target.measurements.filter((m) => m.date <= matured),
        bloom: null,
      };
      const f = forecastBloom({ current: hidden, history: others, genusDefaults: genus, today: matured });
      if (!f.firstOpen) continue;
      const earlierOpen = others
        .filter((h) => h.lead.season < target.lead.season && h.bloom?.firstOpen && isIsoDate(h.bloom.firstOpen))
        .sort((a, b) => b.lead.season - a.lead.season)[0];
      const naive = earlierOpen ? shiftYears(earlierOpen.bloom!.firstOpen!, target.lead.season - earlierOpen.lead.season) : null;
      rows.push({
        plantId: plant.id,
        leadId: target.lead.id,
        season: target.lead.season,
        actual,
        forecast: f.firstOpen,
        errorDays: Math.abs(daysBetween(actual, f.firstOpen.p50)),
        inside80: f.firstOpen.p10 <= actual && actual <= f.firstOpen.p90,
        naive,
        naiveErrorDays: naive ? Math.abs(daysBetween(actual, naive)) : null,
      });
    }
  }
  const errors = rows.map((r) => r.errorDays);
  const paired = rows.filter((r) => r.naiveErrorDays !== null);
  const naiveErrors = paired.map((r) => r.naiveErrorDays!);
  return {
    n: rows.length,
    medianAbsErrorDays: errors.length ? median(errors) : null,
    shareInside80: rows.length ? rows.filter((r) => r.inside80).length / rows.length : null,
    naive: { n: paired.length, medianAbsErrorDays: naiveErrors.length ? median(naiveErrors) : null },
    beatsNaive: paired.length ? median(paired.map((r) => r.errorDays)) < median(naiveErrors) : null,
    rows,
  };
}
