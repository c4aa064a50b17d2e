/**
 * Today's attention list for a collection: leads due for measuring, stalled or aborted leads,
 * sheaths to check, and bloom windows opening soon — each with its reason and a link target.
 */
import type { BloomHistory } from './bloom-window';
import { addDays, daysBetween, isIsoDate } from './dates';
import { countOnOrBefore, datedMeasurements } from './dated-measurements';
import type { LeadFlag } from './flags';
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import { formatDate, type LengthUnit } from './words';
import type { LeadShape } from './growth-curve';
import { earlierLeadShapes, forecastLead, storyOf } from './lead-forecast';
import { uncertainWindow, type LeadStory } from './story';
import type { IsoDate, Measurement, Plant } from './types';

export { earlierLeadShapes, SHAPE_SEASONS } from './lead-forecast';

/** A growing lead is due for measuring after this many days — common practice (a round every two weeks). */
export const MEASURE_EVERY_DAYS = 14;
/** A forming or empty sheath is due for a look after this many days — common practice (weekly). */
export const SHEATH_CHECK_DAYS = 7;
/** Bloom windows whose earliest date falls within this many days are listed. */
export const BLOOM_LOOKAHEAD_DAYS = 14;
/** Bloom windows less likely than this are left off the list (chosen). */
export const BLOOM_MIN_CHANCE = 0.2;
export type AttentionKind = 'aborted' | 'stalled' | 'sheath' | 'bloom' | 'measure';

export interface AttentionItem {
  kind: AttentionKind;
  /** Where the item links to. */
  target: { plantId: string; leadId: string };
  reason: string;
  /** The date the item is about (bloom window start, last measurement, …), if any. */
  date: IsoDate | null;
  flag?: LeadFlag;
  /** The lead's one story (`leadStory`), the same as every other screen's. */
  story: LeadStory;
}

export interface AttentionPlant {
  plant: Plant;
  leads: readonly BloomHistory[];
  /** Fitted shapes of the plant's earlier leads; computed here when absent. */
  priorShapes?: readonly LeadShape[];
}

export interface AttentionOptions {
  measureEveryDays?: number;
  sheathCheckDays?: number;
  bloomLookaheadDays?: number;
  genusDefaults?: (genus: string) => GenusDefaults;
  /** The collection's season start month (a lead two growth years old gets no forecast). */
  seasonStartMonth?: number;
  /** Unit the stories write lengths in (default mm). */
  units?: LengthUnit;
}

const ORDER: Record<AttentionKind, number> = { aborted: 0, stalled: 1, sheath: 2, bloom: 3, measure: 4 };

/** The lead's latest look on or before today (the first in the list of several on that day). */
function latestMeasurement(h: BloomHistory, today: IsoDate): Measurement | null {
  const dated = datedMeasurements(h.measurements, h.lead.id);
  const ms = dated.ms;
  let i = countOnOrBefore(dated, today) - 1;
  if (i < 0) return null;
  while (i > 0 && ms[i - 1].date === ms[i].date) i--;
  return ms[i];
}

/**
 * The attention list for `today`, most urgent first (aborted, stalled, sheaths, bloom windows
 * by the date they open, measuring), then by plant and lead id. Only each plant's current leads are considered: its own
 * leads (`plantId` the plant's; a division's inherited parent leads only inform the forecasts) of
 * its latest season, and any own lead still growing. Each lead goes through `forecastLead`, so the
 * flags, chance and flower count are those of the lead page. Items:
 * - measure: a growing lead with no measurement in `measureEveryDays` (counted from first seen
 *   when never measured);
 * - aborted / stalled: `leadFlags` for the lead;
 * - sheath: the latest measurement shows a forming or empty sheath, no buds recorded, and it is at
 *   least `sheathCheckDays` old;
 * - bloom: the bloom window's earliest date (10th percentile) falls between today and
 *   `bloomLookaheadDays` ahead, for a lead not yet in flower (a late one included) whose window is
 *   narrow enough to plan with (`uncertainWindow`); its reason is the story's bloom sentence.
 * Every item carries the lead's story, so what Today says of a lead is what its page says.
 */
