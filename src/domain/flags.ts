/**
 * Stalled and aborted leads. A lead is *stalled* when, over at least `STALL_MIN_DAYS`, it has
 * gained far less height than the plant's reference curve expects from its height, while it is
 * still well under last season's size and shows no sheath. It is *aborted* when the grower marked
 * it dried off or rotted, when a stall outlasts the genus limit (`GenusDefaults.stallAbortDays`),
 * or when the plant started a new lead after the stall began.
 *
 * Detection delay (documented for the scenario tests): a lead whose height stops rising is flagged
 * stalled at the first measurement at least `STALL_MIN_DAYS` after the measurement where it
 * stopped, i.e. within STALL_MIN_DAYS plus one measuring interval; aborted likewise within
 * `stallAbortDays` plus one interval.
 */
import { median } from 'simple-statistics';
import { daysBetween, isIsoDate } from './dates';
import { countOnOrBefore, datedMeasurements, usableHeight } from './dated-measurements';
import type { GenusDefaults } from './genus-defaults';
import { dayAtHeight, logisticHeight, type LeadShape } from './growth-curve';
import { expectedSmaller, tallestHeight, type LeadHistory } from './prior-years';
import type { IsoDate, Plant } from './types';

/** Shortest stretch without gain that can count as a stall, days — common practice (three weekly rounds). */
export const STALL_MIN_DAYS = 21;
/** A stall means less than this share of the expected gain — common practice. */
export const STALL_GAIN_SHARE = 0.25;
/** Heights within this of the latest count as "no gain" (ruler noise), mm — common practice. */
export const STALL_TOLERANCE_MM = 2;
/** …or within this share of the latest height, whichever is larger — common practice. */
export const STALL_TOLERANCE_SHARE = 0.03;
/** Only when the reference curve expects at least this gain over the stretch, mm — common practice. */
export const STALL_MIN_EXPECTED_GAIN_MM = 10;
/** Leads shorter than this are not judged: a new eye under about 1 cm is hard to measure to the millimetre — common practice. */
export const STALL_MIN_HEIGHT_MM = 10;
/** "Well under last season's size": below this share of last season's tallest lead — common practice. */
export const WELL_UNDER_SHARE = 0.8;
/** First leads after a division or from a back bulb are judged against this share of last season's size (common practice, from memory). */
export const EXPECTED_SMALLER_ALLOWANCE = 0.6;

export type FlagKind = 'stalled' | 'aborted';
export type FlagSeverity = 'warning' | 'alert';

export interface LeadFlag {
  kind: FlagKind;
  severity: FlagSeverity;
  /** The reason in numbers, e.g. "no height gain in 35 days at 48% of last season's size". */
  reason: string;
  plantId: string;
  leadId: string;
  /** Date of the measurement from which the height stopped rising, if a stall. */
  stalledSince: IsoDate | null;
  /** Days without gain, up to the latest measurement. */
  stallDays: number | null;
  /** Latest height ÷ reference size (last season's tallest lead, else the typical size). */
  shareOfReference: number | null;
}

export interface FlagInput {
  current: LeadHistory;
  /** All leads of the plant with their measurements (the current one may be included). */
  plantLeads: readonly LeadHistory[];
  plant: Pick<Plant, 'id' | 'dividedOn' | 'genus'>;
  genusDefaults: GenusDefaults;
  /** Shapes fitted to the plant's earlier leads; genus shape when absent. */
  priorShapes?: readonly LeadShape[];
  today: IsoDate;
}

function pct(x: number): string {
  return `${Math.round(x * 100)}%`;
}

/**
 * Flags for one lead on `today` (no flags for leads the grower removed, or that are mature,
 * or without measurements, except the grower's own dried-off / rotted marks).
 *
 * Reference size: the tallest measured height of the plant's largest lead of the latest earlier
 * season, else the median mature height of `priorShapes`, else the genus typical height; for a
 * back-bulb lead or the first lead after a division it is scaled by EXPECTED_SMALLER_ALLOWANCE.
 * Reference curve: that size with the median earlier-lead shape (else the genus shape); the
 * expected gain is read from it starting at the lead's own height (so a lead that is merely late
 * is not called stalled).
 */
