/**
 * Per-genus defaults for the growth engine. Every number here is a starting point that the
 * plant's own history overrides as it accumulates. Sources are named where there is one;
 * most are marked "common practice" (what growers' culture notes commonly say) or
 * "from memory" (a grower's rule of thumb written down without a source at hand) — treat
 * those as rough.
 */

/** When a genus usually flowers relative to its growth: decides how a dry sheath is read. */
export type BloomHabit = 'from_green_sheath' | 'from_dry_sheath' | 'either' | 'no_sheath';

/** An interval between two stages in days: median and a log-scale spread. */
export interface StageInterval {
  /** Median length in days. */
  medianDays: number;
  /** Standard deviation of ln(days) across plants and seasons. */
  logSd: number;
}

export interface GenusDefaults {
  genus: string;
  /** Typical mature pseudobulb (or cane) height, mm. */
  matureHeightMm: number;
  /** Spread of mature height between leads, as a fraction of it (1 SD). */
  matureHeightRelSd: number;
  /** Logistic midpoint: days from first seen to half of mature height. */
  midpointDays: number;
  /** Logistic scale, days (10% → 90% of height takes about 4.4 × scale). */
  scaleDays: number;
  /** Spread (1 SD) of the midpoint between leads, days. */
  midpointSdDays: number;
  /** Spread (1 SD) of the scale between leads, days. */
  scaleSdDays: number;
  /** A stall longer than this many days counts as an aborted lead. */
  stallAbortDays: number;
  bloomHabit: BloomHabit;
  /** Lead mature (sheath formed, or bulb hardened) → buds visible. */
  matureToBuds: StageInterval;
  /** Buds visible (out of the sheath, or on the spike) → first flower open. */
  budsToOpen: StageInterval;
  /**
   * Buds first seen inside the sheath (against the light) → first flower open; a genus without a
   * sheath has none. They still have to push out of the sheath, so this runs longer than
   * `budsToOpen`.
   */
  sheathBudsToOpen: StageInterval | null;
  /** First flower open → last flower faded. */
  openToFaded: StageInterval;
  /** Flowers per spike on a lead of typical size. */
  flowersPerSpike: number;
  /** Share of healthy mature leads that flower in a season. */
  bloomRate: number;
  /** Bring the plant in when the night is forecast below this, °C. */
  minNightTempC: number;
}

/*
 * Cattleya (C.) and its hybrids (Rlc., Lc., Blc.).
 * - Height and growth timing: common practice (from memory) for standard hybrids — a lead
 *   takes about four to six months to mature; 95% of height at m + s·ln 19 ≈ 128 days here.
 * - Buds to open: about 2–4 weeks for standard hybrids; time in the sheath before buds show
 *   varies from weeks to six months or more — common practice (from memory), REFERENCES.md.
 * - Flowers last about 4–6 weeks — common practice.
 * - Minimum night 13 °C (55 °F): the low end of the 13–16 °C (55–60 °F) nights the American
 *   Orchid Society's Cattleya culture sheet gives (REFERENCES.md). Many growers bring them
 *   in only near 10 °C (50 °F) — common practice; such a grower sets that as a plant's own limit.
 * - Many hybrids flower from green sheaths in summer and autumn, winter and spring bloomers
 *   often from dry sheaths — orchid society culture notes (REFERENCES.md), hence 'either'.
 */
export const CATTLEYA_DEFAULTS: GenusDefaults = {
  genus: 'C.',
  matureHeightMm: 180,
  matureHeightRelSd: 0.3,
  midpointDays: 75,
  scaleDays: 18,
  midpointSdDays: 20,
  scaleSdDays: 5,
  stallAbortDays: 60,
  bloomHabit: 'either',
  matureToBuds: { medianDays: 45, logSd: 0.8 },
  budsToOpen: { medianDays: 21, logSd: 0.3 },
  // Buds seen in the sheath usually push out in two to four weeks, then open in two to four
  // more — common practice (from memory).
  sheathBudsToOpen: { medianDays: 35, logSd: 0.35 },
  openToFaded: { medianDays: 35, logSd: 0.25 },
  flowersPerSpike: 3,
  bloomRate: 0.8,
  minNightTempC: 13,
};

/** Rhyncholaeliocattleya: as Cattleya (common practice; the hybrids grow alike). */
export const RHYNCHOLAELIOCATTLEYA_DEFAULTS: GenusDefaults = {
  ...CATTLEYA_DEFAULTS,
  genus: 'Rlc.',
  matureHeightMm: 160,
  flowersPerSpike: 2,
};

/** Laeliocattleya: as Cattleya (common practice). */
export const LAELIOCATTLEYA_DEFAULTS: GenusDefaults = { ...CATTLEYA_DEFAULTS, genus: 'Lc.' };

