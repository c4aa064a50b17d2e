/**
 * The bloom path of a lead as stages a grower can see, per genus. A sheathed genus (the
 * Cattleya alliance, Brassavola) goes growing → bulb mature → sheath forming → buds in the sheath
 * → buds or spike visible → in flower → faded, with two side states on the way: an empty sheath
 * (no buds against the light) and a dry sheath. A genus whose flowers do not come from a sheath
 * (Stanhopea from the base of the bulb, most Dendrobium from the nodes of the cane — common
 * practice, from memory; REFERENCES.md) skips every sheath stage. Any lead may be lost (dried
 * off, rotted, removed, or aborted by a stall).
 */
import type { GenusDefaults } from './genus-defaults';
import type { BloomRecord, IsoDate, Measurement, SheathState } from './types';

export const BLOOM_STAGES = [
  'growing',
  'bulb_mature',
  'sheath_forming',
  'sheath_empty',
  'sheath_dry',
  'buds_in_sheath',
  'buds_visible',
  'in_flower',
  'faded',
  'lost',
] as const;
export type BloomStage = (typeof BLOOM_STAGES)[number];

/** Stages of the main path, in order; the empty and dry sheath are side states beside `sheath_forming`. */
const PATH_RANK: Record<BloomStage, number | null> = {
  growing: 0,
  bulb_mature: 1,
  sheath_forming: 1,
  sheath_empty: null,
  sheath_dry: null,
  buds_in_sheath: 2,
  buds_visible: 2,
  in_flower: 3,
  faded: 4,
  lost: null,
};

/**
 * How far along the main path a stage is (0 growing … 4 faded); null for the side states
 * (empty or dry sheath) and for a lost lead, which are not "further along" than anything.
 */
export function pathRank(stage: BloomStage): number | null {
  return PATH_RANK[stage];
}

/** True when the genus flowers from a sheath, so sheath marks mean something for it. */
export function flowersFromSheath(genus: Pick<GenusDefaults, 'bloomHabit'>): boolean {
  return genus.bloomHabit !== 'no_sheath';
}

/** The stages a lead of this genus can pass through, in order (what a legend or a form offers). */
export function stagesFor(genus: Pick<GenusDefaults, 'bloomHabit'>): BloomStage[] {
  return flowersFromSheath(genus)
    ? ['growing', 'bulb_mature', 'sheath_forming', 'sheath_empty', 'sheath_dry', 'buds_in_sheath', 'buds_visible', 'in_flower', 'faded', 'lost']
    : ['growing', 'bulb_mature', 'buds_visible', 'in_flower', 'faded', 'lost'];
}

/** Sheath states a grower can mark on a lead of this genus (none for a genus without a sheath). */
export function sheathMarksFor(genus: Pick<GenusDefaults, 'bloomHabit'>): SheathState[] {
  return flowersFromSheath(genus) ? ['forming', 'empty', 'budded', 'dry'] : [];
}

/** Plain names of the stages, for sentences and legends. */
export const STAGE_LABELS: Record<BloomStage, string> = {
  growing: 'Growing',
  bulb_mature: 'Bulb mature',
  sheath_forming: 'Sheath forming',
  sheath_empty: 'Sheath empty',
  sheath_dry: 'Sheath dry',
  buds_in_sheath: 'Buds in the sheath',
  buds_visible: 'Buds or spike visible',
  in_flower: 'In flower',
  faded: 'Faded',
  lost: 'Lost',
};

/** The date buds were recorded as visible (out of the sheath, or on the spike), on or before `today`. */
export function budsVisibleOn(bloom: BloomRecord | null, today?: IsoDate): IsoDate | null {
  return bloom?.budsSeen && (today === undefined || bloom.budsSeen <= today) ? bloom.budsSeen : null;
}

/**
 * For a sheathed genus, the first look on or before `today` that found buds inside the sheath
 * (`budded`); null otherwise. Buds in the sheath still have to push out, so they are a stage of
 * their own, before buds are visible.
 */
export function budsInSheathOn(ms: readonly Measurement[], genus: Pick<GenusDefaults, 'bloomHabit'>, today?: IsoDate): IsoDate | null {
  if (!flowersFromSheath(genus)) return null;
  for (const m of ms) {
    if (today !== undefined && m.date > today) break;
    if (m.sheath === 'budded') return m.date;
  }
  return null;
}

/**
 * The sheath as the lead's looks on or before `today` last showed it: the latest look that marked
 * one (a sheath does not vanish because a later look left the field at "none"), with that look's
 * date; `none` for a genus without a sheath or a lead that never showed one.
 */
export function latestSheath(ms: readonly Measurement[], genus: Pick<GenusDefaults, 'bloomHabit'>, today?: IsoDate): { sheath: SheathState; on: IsoDate | null } {
  if (!flowersFromSheath(genus)) return { sheath: 'none', on: null };
  for (let i = ms.length - 1; i >= 0; i--) {
    if (today !== undefined && ms[i].date > today) continue;
    if (ms[i].sheath !== 'none') return { sheath: ms[i].sheath, on: ms[i].date };
  }
  return { sheath: 'none', on: null };
}
