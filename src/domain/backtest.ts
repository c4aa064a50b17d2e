/**
 * Self-check: leave-one-season-out backtest of the first-flower forecast over a collection's own
 * history, by the stage the lead was at when the forecast was made, against the naive forecast
 * "same day of the season as the last bloom".
 */
import { median } from 'simple-statistics';
import { budsInSheathOn, budsVisibleOn, flowersFromSheath } from './bloom-stage';
import { forecastBloom, forecastStageOf, maturedOn, MATURE_HEIGHT_SHARE, type BloomHistory, type ForecastStage } from './bloom-window';
import { countOnOrBefore, datedMeasurements, usableHeight } from './dated-measurements';
import { daysBetween, isIsoDate, shiftYears } from './dates';
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import { fitLeadCurve } from './growth-curve';
import { earlierLeadShapes } from './lead-forecast';
import type { IsoDate, Plant } from './types';

export const FORECAST_STAGES: readonly ForecastStage[] = ['growing', 'mature', 'sheath', 'buds'];

/** A growing lead is tested as of its first look at half its final height or more (chosen: the middle of its growth). */
export const GROWING_TEST_SHARE = 0.5;

export interface BacktestRow {
  plantId: string;
  leadId: string;
  season: number;
  /** The stage the lead was at on `asOf`, when the forecast was made. */
  stage: ForecastStage;
  /** Made on the day the lead matured (`maturedOn`): the headline figures' forecasts. */
  atMaturity: boolean;
  asOf: IsoDate;
  actual: IsoDate;
  /** Forecast made on `asOf`, with that season left out of the history. */
  forecast: { p10: IsoDate; p50: IsoDate; p90: IsoDate };
  /** Forecast median minus actual, days (positive: forecast too late). */
  signedErrorDays: number;
  errorDays: number;
  inside80: boolean;
  /** Same month and day as the plant's latest earlier first flower, moved to this season. */
  naive: IsoDate | null;
  naiveErrorDays: number | null;
}

export interface BacktestFigures {
  /** Seasons tested. */
  n: number;
  medianAbsErrorDays: number | null;
  /** Share of actual dates inside the forecast's 80% window (10th–90th percentile). */
  shareInside80: number | null;
  naive: { n: number; medianAbsErrorDays: number | null };
  /** On the seasons both forecasts cover: is the model's median error smaller than the naive one's? */
  beatsNaive: boolean | null;
}

export interface BacktestSummary extends BacktestFigures {
  /** The headline figures are those of forecasts made on the day the lead matured (`maturedOn`). */
  byStage: Record<ForecastStage, BacktestFigures>;
  rows: BacktestRow[];
}

export interface BacktestPlant {
  plant: Pick<Plant, 'id' | 'genus'>;
  /** The plant's leads with measurements and bloom records. */
  leads: readonly BloomHistory[];
}

/** Figures over a set of rows. */
export function backtestFigures(rows: readonly BacktestRow[]): BacktestFigures {
  const paired = rows.filter((r) => r.naiveErrorDays !== null);
  const naiveErrors = paired.map((r) => r.naiveErrorDays!);
  return {
    n: rows.length,
    medianAbsErrorDays: rows.length ? median(rows.map((r) => r.errorDays)) : null,
    shareInside80: rows.length ? rows.filter((r) => r.inside80).length / rows.length : null,
    naive: { n: paired.length, medianAbsErrorDays: naiveErrors.length ? median(naiveErrors) : null },
    beatsNaive: paired.length ? median(paired.map((r) => r.errorDays)) < median(naiveErrors) : null,
  };
}

/** The plant's held-out errors (forecast minus actual, days) by stage, as `forecastBloom` takes them. */
export function heldOutErrorsByStage(rows: readonly BacktestRow[]): Partial<Record<ForecastStage, number[]>> {
  const out: Partial<Record<ForecastStage, number[]>> = {};
  for (const r of rows) (out[r.stage] ??= []).push(r.signedErrorDays);
  return out;
}

interface StageCut {
  stage: ForecastStage;
  asOf: IsoDate;
}

/**
 * The days a finished lead is tested on, one per stage it went through before its first flower:
 * growing (its first look at GROWING_TEST_SHARE of its final height, before it matured); bulb
 * mature (a genus without a sheath: the day it matured; a sheathed genus: the first look at full
 * height before any sheath); sheath (the first look showing one); buds (recorded as visible, or
 * else first found in the sheath).
 */