export function leadFlags(input: FlagInput): LeadFlag[] {
  const { current, plant, genusDefaults: genus, today } = input;
  const lead = current.lead;
  const dated = datedMeasurements(current.measurements, lead.id);
  const pts = dated.ms.slice(0, countOnOrBefore(dated, today)).filter(usableHeight);

  const earlier = input.plantLeads.filter((h) => h.lead.season < lead.season && h.lead.id !== lead.id);
  const lastSeasonNo = earlier.length ? Math.max(...earlier.map((h) => h.lead.season)) : null;
  const lastSeasonTallest =
    lastSeasonNo === null
      ? null
      : earlier
          .filter((h) => h.lead.season === lastSeasonNo)
          .map((h) => tallestHeight(h, today))
          .reduce<number | null>((best, v) => (v !== null && (best === null || v > best) ? v : best), null);
  const priorHeights = (input.priorShapes ?? []).map((s) => s.matureHeightMm).filter((v): v is number => typeof v === 'number' && v > 0);
  let referenceMm = lastSeasonTallest ?? (priorHeights.length ? median(priorHeights) : genus.matureHeightMm);
  const referenceName =
    lastSeasonTallest !== null ? "last season's final size" : priorHeights.length ? "the plant's usual size" : `the usual ${genus.genus} size`;
  const smallerReason = expectedSmaller(lead, plant, input.plantLeads.map((h) => h.lead));
  if (smallerReason) referenceMm *= EXPECTED_SMALLER_ALLOWANCE;

  const latest = pts.length ? pts[pts.length - 1] : null;
  const share = latest && referenceMm > 0 ? latest.heightMm / (smallerReason ? referenceMm / EXPECTED_SMALLER_ALLOWANCE : referenceMm) : null;
  const sizeText = share !== null ? ` at ${pct(share)} of ${referenceName}` : '';
  const base = { plantId: plant.id, leadId: lead.id };

  if (lead.status === 'dried_off' || lead.status === 'rotted') {
    const what = lead.status === 'dried_off' ? 'dried off' : 'rotted';
    return [
      {
        ...base,
        kind: 'aborted',
        severity: 'alert',
        reason: `marked ${what} by the grower${latest ? ` at ${latest.heightMm} mm` : ''}${sizeText}`,
        stalledSince: null,
        stallDays: null,
        shareOfReference: share,
      },
    ];
  }
  if (lead.status !== 'growing' || !latest || pts.length < 2) return [];
  if (latest.sheath !== 'none') return [];

  // Earliest measurement from which the height stayed within tolerance of the latest.
  const tolerance = Math.max(STALL_TOLERANCE_MM, STALL_TOLERANCE_SHARE * latest.heightMm);
  let sinceIdx = pts.length - 1;
  while (sinceIdx > 0 && pts[sinceIdx - 1].heightMm >= latest.heightMm - tolerance) sinceIdx--;
  const since = pts[sinceIdx];
  const stallDays = daysBetween(since.date, latest.date);
  if (stallDays < STALL_MIN_DAYS) return [];

  const limitHeight = WELL_UNDER_SHARE * referenceMm;
  if (!(latest.heightMm < limitHeight) || latest.heightMm < STALL_MIN_HEIGHT_MM) return [];

  const shapes = (input.priorShapes ?? []).filter((s) => Number.isFinite(s.midpointDays) && s.scaleDays > 0);
  const m = shapes.length ? median(shapes.map((s) => s.midpointDays)) : genus.midpointDays;
  const s = shapes.length ? median(shapes.map((x) => x.scaleDays)) : genus.scaleDays;
  const sinceAge = daysBetween(lead.firstSeen, since.date);
  // Expected gain is read from the reference curve starting where it has the lead's height
  // (floored at 1 mm so a zero reading does not pin the start to the lead's age).
  const tau = dayAtHeight(Math.max(since.heightMm, 1), referenceMm, m, s) ?? sinceAge;
  if (tau === null) return [];
  const expectedGain = logisticHeight(tau + stallDays, referenceMm, m, s) - logisticHeight(tau, referenceMm, m, s);
  const observedGain = latest.heightMm - since.heightMm;
  if (expectedGain < STALL_MIN_EXPECTED_GAIN_MM || observedGain >= STALL_GAIN_SHARE * expectedGain) return [];

  const gainText = observedGain > 0.5 ? `${observedGain.toFixed(0)} mm height gain` : 'no height gain';
  const reasonCore = `${gainText} in ${stallDays} days (about ${expectedGain.toFixed(0)} mm expected)${sizeText}`;
  const note = smallerReason ? '; first lead after a division or from a back bulb, judged against a smaller size' : '';
  const common = { ...base, stalledSince: since.date, stallDays, shareOfReference: share };

  const replacement = input.plantLeads
    .map((h) => h.lead)
    .filter((l) => l.id !== lead.id && l.status !== 'removed' && isIsoDate(l.firstSeen) && l.firstSeen > since.date && l.firstSeen <= today)
    .sort((a, b) => (a.firstSeen < b.firstSeen ? -1 : 1))[0];
  if (replacement) {
    return [
      {
        ...common,
        kind: 'aborted',
        severity: 'alert',
        reason: `${reasonCore}, and the plant started lead ${replacement.label} on ${replacement.firstSeen}${note}`,
      },
    ];
  }
  if (stallDays >= genus.stallAbortDays) {
    return [
      {
        ...common,
        kind: 'aborted',
        severity: 'alert',
        reason: `${reasonCore}, past the ${genus.stallAbortDays}-day limit for ${genus.genus === '*' ? 'this genus' : genus.genus}${note}`,
      },
    ];
  }
  return [{ ...common, kind: 'stalled', severity: 'warning', reason: `${reasonCore}${note}` }];
}