export function attentionList(plants: readonly AttentionPlant[], today: IsoDate, options: AttentionOptions = {}): AttentionItem[] {
  const measureEvery = options.measureEveryDays ?? MEASURE_EVERY_DAYS;
  const sheathEvery = options.sheathCheckDays ?? SHEATH_CHECK_DAYS;
  const lookahead = options.bloomLookaheadDays ?? BLOOM_LOOKAHEAD_DAYS;
  const horizon = addDays(today, lookahead);
  const items: AttentionItem[] = [];

  const units = options.units ?? 'mm';
  for (const { plant, leads, priorShapes } of plants) {
    const genus = (options.genusDefaults ?? genusDefaultsFor)(plant.genus);
    // Only the plant's own leads are its current leads: a division's history also holds its
    // parent's leads (another plantId), which inform the forecasts but are not reported here.
    const visible = leads.filter((h) => h.lead.plantId === plant.id && isIsoDate(h.lead.firstSeen) && h.lead.firstSeen <= today);
    if (visible.length === 0) continue;
    const latestSeason = Math.max(...visible.map((h) => h.lead.season));
    const shapesBySeason = new Map<number, readonly LeadShape[]>();
    const shapesFor = (season: number): readonly LeadShape[] => {
      if (priorShapes) return priorShapes;
      let shapes = shapesBySeason.get(season);
      if (!shapes) {
        shapes = earlierLeadShapes(leads, genus, season, today);
        shapesBySeason.set(season, shapes);
      }
      return shapes;
    };
    for (const h of visible) {
      const lead = h.lead;
      if (lead.status === 'removed') continue;
      if (lead.season !== latestSeason && lead.status !== 'growing') continue;
      const target = { plantId: plant.id, leadId: lead.id };
      const last = latestMeasurement(h, today);

      // The same per-lead forecast and story as the lead page.
      const forecast = forecastLead({
        plant,
        leads,
        leadId: lead.id,
        today,
        genusDefaults: genus,
        priorShapes: shapesFor(lead.season),
        seasonStartMonth: options.seasonStartMonth,
      });
      if (!forecast) continue;
      const story = storyOf(h, forecast, today, units);

      if (lead.status === 'growing') {
        const since = last ? last.date : lead.firstSeen;
        const days = daysBetween(since, today);
        if (days >= measureEvery) {
          items.push({
            kind: 'measure',
            target,
            date: last?.date ?? null,
            reason: last
              ? `no measurement in ${days} days (measure every ${measureEvery})`
              : `first seen ${days} days ago and not measured yet`,
            story,
          });
        }
      }

      for (const flag of forecast.flags) {
        items.push({ kind: flag.kind, target, date: flag.stalledSince, reason: flag.reason, flag, story });
      }

      const budsOrOpen = forecast.bloom.stage === 'buds_in_sheath' || forecast.bloom.stage === 'buds_visible' || Boolean(h.bloom?.firstOpen);
      if (last && (last.sheath === 'forming' || last.sheath === 'empty') && !budsOrOpen && lead.status !== 'dried_off' && lead.status !== 'rotted' && genus.bloomHabit !== 'no_sheath') {
        const days = daysBetween(last.date, today);
        if (days >= sheathEvery) {
          items.push({
            kind: 'sheath',
            target,
            date: last.date,
            reason: `sheath ${last.sheath} at the last look, ${formatDate(last.date)} (${days} days ago): check for buds against the light`,
            story,
          });
        }
      }

      // Bloom windows that open soon, dated well enough to plan with; a late lead stays on the list.
      const f = forecast.bloom;
      if ((f.timing === 'forecast' || f.timing === 'late') && f.firstOpen && !uncertainWindow(f.firstOpen)) {
        if (f.firstOpen.p10 >= today && f.firstOpen.p10 <= horizon && f.chance >= BLOOM_MIN_CHANCE) {
          items.push({ kind: 'bloom', target, date: f.firstOpen.p10, reason: story.bloom, story });
        }
      }
    }
  }

  return items.sort(
    (a, b) =>
      ORDER[a.kind] - ORDER[b.kind] ||
      (a.kind === 'bloom' && a.date && b.date ? (a.date < b.date ? -1 : a.date > b.date ? 1 : 0) : 0) ||
      a.target.plantId.localeCompare(b.target.plantId) ||
      a.target.leadId.localeCompare(b.target.leadId),
  );
}