/*
 * Dendrobium (Den.), cane types. Canes are taller and grow longer than Cattleya bulbs; they
 * flower from nodes, not from a sheath. All values common practice (from memory); the genus
 * is very varied, so the spreads are wide.
 */
export const DENDROBIUM_DEFAULTS: GenusDefaults = {
  genus: 'Den.',
  matureHeightMm: 300,
  matureHeightRelSd: 0.45,
  midpointDays: 100,
  scaleDays: 25,
  midpointSdDays: 30,
  scaleSdDays: 8,
  stallAbortDays: 75,
  bloomHabit: 'no_sheath',
  matureToBuds: { medianDays: 60, logSd: 0.8 },
  budsToOpen: { medianDays: 28, logSd: 0.35 },
  sheathBudsToOpen: null,
  openToFaded: { medianDays: 30, logSd: 0.3 },
  flowersPerSpike: 8,
  bloomRate: 0.7,
  minNightTempC: 10,
};

/*
 * Stanhopea (Stan.): short ovoid bulbs, quick growth, pendent spikes from the base; flowers
 * last only a few days. Common practice (from memory).
 */
export const STANHOPEA_DEFAULTS: GenusDefaults = {
  genus: 'Stan.',
  matureHeightMm: 55,
  matureHeightRelSd: 0.3,
  midpointDays: 60,
  scaleDays: 14,
  midpointSdDays: 18,
  scaleSdDays: 4,
  stallAbortDays: 50,
  bloomHabit: 'no_sheath',
  matureToBuds: { medianDays: 40, logSd: 0.8 },
  budsToOpen: { medianDays: 30, logSd: 0.3 },
  sheathBudsToOpen: null,
  openToFaded: { medianDays: 4, logSd: 0.3 },
  flowersPerSpike: 4,
  bloomRate: 0.7,
  minNightTempC: 12,
};

/** Brassavola (B.): thin stems with terete leaves, quick to mature. Common practice (from memory). */
export const BRASSAVOLA_DEFAULTS: GenusDefaults = {
  genus: 'B.',
  matureHeightMm: 90,
  matureHeightRelSd: 0.3,
  midpointDays: 60,
  scaleDays: 15,
  midpointSdDays: 18,
  scaleSdDays: 4,
  stallAbortDays: 50,
  bloomHabit: 'from_green_sheath',
  matureToBuds: { medianDays: 30, logSd: 0.7 },
  budsToOpen: { medianDays: 18, logSd: 0.3 },
  // As the Cattleya alliance, a little quicker — common practice (from memory).
  sheathBudsToOpen: { medianDays: 30, logSd: 0.35 },
  openToFaded: { medianDays: 21, logSd: 0.3 },
  flowersPerSpike: 4,
  bloomRate: 0.8,
  minNightTempC: 12,
};

/** Laelia (L.): as a smaller Cattleya; many cool growers. Common practice (from memory). */
export const LAELIA_DEFAULTS: GenusDefaults = {
  ...CATTLEYA_DEFAULTS,
  genus: 'L.',
  matureHeightMm: 100,
  midpointDays: 70,
  scaleDays: 17,
  flowersPerSpike: 4,
  minNightTempC: 7,
};

/** Any other sympodial genus: Cattleya-like with wider spreads (common practice). */
export const FALLBACK_DEFAULTS: GenusDefaults = {
  ...CATTLEYA_DEFAULTS,
  genus: '*',
  matureHeightRelSd: 0.45,
  midpointSdDays: 30,
  scaleSdDays: 8,
};

/** Defaults by standard genus abbreviation. */
export const GENUS_DEFAULTS: Readonly<Record<string, GenusDefaults>> = {
  'C.': CATTLEYA_DEFAULTS,
  'Rlc.': RHYNCHOLAELIOCATTLEYA_DEFAULTS,
  'Lc.': LAELIOCATTLEYA_DEFAULTS,
  'Den.': DENDROBIUM_DEFAULTS,
  'Stan.': STANHOPEA_DEFAULTS,
  'B.': BRASSAVOLA_DEFAULTS,
  'L.': LAELIA_DEFAULTS,
};

/**
 * Defaults for a genus abbreviation ('C.', 'Den.', …). Matching ignores case and a missing
 * trailing dot; an unknown genus gets `FALLBACK_DEFAULTS`.
 */
export function genusDefaultsFor(genus: string | null | undefined): GenusDefaults {
  if (!genus) return FALLBACK_DEFAULTS;
  const key = genus.trim().replace(/\.?$/, '.').toLowerCase();
  for (const [abbr, d] of Object.entries(GENUS_DEFAULTS)) {
    if (abbr.toLowerCase() === key) return d;
  }
  return FALLBACK_DEFAULTS;
}