function stageCuts(target: BloomHistory, genus: GenusDefaults, actual: IsoDate): StageCut[] {
  const dated = datedMeasurements(target.measurements, target.lead.id);
  const ms = dated.ms.slice(0, countOnOrBefore(dated, actual)).filter(usableHeight);
  const cuts: StageCut[] = [];
  const matured = maturedOn(target, genus, actual);
  let tallest = 0;
  for (const m of ms) tallest = Math.max(tallest, m.heightMm);
  const sheathed = flowersFromSheath(genus);
  const firstSheath = sheathed ? (ms.find((m) => m.sheath !== 'none')?.date ?? null) : null;
  const halfway = ms.find((m) => m.heightMm >= GROWING_TEST_SHARE * tallest)?.date ?? null;
  const grownBy = firstSheath ?? matured;
  if (halfway && grownBy && halfway < grownBy) cuts.push({ stage: 'growing', asOf: halfway });
  if (!sheathed) {
    if (matured && matured <= actual) cuts.push({ stage: 'mature', asOf: matured });
  } else {
    const fullHeight = ms.find((m) => m.heightMm >= MATURE_HEIGHT_SHARE * tallest)?.date ?? null;
    if (fullHeight && (firstSheath === null || fullHeight < firstSheath)) cuts.push({ stage: 'mature', asOf: fullHeight });
    if (firstSheath) cuts.push({ stage: 'sheath', asOf: firstSheath });
  }
  const buds = budsVisibleOn(target.bloom, actual) ?? budsInSheathOn(ms, genus, actual);
  if (buds && buds < actual) cuts.push({ stage: 'buds', asOf: buds });
  return cuts;
}

/**
 * Leave-one-season-out backtest. For each lead with a recorded first-open date, the bloom window
 * is forecast as of each stage it went through (`stageCuts`) from the plant's other seasons only,
 * with what was not known yet hidden (later looks, and the bloom record but for buds seen by
 * then), and compared with the actual date; a growing lead gets its growth fit as of that day, with
 * the shapes of the plant's other earlier leads. The naive forecast takes the plant's latest
 * earlier first-open date and moves it to this season (same month and day). The headline figures
 * are the forecasts made on the day the lead matured (`maturedOn`: its first sheath, or full
 * height for a genus without one). `genusDefaults` overrides the lookup by abbreviation. Only
 * leads whose `plantId` is the plant's own are scored (a division's inherited parent leads count
 * as history only, so a parent's season is never scored twice).
 */
export function backtestBloomForecasts(
  plants: readonly BacktestPlant[],
  genusDefaults?: (genus: string) => GenusDefaults,
): BacktestSummary {
  const rows: BacktestRow[] = [];
  for (const { plant, leads } of plants) {
    const genus = (genusDefaults ?? genusDefaultsFor)(plant.genus);
    for (const target of leads) {
      if (target.lead.plantId !== plant.id) continue;
      const actual = target.bloom?.firstOpen;
      if (!actual || !isIsoDate(actual)) continue;
      const others = leads.filter((h) => h.lead.season !== target.lead.season);
      const earlierOpen = others
        .filter((h) => h.lead.season < target.lead.season && h.bloom?.firstOpen && isIsoDate(h.bloom.firstOpen))
        .sort((a, b) => b.lead.season - a.lead.season)[0];
      const naive = earlierOpen ? shiftYears(earlierOpen.bloom!.firstOpen!, target.lead.season - earlierOpen.lead.season) : null;
      const matured = maturedOn(target, genus);
      for (const cut of stageCuts(target, genus, actual)) {
        const growing = cut.stage === 'growing';
        const budsSeen = target.bloom?.budsSeen && target.bloom.budsSeen <= cut.asOf ? target.bloom.budsSeen : null;
        const hidden: BloomHistory = {
          lead: { ...target.lead, status: growing ? 'growing' : 'mature' },
          measurements: target.measurements.filter((m) => m.date <= cut.asOf),
          bloom: budsSeen ? { leadId: target.lead.id, budsSeen, firstOpen: null, lastFaded: null, flowerCount: null, spikeCount: null } : null,
        };
        const fit = growing
          ? fitLeadCurve(hidden.measurements, hidden.lead, { genusDefaults: genus, priorShapes: earlierLeadShapes(others, genus, target.lead.season, cut.asOf), today: cut.asOf })
          : null;
        const f = forecastBloom({ current: hidden, history: others, genusDefaults: genus, today: cut.asOf, fit });
        if (!f.firstOpen) continue;
        // The stage the engine itself saw on that day decides the row's stage.
        const seen = forecastStageOf(f.stage) ?? cut.stage;
        const signed = daysBetween(actual, f.firstOpen.p50);
        const row: BacktestRow = {
          plantId: plant.id,
          leadId: target.lead.id,
          season: target.lead.season,
          stage: seen,
          atMaturity: matured !== null && cut.asOf === matured && !growing,
          asOf: cut.asOf,
          actual,
          forecast: f.firstOpen,
          signedErrorDays: signed,
          errorDays: Math.abs(signed),
          inside80: f.firstOpen.p10 <= actual && actual <= f.firstOpen.p90,
          naive,
          naiveErrorDays: naive ? Math.abs(daysBetween(actual, naive)) : null,
        };
        rows.push(row);
      }
    }
  }
  return summarizeBacktest(rows);
}

/** Headline figures (forecasts made at maturity), figures by stage, and the rows. */
export function summarizeBacktest(rows: BacktestRow[]): BacktestSummary {
  const byStage = Object.fromEntries(FORECAST_STAGES.map((s) => [s, backtestFigures(rows.filter((r) => r.stage === s))])) as Record<ForecastStage, BacktestFigures>;
  return { ...backtestFigures(rows.filter((r) => r.atMaturity)), byStage, rows };
}
