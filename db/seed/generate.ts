/**
 * The demo-data generator: an invented orchid collection, grown season by season around a
 * logistic growth curve with seeded random numbers. PURE and deterministic: no clock, no
 * Math.random, no I/O — the same `{ seed, today, … }` always gives the same rows, ids included.
 *
 * Every name here (grex names, clonal names, sources, notes) is invented for the demo; species
 * plants use real species epithets with invented clonal names. Sizes and timings are demo
 * values (see GENUS_PROFILES), not horticultural facts.
 *
 * Rows come out in an order that inserts cleanly (a parent plant before its divisions, a lead
 * after the lead it broke from) and without `collectionId` / `createdBy`, which the inserter adds.
 */

// ── Row types ─────────────────────────────────────────────────────────────────────────

export type SheathState = 'none' | 'forming' | 'empty' | 'budded' | 'dry';
export type LeadStatus = 'growing' | 'mature' | 'dried_off' | 'rotted' | 'removed';
export type CareKind = 'water' | 'feed' | 'repot' | 'treat' | 'move' | 'damage' | 'note';
export type DamageKind = 'sunburn' | 'cold' | 'rot' | 'mechanical' | 'pest' | 'other';

export interface GeneratedArea {
  id: string;
  name: string;
  indoors: boolean;
  position: number;
  notes: string | null;
}

export interface GeneratedPlant {
  id: string;
  tag: string;
  genus: string;
  epithet: string;
  isSpecies: boolean;
  /** Without the single quotes. */
  clonalName: string | null;
  source: string | null;
  acquiredOn: string | null;
  areaId: string | null;
  medium: string | null;
  notes: string | null;
  parentPlantId: string | null;
  dividedOn: string | null;
  roundPosition: number | null;
}

export interface GeneratedLead {
  id: string;
  plantId: string;
  season: number;
  label: string;
  firstSeen: string;
  parentLeadId: string | null;
  status: LeadStatus;
  fromBackBulb: boolean;
}

export interface GeneratedMeasurement {
  id: string;
  leadId: string;
  measuredOn: string;
  heightMm: number;
  leafCount: number | null;
  sheath: SheathState;
  rootTips: number | null;
  bulbWidthMm: number | null;
  note: string | null;
}

export interface GeneratedBloomRecord {
  id: string;
  leadId: string;
  budsSeenOn: string | null;
  firstOpenOn: string | null;
  lastFadedOn: string | null;
  flowerCount: number | null;
  spikeCount: number | null;
  note: string | null;
}

export interface GeneratedCareEntry {
  id: string;
  plantId: string | null;
  areaId: string | null;
  kind: CareKind;
  occurredOn: string;
  withCalcium: boolean | null;
  newMedium: string | null;
  product: string | null;
  target: string | null;
  toAreaId: string | null;
  damageKind: DamageKind | null;
  note: string | null;
}

export interface GenerateOptions {
  seed: number;
  /** The last day anything may be dated, 'YYYY-MM-DD' (the demo passes the real current date). */
  today: string;
  /** Number of plants, division pieces included (default 40). */
  plants?: number;
  /** Number of growth years, the current (in-progress) one included (default 4). */
  seasons?: number;
  /**
   * Leads per plant per season, 1 to 2: a whole number is exact, a fraction is the chance of
   * a second lead (default 1.25). Scenario plants keep one lead per season.
   */
  leadsPerPlantPerSeason?: number;
  /** Measurements of a complete lead (default 12; in-progress leads have fewer). */
  measurementsPerLead?: number;
  /** Month (1–12) the collection's growth year starts (default 3, northern hemisphere). */
  seasonStartMonth?: number;
  /**
   * Mixed into the ids only (default 0): the same data with other ids, so one seed can be
   * inserted more than once into a database (benchmarks).
   */
  idNamespace?: number;
}

/** Tags of the plants that play the demo's scenario roles. */
export const DEMO_SCENARIO = {
  /** Current season's lead stalled at ~45% of last season's and was marked dried off. */
  abortedLeadTag: 'SH-011',
  /** Current season's lead still 'growing' but flat for 5+ weeks at ~45% of last season's. */
  stalledLeadTag: 'IW-004',
  /** Last complete season's lead rotted mid-growth (status 'rotted'). */
  rottedLeadTag: 'SH-019',
  /** Sheaths formed and stayed empty in the last two complete seasons (no bloom). */
  emptySheathTag: 'BS-002',
  /** Winter/spring bloomer: each sheath goes dry before the buds show, then it blooms. */
  drySheathBloomerTag: 'SH-005',
  /** Mature lead size falls ~13% a season. */
  shrinkingTag: 'SH-003',
  /** Mature lead size rises ~15% a season ("trending larger"). */
  growingTag: 'BS-007',
  /** Current season's lead is young and mid-curve as of `today`. */
  inProgressTag: 'GT-002',
  /** Parent (bark), then its two divisions (sphagnum, LECA), divided in an earlier season. */
  divisionFamily: ['SH-012', 'SH-012B', 'SH-012C'] as [string, string, string],
  /** Moved from the shade-house bench to the indoor window in autumn (a 'move' care entry). */
  movedTag: 'IW-009',
  /** Cold damage on the mount wall (a 'damage' care entry, kind cold). */
  coldDamagedTag: 'MW-003',
} as const;

export const DEMO_SEED = 20260301;

export interface GeneratedCollection {
  areas: GeneratedArea[];
  plants: GeneratedPlant[];
  leads: GeneratedLead[];
  measurements: GeneratedMeasurement[];
  bloomRecords: GeneratedBloomRecord[];
  careEntries: GeneratedCareEntry[];
  /** The growth years generated, oldest first; the last is the current one. */
  seasons: number[];
  currentSeason: number;
  /** Which DEMO_SCENARIO tags are present (a very small collection holds only some). */
  scenarioTags: string[];
}

// ── Seeded random numbers ────────────────────────────────────────────────────────────

/** mulberry32: a small, fast 32-bit PRNG; good enough for demo data, not for anything secret. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

class Random {
  private readonly next: () => number;
  private spare: number | null = null;
  constructor(seed: number) {
    this.next = mulberry32(seed);
  }
  float(): number {
    return this.next();
  }
  between(lo: number, hi: number): number {
    return lo + (hi - lo) * this.next();
  }
  int(lo: number, hi: number): number {
    return lo + Math.floor((hi - lo + 1) * this.next());
  }
  chance(p: number): boolean {
    return this.next() < p;
  }
  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.next() * items.length)];
  }
  /** Standard normal (Box–Muller). */
  normal(): number {
    if (this.spare !== null) {
      const value = this.spare;
      this.spare = null;
      return value;
    }
    let u = 0;
    while (u === 0) u = this.next();
    const v = this.next();
    const r = Math.sqrt(-2 * Math.log(u));
    this.spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  }
  /** A version-4 uuid (RFC 9562 layout) from this stream. */
  uuid(): string {
    let hex = '';
    for (let i = 0; i < 4; i++) hex += ((this.next() * 4294967296) >>> 0).toString(16).padStart(8, '0');
    const variant = ((parseInt(hex[16], 16) & 0x3) | 0x8).toString(16);
    return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-4${hex.slice(13, 16)}-${variant}${hex.slice(17, 20)}-${hex.slice(20, 32)}`;
  }
}

// ── Calendar dates as whole days (UTC arithmetic, no clock) ──────────────────────────

const DAY_MS = 86_400_000;

export function dayNumber(date: string): number {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!match) throw new RangeError(`not a YYYY-MM-DD date: ${date}`);
  const [y, m, d] = [Number(match[1]), Number(match[2]), Number(match[3])];
  const ms = Date.UTC(y, m - 1, d);
  const back = new Date(ms);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== m - 1 || back.getUTCDate() !== d) {
    throw new RangeError(`not a real date: ${date}`);
  }
  return Math.round(ms / DAY_MS);
}

export function dateOf(day: number): string {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

function seasonStartDay(season: number, startMonth: number): number {
  return Math.round(Date.UTC(season, startMonth - 1, 1) / DAY_MS);
}

function seasonOfDay(day: number, startMonth: number): number {
  const d = new Date(day * DAY_MS);
  return d.getUTCMonth() + 1 >= startMonth ? d.getUTCFullYear() : d.getUTCFullYear() - 1;
}

/** The latest day ≤ `before` that falls in `month` on `dayOfMonth`. */
function latestMonthDay(before: number, month: number, dayOfMonth: number): number {
  const year = new Date(before * DAY_MS).getUTCFullYear();
  for (let y = year; y > year - 3; y--) {
    const day = Math.round(Date.UTC(y, month - 1, dayOfMonth) / DAY_MS);
    if (day <= before) return day;
  }
  return before;
}

// ── Genus profiles (INVENTED FOR THE DEMO — plausible-looking, not facts) ────────────

type Range = readonly [number, number];

interface GenusProfile {
  /** Mature pseudobulb / cane height, mm. Invented for the demo. */
  size: Range;
  /** Logistic midpoint (days after first seen) and scale (days). Invented for the demo. */
  midpoint: Range;
  scale: Range;
  /** Leaves on a mature growth. Invented for the demo. */
  leaves: Range;
  /** Bulb width as a share of height. Invented for the demo. */
  widthShare: number;
  /** Whether the flowers come through a visible sheath on the new growth. */
  sheathed: boolean;
  /** Days from maturity to buds showing, when not a dry-sheath bloomer. Invented. */
  budsAfterMaturity: Range;
  /** Days from buds seen to the first flower open, and from then to the last faded. Invented. */
  openAfterBuds: Range;
  fadeAfterOpen: Range;
  flowersPerSpike: Range;
  spikes: Range;
  /** Root tips at their peak on a new lead. Invented. */
  rootTips: Range;
}

/**
 * How the generated collections vary, written down so that the self-check (`npm run bench`)
 * measures the engine against the generator and nobody tunes the generator to the engine. Keep it
 * true when the generator changes.
 */
export const NOISE_MODEL =
  'per plant: base size, logistic midpoint and scale uniform in the genus profile, a size trend per season; ' +
  'per lead: size × exp(N(0, 0.04)) (0.01 for the scripted demo plants), midpoint and scale × exp(N(0, 0.05)), first seen the plant\'s usual day ± 12 days; ' +
  'per look: height on the curve + N(0, 0.6 + 1% of the height) mm, every 14 ± 1 days; ' +
  'bloom: maturity → buds and buds → first flower uniform in the genus profile\'s ranges, independent of size and weather; ' +
  '12% of mature leads of a sheathed genus stay empty, 12% others do not flower, 3% abort';

const GENUS_PROFILES = {
  // Cattleya-alliance hybrids: mature pseudobulbs ~120–300 mm (invented for the demo).
  cattleya: {
    size: [120, 300], midpoint: [75, 95], scale: [18, 24], leaves: [1, 1], widthShare: 0.14, sheathed: true,
    budsAfterMaturity: [5, 35], openAfterBuds: [18, 30], fadeAfterOpen: [14, 24], flowersPerSpike: [2, 5], spikes: [1, 1], rootTips: [3, 8],
  },
  // Bifoliate Guarianthe: a little taller, two leaves (invented for the demo).
  guarianthe: {
    size: [150, 320], midpoint: [80, 100], scale: [20, 26], leaves: [2, 2], widthShare: 0.1, sheathed: true,
    budsAfterMaturity: [10, 40], openAfterBuds: [15, 25], fadeAfterOpen: [12, 20], flowersPerSpike: [4, 10], spikes: [1, 1], rootTips: [3, 9],
  },
  // A compact Cattleya species: small bulbs (invented for the demo).
  walkeriana: {
    size: [60, 110], midpoint: [60, 75], scale: [14, 18], leaves: [1, 1], widthShare: 0.3, sheathed: false,
    budsAfterMaturity: [60, 110], openAfterBuds: [14, 24], fadeAfterOpen: [14, 24], flowersPerSpike: [1, 2], spikes: [1, 2], rootTips: [2, 6],
  },
  // Dendrobium canes ~250–700 mm (invented for the demo).
  dendrobium: {
    size: [250, 700], midpoint: [100, 120], scale: [25, 32], leaves: [6, 12], widthShare: 0.03, sheathed: false,
    budsAfterMaturity: [90, 150], openAfterBuds: [14, 25], fadeAfterOpen: [21, 42], flowersPerSpike: [6, 15], spikes: [1, 4], rootTips: [2, 6],
  },
  // Shorter canes of a compact Dendrobium species (invented for the demo).
  kingianum: {
    size: [150, 300], midpoint: [90, 110], scale: [22, 28], leaves: [3, 6], widthShare: 0.06, sheathed: false,
    budsAfterMaturity: [100, 150], openAfterBuds: [12, 20], fadeAfterOpen: [18, 30], flowersPerSpike: [5, 12], spikes: [1, 4], rootTips: [2, 6],
  },
  // Stanhopea bulbs ~50–80 mm, flowers short-lived (invented for the demo).
  stanhopea: {
    size: [50, 80], midpoint: [50, 65], scale: [12, 16], leaves: [1, 1], widthShare: 0.6, sheathed: false,
    budsAfterMaturity: [150, 210], openAfterBuds: [7, 14], fadeAfterOpen: [3, 5], flowersPerSpike: [3, 7], spikes: [1, 3], rootTips: [4, 12],
  },
  // Brassavola ~80–150 mm (invented for the demo).
  brassavola: {
    size: [80, 150], midpoint: [60, 80], scale: [15, 20], leaves: [1, 1], widthShare: 0.08, sheathed: false,
    budsAfterMaturity: [20, 60], openAfterBuds: [10, 20], fadeAfterOpen: [14, 28], flowersPerSpike: [2, 6], spikes: [1, 3], rootTips: [2, 7],
  },
  // Laelia ~60–200 mm (invented for the demo).
  laelia: {
    size: [60, 200], midpoint: [65, 85], scale: [16, 22], leaves: [1, 2], widthShare: 0.25, sheathed: false,
    budsAfterMaturity: [20, 50], openAfterBuds: [20, 35], fadeAfterOpen: [14, 28], flowersPerSpike: [2, 5], spikes: [1, 2], rootTips: [2, 6],
  },
} satisfies Record<string, GenusProfile>;

type ProfileKey = keyof typeof GENUS_PROFILES;

/** A dry-sheath (winter/spring) bloomer's timing from maturity, days. Invented for the demo. */
const DRY_SHEATH_TIMING = { dryAfterMaturity: [35, 65] as Range, budsAfterMaturity: [110, 150] as Range, openAfterBuds: [25, 38] as Range };

// ── The invented catalog ─────────────────────────────────────────────────────────────

type AreaKey = 'SH' | 'BS' | 'MW' | 'IW' | 'GT';

const AREAS: ReadonlyArray<{ key: AreaKey; name: string; indoors: boolean; notes: string | null }> = [
  { key: 'SH', name: 'Shade-house bench', indoors: false, notes: '50% shade cloth; watered by hand.' },
  { key: 'BS', name: 'Bright shelf', indoors: false, notes: 'Top shelf by the south fence, morning sun.' },
  { key: 'MW', name: 'Mount wall', indoors: false, notes: 'Cork and hardwood mounts on wire mesh; misted daily in summer.' },
  { key: 'IW', name: 'Indoor window', indoors: true, notes: 'East-facing kitchen window.' },
  { key: 'GT', name: 'Grow tent', indoors: true, notes: 'LED lights on a 13-hour timer, small fan.' },
];

type Role =
  | 'shrinking' | 'growing' | 'aborted' | 'stalled' | 'rotted' | 'emptySheath' | 'drySheath' | 'inProgress'
  | 'divisionParent' | 'divisionChild' | 'moved' | 'coldDamaged';

interface PlantTemplate {
  tag: string;
  genus: string;
  epithet: string;
  isSpecies?: boolean;
  clonalName: string | null;
  area: AreaKey;
  medium: string;
  source: string;
  profile: ProfileKey;
  /** Sheathed Cattleya-alliance plants: 'fall' blooms soon after maturity; 'dry-sheath' in late winter/spring. */
  bloom?: 'fall' | 'dry-sheath';
  notes?: string;
  role?: Role;
}

const S = DEMO_SCENARIO;

/**
 * The demo's 40 plants, scenario plants first (so a smaller collection keeps as many roles
 * as it can). Grex and clonal names are invented; species epithets are real species.
 */
const CATALOG: readonly PlantTemplate[] = [
  { tag: S.divisionFamily[0], genus: 'C.', epithet: 'Tidewrack Rose', clonalName: 'Wrenfold', area: 'SH', medium: 'bark', source: 'Society auction', profile: 'cattleya', bloom: 'fall', role: 'divisionParent', notes: 'Grew into a specimen; divided into three.' },
  { tag: S.divisionFamily[1], genus: 'C.', epithet: 'Tidewrack Rose', clonalName: 'Wrenfold', area: 'IW', medium: 'sphagnum', source: `Division of ${S.divisionFamily[0]}`, profile: 'cattleya', bloom: 'fall', role: 'divisionChild' },
  { tag: S.divisionFamily[2], genus: 'C.', epithet: 'Tidewrack Rose', clonalName: 'Wrenfold', area: 'BS', medium: 'LECA', source: `Division of ${S.divisionFamily[0]}`, profile: 'cattleya', bloom: 'fall', role: 'divisionChild' },
  { tag: S.shrinkingTag, genus: 'Rlc.', epithet: 'Copperfen Morning', clonalName: 'Tallow', area: 'SH', medium: 'bark', source: 'Spring show vendor', profile: 'cattleya', bloom: 'fall', role: 'shrinking', notes: 'Bark is three years old and breaking down.' },
  { tag: S.growingTag, genus: 'Lc.', epithet: 'Mizzen Blush', clonalName: 'Sixpence', area: 'BS', medium: 'bark and perlite', source: 'Mail-order seedling', profile: 'cattleya', bloom: 'fall', role: 'growing', notes: 'Seedling reaching blooming size.' },
  { tag: S.abortedLeadTag, genus: 'Lc.', epithet: 'Ferrule Dusk', clonalName: 'Rookery', area: 'SH', medium: 'bark', source: 'Garden-club swap', profile: 'cattleya', bloom: 'fall', role: 'aborted' },
  { tag: S.stalledLeadTag, genus: 'Ctt.', epithet: 'Sorrel Spark', clonalName: 'Pale Ember', area: 'IW', medium: 'sphagnum', source: 'Mail-order seedling', profile: 'cattleya', bloom: 'fall', role: 'stalled' },
  { tag: S.rottedLeadTag, genus: 'C.', epithet: 'Marrow Lane', clonalName: 'Hob', area: 'SH', medium: 'coconut husk chips', source: 'Society auction', profile: 'cattleya', bloom: 'fall', role: 'rotted' },
  { tag: S.emptySheathTag, genus: 'Rlc.', epithet: 'Brindle Tide', clonalName: 'Marlin', area: 'BS', medium: 'bark', source: 'Spring show vendor', profile: 'cattleya', bloom: 'fall', role: 'emptySheath', notes: 'Makes sheaths but has not bloomed for two years.' },
  { tag: S.drySheathBloomerTag, genus: 'Lc.', epithet: 'Cobble Garnet', clonalName: 'Foxglint', area: 'SH', medium: 'bark', source: 'Friend’s division', profile: 'cattleya', bloom: 'dry-sheath', role: 'drySheath', notes: 'Spring bloomer: the sheath browns over winter, then the buds come.' },
  { tag: S.inProgressTag, genus: 'Rlc.', epithet: 'Halyard Sunset', clonalName: 'Blue Hour', area: 'GT', medium: 'bark', source: 'Grown from flask', profile: 'cattleya', bloom: 'fall', role: 'inProgress' },
  { tag: S.movedTag, genus: 'Gur.', epithet: 'Oxbow Cinder', clonalName: 'Cairn', area: 'IW', medium: 'bark', source: 'Society auction', profile: 'guarianthe', bloom: 'fall', role: 'moved', notes: 'Comes indoors for the winter.' },
  { tag: S.coldDamagedTag, genus: 'L.', epithet: 'anceps', isSpecies: true, clonalName: 'Gullwing', area: 'MW', medium: 'mount', source: 'Garden-club swap', profile: 'laelia', role: 'coldDamaged' },
  // The rest of the collection.
  { tag: 'SH-001', genus: 'C.', epithet: 'Quillon Dawn', clonalName: 'Oriel', area: 'SH', medium: 'bark', source: 'Spring show vendor', profile: 'cattleya', bloom: 'fall' },
  { tag: 'SH-002', genus: 'C.', epithet: 'Pellucid Hour', clonalName: null, area: 'SH', medium: 'bark', source: 'Mail-order seedling', profile: 'cattleya', bloom: 'dry-sheath' },
  { tag: 'SH-004', genus: 'Rlc.', epithet: 'Gorse Beacon', clonalName: 'Saffron Keel', area: 'SH', medium: 'bark and perlite', source: 'Society auction', profile: 'cattleya', bloom: 'fall' },
  { tag: 'SH-006', genus: 'Ctt.', epithet: 'Thistlewick', clonalName: 'Ninebark', area: 'SH', medium: 'bark', source: 'Garden-club swap', profile: 'cattleya', bloom: 'fall' },
  { tag: 'SH-008', genus: 'Den.', epithet: 'Kestrel Falls', clonalName: 'Tansy', area: 'SH', medium: 'bark', source: 'Spring show vendor', profile: 'dendrobium' },
  { tag: 'SH-009', genus: 'Stan.', epithet: 'tigrina', isSpecies: true, clonalName: 'Mudlark', area: 'SH', medium: 'basket', source: 'Society auction', profile: 'stanhopea', notes: 'Flowers push down through the basket.' },
  { tag: 'SH-010', genus: 'Gur.', epithet: 'Driftmere Ruby', clonalName: null, area: 'SH', medium: 'bark', source: 'Mail-order seedling', profile: 'guarianthe', bloom: 'fall' },
  { tag: 'SH-013', genus: 'C.', epithet: 'Larkspit Glow', clonalName: 'Quill', area: 'SH', medium: 'lava rock', source: 'Friend’s division', profile: 'cattleya', bloom: 'dry-sheath' },
  { tag: 'SH-014', genus: 'Den.', epithet: 'speciosum', isSpecies: true, clonalName: 'Pewter', area: 'SH', medium: 'lava rock', source: 'Garden-club swap', profile: 'dendrobium' },
  { tag: 'SH-015', genus: 'Stan.', epithet: 'wardii', isSpecies: true, clonalName: null, area: 'SH', medium: 'basket', source: 'Spring show vendor', profile: 'stanhopea' },
  { tag: 'BS-001', genus: 'B.', epithet: 'nodosa', isSpecies: true, clonalName: 'Vesper', area: 'BS', medium: 'bark', source: 'Garden centre rescue', profile: 'brassavola', notes: 'Scented at night.' },
  { tag: 'BS-003', genus: 'Rlc.', epithet: 'Windle Bay', clonalName: 'Sandpiper', area: 'BS', medium: 'bark', source: 'Spring show vendor', profile: 'cattleya', bloom: 'fall' },
  { tag: 'BS-004', genus: 'Den.', epithet: 'kingianum', isSpecies: true, clonalName: 'Pippin', area: 'BS', medium: 'bark and perlite', source: 'Friend’s division', profile: 'kingianum' },
  { tag: 'BS-005', genus: 'L.', epithet: 'Pennant Frost', clonalName: null, area: 'BS', medium: 'bark', source: 'Mail-order seedling', profile: 'laelia' },
  { tag: 'BS-006', genus: 'Ctt.', epithet: 'Pumice Flare', clonalName: 'Cinderbox', area: 'BS', medium: 'lava rock', source: 'Society auction', profile: 'cattleya', bloom: 'fall' },
  { tag: 'BS-008', genus: 'Den.', epithet: 'Quartzline Snow', clonalName: null, area: 'BS', medium: 'bark', source: 'Spring show vendor', profile: 'dendrobium' },
  { tag: 'MW-001', genus: 'B.', epithet: 'cucullata', isSpecies: true, clonalName: 'Jetty', area: 'MW', medium: 'mount', source: 'Garden-club swap', profile: 'brassavola' },
  { tag: 'MW-002', genus: 'C.', epithet: 'walkeriana', isSpecies: true, clonalName: 'Lodestar', area: 'MW', medium: 'mount', source: 'Society auction', profile: 'walkeriana', notes: 'Blooms from a leafless flowering growth at the base.' },
  { tag: 'MW-004', genus: 'L.', epithet: 'albida', isSpecies: true, clonalName: null, area: 'MW', medium: 'mount', source: 'Friend’s division', profile: 'laelia' },
  { tag: 'MW-005', genus: 'B.', epithet: 'Moonwick', clonalName: 'Brackish', area: 'MW', medium: 'mount', source: 'Spring show vendor', profile: 'brassavola' },
  { tag: 'IW-001', genus: 'C.', epithet: 'Lowland Pennyroyal', clonalName: 'Hearth', area: 'IW', medium: 'bark', source: 'Garden centre rescue', profile: 'cattleya', bloom: 'dry-sheath' },
  { tag: 'IW-002', genus: 'Den.', epithet: 'Bramblecourt', clonalName: 'Larch', area: 'IW', medium: 'LECA', source: 'Mail-order seedling', profile: 'dendrobium' },
  { tag: 'IW-003', genus: 'Rlc.', epithet: 'Fenlight Parade', clonalName: 'Amberline', area: 'IW', medium: 'bark', source: 'Spring show vendor', profile: 'cattleya', bloom: 'fall' },
  { tag: 'GT-001', genus: 'C.', epithet: 'Gannet Reach', clonalName: 'Lowtide', area: 'GT', medium: 'sphagnum', source: 'Grown from flask', profile: 'cattleya', bloom: 'fall' },
  { tag: 'GT-003', genus: 'Lc.', epithet: 'Sallow Meadow', clonalName: null, area: 'GT', medium: 'bark', source: 'Grown from flask', profile: 'cattleya', bloom: 'dry-sheath' },
  { tag: 'GT-004', genus: 'Stan.', epithet: 'Vellum Moth', clonalName: 'Tern', area: 'GT', medium: 'basket', source: 'Society auction', profile: 'stanhopea' },
  { tag: 'GT-005', genus: 'Den.', epithet: 'Ashgrove Tumble', clonalName: null, area: 'GT', medium: 'bark', source: 'Mail-order seedling', profile: 'kingianum' },
];

/** Word lists for the extra plants of a large (benchmark) collection; combinations are invented. */
const GREX_FIRST = ['Brackwater', 'Cinderfold', 'Dunmoor', 'Eelgrass', 'Fallowmere', 'Gravelpit', 'Hollin', 'Inkcap', 'Juniperhill', 'Kelpline', 'Loamside', 'Mossbank', 'Nettlebed', 'Oarlock', 'Pebbledash', 'Quayside', 'Rushlight', 'Shingle', 'Tarnwick', 'Umberlea', 'Vetchfield', 'Wickerway', 'Yarrowdown', 'Zephyrcote'];
const GREX_SECOND = ['Amber', 'Beacon', 'Candle', 'Dawnlight', 'Ember', 'Flicker', 'Garland', 'Hush', 'Idyll', 'Jubilee', 'Kindling', 'Lull', 'Murmur', 'Nocturne', 'Opal', 'Parade', 'Quiver', 'Ripple', 'Solace', 'Tinder', 'Umbra', 'Velvet', 'Whisper', 'Zest'];
const CLONAL_NAMES = ['Bramling', 'Cobnut', 'Dabchick', 'Eyot', 'Fernbrake', 'Gloaming', 'Heronsgate', 'Islet', 'Kittiwake', 'Linnet', 'Marram', 'Nook', 'Osier', 'Plover', 'Quoin', 'Reedling', 'Samphire', 'Teasel', 'Upland', 'Wherry'];
const SPECIES: Partial<Record<ProfileKey, { genus: string; epithets: string[] }>> = {
  walkeriana: { genus: 'C.', epithets: ['walkeriana'] },
  kingianum: { genus: 'Den.', epithets: ['kingianum'] },
  stanhopea: { genus: 'Stan.', epithets: ['tigrina', 'wardii', 'oculata'] },
  brassavola: { genus: 'B.', epithets: ['nodosa', 'cucullata'] },
  laelia: { genus: 'L.', epithets: ['anceps', 'albida', 'rubescens'] },
};
const HYBRID_GENERA: ReadonlyArray<{ genus: string; profile: ProfileKey; weight: number }> = [
  { genus: 'C.', profile: 'cattleya', weight: 5 },
  { genus: 'Rlc.', profile: 'cattleya', weight: 4 },
  { genus: 'Lc.', profile: 'cattleya', weight: 3 },
  { genus: 'Ctt.', profile: 'cattleya', weight: 2 },
  { genus: 'Gur.', profile: 'guarianthe', weight: 1 },
  { genus: 'Den.', profile: 'dendrobium', weight: 3 },
  { genus: 'Stan.', profile: 'stanhopea', weight: 1 },
  { genus: 'B.', profile: 'brassavola', weight: 1 },
  { genus: 'L.', profile: 'laelia', weight: 1 },
];
const SOURCES = ['Society auction', 'Spring show vendor', 'Mail-order seedling', 'Garden-club swap', 'Friend’s division', 'Grown from flask', 'Garden centre rescue'];
const MEDIA_BY_AREA: Record<AreaKey, readonly string[]> = {
  SH: ['bark', 'bark', 'bark and perlite', 'lava rock', 'coconut husk chips', 'basket'],
  BS: ['bark', 'bark and perlite', 'lava rock', 'LECA'],
  MW: ['mount'],
  IW: ['bark', 'sphagnum', 'LECA'],
  GT: ['bark', 'sphagnum', 'LECA', 'bark and perlite'],
};

function extraTemplates(count: number, rng: Random): PlantTemplate[] {
  const out: PlantTemplate[] = [];
  const counters: Record<AreaKey, number> = { SH: 100, BS: 100, MW: 100, IW: 100, GT: 100 };
  const totalWeight = HYBRID_GENERA.reduce((sum, g) => sum + g.weight, 0);
  for (let i = 0; i < count; i++) {
    let roll = rng.float() * totalWeight;
    let choice = HYBRID_GENERA[0];
    for (const g of HYBRID_GENERA) {
      roll -= g.weight;
      if (roll < 0) {
        choice = g;
        break;
      }
    }
    let { genus, profile } = choice;
    let epithet = `${rng.pick(GREX_FIRST)} ${rng.pick(GREX_SECOND)}`;
    let isSpecies = false;
    if (profile !== 'cattleya' && profile !== 'guarianthe' && rng.chance(0.4)) {
      const speciesProfile: ProfileKey = profile === 'dendrobium' && rng.chance(0.5) ? 'kingianum' : profile;
      const species = SPECIES[speciesProfile];
      if (species) {
        genus = species.genus;
        epithet = rng.pick(species.epithets);
        profile = speciesProfile;
        isSpecies = true;
      }
    }
    const area = rng.pick<AreaKey>(profile === 'stanhopea' ? ['SH', 'GT'] : ['SH', 'SH', 'BS', 'MW', 'IW', 'GT']);
    const medium = profile === 'stanhopea' ? 'basket' : rng.pick(MEDIA_BY_AREA[area]);
    const sheathed = GENUS_PROFILES[profile].sheathed;
    out.push({
      tag: `${area}-${counters[area]++}`,
      genus,
      epithet,
      isSpecies,
      clonalName: rng.chance(0.6) ? rng.pick(CLONAL_NAMES) : null,
      area,
      medium,
      source: rng.pick(SOURCES),
      profile,
      bloom: sheathed ? (rng.chance(0.3) ? 'dry-sheath' : 'fall') : undefined,
    });
  }
  return out;
}

// ── Growth of one lead ───────────────────────────────────────────────────────────────

/** The 3-parameter logistic curve: h(t) = A / (1 + exp((m − t) / s)). */
export function logistic(t: number, asymptote: number, midpoint: number, scale: number): number {
  return asymptote / (1 + Math.exp((midpoint - t) / scale));
}

type LeadFate =
  | { kind: 'normal'; sheath: 'bloom' | 'empty' | 'dry-bloom' | 'no-bloom' }
  | { kind: 'aborted'; cap: number; status: 'dried_off' | 'growing' }
  | { kind: 'rotted'; atShare: number };

interface LeadPlan {
  firstSeenDay: number;
  asymptote: number;
  midpoint: number;
  scale: number;
  fate: LeadFate;
}

interface PlannedMeasurement {
  t: number;
  sheath: SheathState;
  note: string | null;
  /** Force this height (flat after a stall), else the curve plus noise. */
  height?: number;
  /** The measurement on which the buds were first seen (its date goes in the bloom record). */
  buds?: boolean;
}

interface PlantTraits {
  baseSize: number;
  baseMid: number;
  baseScale: number;
  leaves: number;
  startOffset: number;
}

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
const round1 = (v: number) => Math.round(v * 10) / 10;

// ── The generator ────────────────────────────────────────────────────────────────────

export function generateCollection(options: GenerateOptions): GeneratedCollection {
  const plantCount = Math.max(1, Math.floor(options.plants ?? 40));
  const seasonCount = Math.max(1, Math.floor(options.seasons ?? 4));
  const leadsPer = clamp(options.leadsPerPlantPerSeason ?? 1.25, 1, 2);
  const perLead = Math.max(4, Math.floor(options.measurementsPerLead ?? 12));
  const startMonth = options.seasonStartMonth ?? 3;
  if (!Number.isInteger(startMonth) || startMonth < 1 || startMonth > 12) throw new RangeError('seasonStartMonth is 1–12');
  const today = dayNumber(options.today);

  const rng = new Random(options.seed);
  const ids = new Random(((options.seed ^ 0x5eed1d5) + 0x9e3779b9 + Math.imul(options.idNamespace ?? 0, 0x85ebca6b)) >>> 0);

  // The current season is the one that had begun at least 100 days before today, so its
  // leads have had time to show (early in a growth year the previous one is still "current").
  const currentSeason = seasonOfDay(today - 100, startMonth);
  const seasons = Array.from({ length: seasonCount }, (_, i) => currentSeason - seasonCount + 1 + i);
  const firstSeasonStart = seasonStartDay(seasons[0], startMonth);

  const areas: GeneratedArea[] = AREAS.map((a, position) => ({ id: ids.uuid(), name: a.name, indoors: a.indoors, position, notes: a.notes }));
  const areaId = (key: AreaKey) => areas[AREAS.findIndex((a) => a.key === key)].id;

  const templates = [...CATALOG.slice(0, plantCount), ...extraTemplates(Math.max(0, plantCount - CATALOG.length), rng)];
  const present = new Set(templates.map((t) => t.tag));
  // A division needs its parent and a piece; with the parent alone it is an ordinary plant.
  const hasDivision = present.has(S.divisionFamily[0]) && present.has(S.divisionFamily[1]);

  // Division: at the start of an earlier season (two seasons back when there are four).
  const divisionSeason = currentSeason - Math.max(0, Math.min(seasonCount - 2, Math.floor(seasonCount / 2)));
  const divisionDay = seasonStartDay(divisionSeason, startMonth) + 12;
  const dividedOn = dateOf(divisionDay);

  const plants: GeneratedPlant[] = [];
  const leads: GeneratedLead[] = [];
  const measurements: GeneratedMeasurement[] = [];
  const bloomRecords: GeneratedBloomRecord[] = [];
  const careEntries: GeneratedCareEntry[] = [];
  const plantByTag = new Map<string, GeneratedPlant>();
  const traitsByPlant = new Map<string, PlantTraits>();

  const care = (entry: Partial<GeneratedCareEntry> & Pick<GeneratedCareEntry, 'kind' | 'occurredOn'>) => {
    careEntries.push({
      id: ids.uuid(), plantId: null, areaId: null, withCalcium: null, newMedium: null, product: null,
      target: null, toAreaId: null, damageKind: null, note: null, ...entry,
    });
  };

  for (const template of templates) {
    const profile: GenusProfile = GENUS_PROFILES[template.profile];
    const role = template.role === 'divisionChild' && !hasDivision ? undefined : template.role;
    const isChild = role === 'divisionChild';
    const plantId = ids.uuid();
    const parent = isChild ? plantByTag.get(S.divisionFamily[0]) : undefined;

    // Plant-level traits; a division is the same clone, so it keeps its parent's.
    const traits: PlantTraits = (parent && traitsByPlant.get(parent.id)) || {
      // A plant trending larger starts small (a seedling reaching blooming size), one trending
      // smaller starts large, so both stay within the genus's range over the seasons.
      baseSize: profile.size[0] + (profile.size[1] - profile.size[0]) * (role === 'growing' ? rng.between(0, 0.15) : role === 'shrinking' ? rng.between(0.8, 1) : rng.float()),
      baseMid: rng.between(profile.midpoint[0], profile.midpoint[1]),
      baseScale: rng.between(profile.scale[0], profile.scale[1]),
      leaves: rng.int(profile.leaves[0], profile.leaves[1]),
      startOffset: rng.int(15, 100), // days after the season starts that its leads usually show
    };
    traitsByPlant.set(plantId, traits);
    const { baseSize, baseMid, baseScale, leaves, startOffset } = traits;
    const trend =
      role === 'shrinking' ? 0.87 : role === 'growing' ? 1.15 : template.medium === 'sphagnum' && isChild ? 1.04 : template.medium === 'LECA' && isChild ? 0.97 : rng.between(0.97, 1.04);
    const scenario = role !== undefined;
    const acquiredDay = isChild ? divisionDay : firstSeasonStart - rng.int(30, 900);

    const plant: GeneratedPlant = {
      id: plantId,
      tag: template.tag,
      genus: template.genus,
      epithet: template.epithet,
      isSpecies: template.isSpecies ?? false,
      clonalName: template.clonalName,
      source: template.source,
      acquiredOn: dateOf(acquiredDay),
      areaId: areaId(template.area),
      medium: template.medium,
      notes: template.notes ?? null,
      parentPlantId: parent ? parent.id : null,
      dividedOn: parent ? dividedOn : null,
      roundPosition: null,
    };
    plants.push(plant);
    plantByTag.set(plant.tag, plant);

    // The plant's own seasons (a division starts with the division season).
    const plantSeasons = isChild ? seasons.filter((s) => s >= divisionSeason) : seasons;
    let previousA: { id: string; asymptote: number; season: number } | null = null;
    let sizeIndex = 0;

    for (const season of plantSeasons) {
      const seasonStart = seasonStartDay(season, startMonth);
      const isCurrent = season === currentSeason;
      const leadCount = scenario ? 1 : Math.floor(leadsPer) + (rng.chance(leadsPer - Math.floor(leadsPer)) ? 1 : 0);
      const seasonFactor = Math.pow(trend, sizeIndex) * Math.exp(rng.normal() * (scenario ? 0.01 : 0.04));
      sizeIndex++;
      const afterDivision = hasDivision && (role === 'divisionParent' || isChild) && season === divisionSeason;
      let thisA: { id: string; asymptote: number; season: number } | null = null;

      for (let li = 0; li < Math.min(2, leadCount); li++) {
        const label = `${season}-${String.fromCharCode(65 + li)}`;
        const fromBackBulb = li === 1 && rng.chance(0.25);
        let asymptote = baseSize * seasonFactor * (li === 1 ? rng.between(0.8, 0.95) : 1) * (fromBackBulb ? 0.85 : 1);
        if (afterDivision) asymptote *= isChild ? rng.between(0.65, 0.75) : 0.82;
        const midpoint = baseMid * Math.exp(rng.normal() * 0.05);
        const scale = baseScale * Math.exp(rng.normal() * 0.05);

        // When the lead is first seen.
        let firstSeenDay = seasonStart + clamp(startOffset + rng.int(-12, 12) + li * rng.int(10, 30), 1, 150);
        if (afterDivision) firstSeenDay = Math.max(firstSeenDay, divisionDay + rng.int(10, 30));
        if (role === 'drySheath') firstSeenDay = seasonStart + rng.int(20, 40);
        if (isCurrent) {
          firstSeenDay = Math.min(firstSeenDay, today - rng.int(14, 40));
          if (role === 'inProgress') firstSeenDay = today - Math.round(midpoint * rng.between(0.8, 0.95));
          else if (!scenario && rng.chance(0.2)) firstSeenDay = today - rng.int(25, 90);
          if (role === 'aborted') firstSeenDay = today - rng.int(110, 130);
          if (role === 'stalled') firstSeenDay = today - rng.int(105, 118);
          firstSeenDay = Math.max(firstSeenDay, seasonStart + 1);
        }

        // What becomes of it.
        const priorSize: number = previousA ? previousA.asymptote : baseSize;
        let fate: LeadFate;
        if (isCurrent && role === 'aborted') fate = { kind: 'aborted', cap: priorSize * rng.between(0.42, 0.48), status: 'dried_off' };
        else if (isCurrent && role === 'stalled') fate = { kind: 'aborted', cap: priorSize * rng.between(0.43, 0.49), status: 'growing' };
        else if (role === 'rotted' && season === currentSeason - 1) fate = { kind: 'rotted', atShare: rng.between(0.4, 0.5) };
        else if (!scenario && li === 0 && rng.chance(0.03)) fate = { kind: 'aborted', cap: priorSize * rng.between(0.35, 0.55), status: 'dried_off' };
        else {
          let sheath: 'bloom' | 'empty' | 'dry-bloom' | 'no-bloom';
          if (profile.sheathed) {
            const wantsEmpty = role === 'emptySheath' ? season >= currentSeason - 2 && season < currentSeason : !scenario && rng.chance(0.12);
            sheath = wantsEmpty ? 'empty' : template.bloom === 'dry-sheath' ? 'dry-bloom' : 'bloom';
          } else {
            sheath = !scenario && rng.chance(0.12) ? 'no-bloom' : 'bloom';
          }
          if (role === 'growing' && sizeIndex === 1) sheath = profile.sheathed ? 'empty' : 'no-bloom'; // too young to bloom the first year
          fate = { kind: 'normal', sheath };
        }

        const lead: GeneratedLead = {
          id: ids.uuid(),
          plantId,
          season,
          label,
          firstSeen: dateOf(firstSeenDay),
          parentLeadId: fromBackBulb ? null : previousA?.id ?? null,
          status: 'growing',
          fromBackBulb,
        };
        leads.push(lead);
        if (li === 0) thisA = { id: lead.id, asymptote: fate.kind === 'normal' ? asymptote : priorSize, season };

        growLead({ rng, ids, lead, plan: { firstSeenDay, asymptote, midpoint, scale, fate }, profile, leaves, flowerBase: baseSize, perLead, today, measurements, bloomRecords });
      }
      if (thisA) previousA = thisA;
    }
  }

  // ── Care entries ──────────────────────────────────────────────────────────────────
  const byTag = (tag: string) => plantByTag.get(tag);
  const autumnMonth = ((startMonth + 6) % 12) + 1; // October in the north
  const winterMonth = ((startMonth + 9) % 12) + 1; // January in the north

  // Area routines over the last eight weeks: water, and feed alternating with and without calcium.
  for (const area of areas) {
    const indoors = area.indoors;
    let feedWithCalcium = true;
    for (let day = today - 56 + rng.int(0, 3); day <= today; day += indoors ? rng.int(7, 10) : rng.int(4, 7)) {
      care({ kind: 'water', areaId: area.id, occurredOn: dateOf(day), note: null });
    }
    for (let day = today - 56 + rng.int(2, 6); day <= today; day += 14) {
      care({
        kind: 'feed', areaId: area.id, occurredOn: dateOf(day), withCalcium: feedWithCalcium,
        note: feedWithCalcium ? 'Quarter-strength feed with calcium and magnesium.' : 'Quarter-strength balanced feed, no calcium.',
      });
      feedWithCalcium = !feedWithCalcium;
    }
  }

  if (hasDivision) {
    const [parentTag, ...childTags] = S.divisionFamily;
    const parent = byTag(parentTag)!;
    care({ kind: 'repot', plantId: parent.id, occurredOn: dividedOn, newMedium: 'bark', note: 'Divided into three; back piece kept here. Tools flamed between cuts.' });
    for (const tag of childTags) {
      const child = byTag(tag);
      if (child) care({ kind: 'repot', plantId: child.id, occurredOn: dividedOn, newMedium: child.medium, note: `Division of ${parentTag}, four bulbs with a lead.` });
    }
  }
  const moved = byTag(S.movedTag);
  if (moved) {
    const day = Math.max(dayNumber(moved.acquiredOn!), latestMonthDay(today, autumnMonth, rng.int(5, 25)));
    care({ kind: 'move', plantId: moved.id, occurredOn: dateOf(day), toAreaId: areaId('IW'), note: 'Brought in from the shade-house bench before the first cold nights.' });
  }
  const cold = byTag(S.coldDamagedTag);
  if (cold) {
    const day = Math.max(dayNumber(cold.acquiredOn!), latestMonthDay(today, winterMonth, rng.int(8, 25)));
    care({ kind: 'damage', plantId: cold.id, occurredOn: dateOf(day), damageKind: 'cold', note: 'Leaf tips blackened after a 3 °C night on the wall.' });
  }
  const rotted = byTag(S.rottedLeadTag);
  if (rotted) {
    const rottedLead = leads.find((l) => l.plantId === rotted.id && l.status === 'rotted');
    if (rottedLead) {
      const lastDay = Math.max(...measurements.filter((m) => m.leadId === rottedLead.id).map((m) => dayNumber(m.measuredOn)));
      care({ kind: 'damage', plantId: rotted.id, occurredOn: dateOf(lastDay), damageKind: 'rot', note: 'New lead went soft and black at the base.' });
      care({ kind: 'treat', plantId: rotted.id, occurredOn: dateOf(Math.min(today, lastDay + 1)), product: 'Copper-based fungicide', target: 'Lead rot', note: 'Cut out the rot and dusted the wound; followed the label, gloves on.' });
    }
  }
  const treated = byTag('SH-009');
  if (treated) {
    care({ kind: 'treat', plantId: treated.id, occurredOn: dateOf(today - rng.int(20, 40)), product: 'Horticultural oil', target: 'Scale insects', note: 'Wiped the leaves, then sprayed outdoors; repeat in two weeks.' });
  }
  const repotted = byTag('IW-002');
  if (repotted) {
    care({ kind: 'repot', plantId: repotted.id, occurredOn: dateOf(Math.max(dayNumber(repotted.acquiredOn!), seasonStartDay(currentSeason, startMonth) + 10)), newMedium: 'LECA', note: 'Out of old sphagnum into LECA.' });
  }
  const shrinking = byTag(S.shrinkingTag);
  if (shrinking) {
    care({ kind: 'note', plantId: shrinking.id, occurredOn: dateOf(today - rng.int(3, 10)), note: 'Smaller again this year. Repot into fresh bark next spring.' });
  }
  // A few repots across a large collection.
  for (const plant of plants.slice(CATALOG.length)) {
    if (rng.chance(0.08)) {
      const day = today - rng.int(30, 400);
      if (day >= dayNumber(plant.acquiredOn!)) care({ kind: 'repot', plantId: plant.id, occurredOn: dateOf(day), newMedium: plant.medium ?? 'bark', note: null });
    }
  }

  const scenarioTags = [
    S.abortedLeadTag, S.stalledLeadTag, S.rottedLeadTag, S.emptySheathTag, S.drySheathBloomerTag, S.shrinkingTag,
    S.growingTag, S.inProgressTag, S.movedTag, S.coldDamagedTag, ...(hasDivision ? S.divisionFamily : []),
  ].filter((tag) => present.has(tag));

  return { areas, plants, leads, measurements, bloomRecords, careEntries, seasons, currentSeason, scenarioTags };
}

interface GrowContext {
  rng: Random;
  ids: Random;
  lead: GeneratedLead;
  plan: LeadPlan;
  profile: GenusProfile;
  leaves: number;
  /** The plant's usual mature size, for flower counts. */
  flowerBase: number;
  perLead: number;
  today: number;
  measurements: GeneratedMeasurement[];
  bloomRecords: GeneratedBloomRecord[];
}

/** Plans one lead's measurements and bloom, then keeps what happened on or before today. */
function growLead(ctx: GrowContext): void {
  const { rng, ids, lead, plan, profile, today } = ctx;
  const { firstSeenDay, asymptote, midpoint, scale, fate } = plan;
  const matureAt = Math.round(midpoint + 3 * scale); // ~95% of the asymptote
  const age = today - firstSeenDay;
  const planned: PlannedMeasurement[] = [];
  let bloom: { buds: number; open: number; faded: number } | null = null;
  let status: LeadStatus = 'growing';
  const formingAt = midpoint + scale * rng.between(0.3, 1.0);

  // Post-maturity events (sheath follow-ups), as days after first seen.
  const post: PlannedMeasurement[] = [];
  let endOfGrowth = matureAt;
  if (fate.kind === 'normal') {
    if (fate.sheath === 'bloom' || fate.sheath === 'dry-bloom') {
      let buds: number;
      let open: number;
      if (fate.sheath === 'dry-bloom') {
        const dry = matureAt + rng.int(...DRY_SHEATH_TIMING.dryAfterMaturity);
        buds = matureAt + rng.int(...DRY_SHEATH_TIMING.budsAfterMaturity);
        open = buds + rng.int(...DRY_SHEATH_TIMING.openAfterBuds);
        post.push({ t: dry, sheath: 'dry', note: 'Sheath turning brown and papery; no buds yet.' });
        post.push({ t: Math.round((dry + buds) / 2), sheath: 'dry', note: null });
        post.push({ t: buds, sheath: 'budded', note: 'Buds showing inside the dry sheath.', buds: true });
      } else {
        buds = matureAt + rng.int(...profile.budsAfterMaturity);
        open = buds + rng.int(...profile.openAfterBuds);
        post.push({ t: buds, sheath: profile.sheathed ? 'budded' : 'none', note: profile.sheathed ? 'Buds up in the sheath.' : 'Buds showing.', buds: true });
      }
      bloom = { buds, open, faded: open + rng.int(...profile.fadeAfterOpen) };
    } else if (fate.sheath === 'empty') {
      const empty = matureAt + rng.int(30, 60);
      post.push({ t: empty, sheath: 'empty', note: 'Sheath still green, nothing inside.' });
      post.push({ t: empty + rng.int(40, 60), sheath: 'empty', note: 'Sheath stayed empty.' });
    } else {
      post.push({ t: matureAt + rng.int(40, 80), sheath: 'none', note: null });
    }
  }

  const growthCount = Math.max(3, ctx.perLead - post.length);
  if (fate.kind === 'aborted') {
    // Grows briskly, stops at `cap`, stays flat; dried off after 5–7 weeks flat (or still "growing").
    const capAt = Math.round(midpoint * 0.55);
    const flatDays = fate.status === 'dried_off' ? Math.min(rng.int(36, 50), Math.max(36, age - capAt)) : Number.POSITIVE_INFINITY;
    endOfGrowth = Math.min(capAt + flatDays, age);
    // A logistic rise to the cap over `capAt` days, then flat.
    const capped = (t: number) => (t >= capAt ? fate.cap : (fate.cap * logistic((10 * t) / capAt, 1, 5, 1.3)) / logistic(10, 1, 5, 1.3));
    for (let t = rng.int(0, 4); t <= endOfGrowth; t += 14 + rng.int(-1, 1)) planned.push({ t, sheath: 'none', note: null, height: capped(t) });
    // Still 'growing': the grower measured it again in the last few days.
    if (fate.status === 'growing' && planned.length > 0 && planned[planned.length - 1].t < age - 5) {
      const t = age - rng.int(0, 2);
      planned.push({ t, sheath: 'none', note: 'Still no gain.', height: capped(t) });
    }
    if (fate.status === 'dried_off' && capAt + flatDays <= age) {
      const last = planned[planned.length - 1];
      last.note = 'No growth for weeks; lead yellowing and drying off.';
      status = 'dried_off';
    }
  } else if (fate.kind === 'rotted') {
    const rotAt = Math.round(midpoint + scale * Math.log(fate.atShare / (1 - fate.atShare)));
    const step = rotAt / Math.max(2, Math.ceil(rotAt / 14));
    for (let t = rng.int(0, 4); t <= rotAt + 0.5; t += step) planned.push({ t: Math.round(t), sheath: 'none', note: null });
    planned[planned.length - 1].note = 'Soft and black at the base; rotted.';
    if (rotAt <= age) status = 'rotted';
    endOfGrowth = rotAt;
  } else {
    const t0 = rng.int(0, 5);
    const step = (matureAt - t0) / (growthCount - 1);
    for (let i = 0; i < growthCount; i++) {
      const jitter = i === 0 || i === growthCount - 1 ? 0 : rng.int(-2, 2);
      const t = Math.round(t0 + i * step + jitter);
      const sheath: SheathState = profile.sheathed && t >= formingAt ? 'forming' : 'none';
      planned.push({ t, sheath, note: null });
    }
    for (const p of planned) if (p.sheath === 'forming') {
      p.note = 'Sheath showing.';
      break;
    }
    planned.push(...post);
    if (matureAt <= age) status = 'mature';
  }

  // Heights, leaves, roots, width; keep days strictly increasing and on or before today.
  const rootStart = rng.int(21, 42);
  const rootPeak = fate.kind === 'aborted' ? rng.int(0, 1) : rng.int(...ctx.profile.rootTips);
  let lastDay = -1;
  let lastHeight = 0;
  let leafShown = false;
  let budsDay: number | null = null;
  for (const p of planned) {
    const day = Math.max(firstSeenDay + p.t, lastDay + 3);
    if (day > today) break;
    const t = day - firstSeenDay;
    const curve = p.height ?? logistic(t, asymptote, midpoint, scale);
    const noise = p.height !== undefined ? rng.normal() * 0.4 : rng.normal() * (0.6 + 0.01 * curve);
    let height = clamp(Math.round(curve + noise), 1, 1500);
    if (t > endOfGrowth && fate.kind === 'normal') height = clamp(Math.round(Math.max(lastHeight - 1, curve + rng.normal() * 0.6)), 1, 1500);
    const share = clamp(height / (fate.kind === 'normal' ? asymptote : Math.max(asymptote, height)), 0, 1);
    const leafCount = Math.min(30, Math.round(ctx.leaves * clamp(share * 1.35 - 0.15, 0, 1)));
    if (leafCount > 0 && !leafShown && ctx.leaves === 1 && p.note === null) p.note = 'First leaf unfolding.';
    if (leafCount > 0) leafShown = true;
    const rootTips = t < rootStart ? 0 : Math.max(0, Math.round(rootPeak * clamp((t - rootStart) / 40, 0, 1) * (t > matureAt ? 0.4 : 1) + rng.normal() * 0.5));
    const bulbWidthMm = share > 0.5 && rng.chance(0.4) ? clamp(round1(height * profile.widthShare * (0.7 + 0.3 * share) * rng.between(0.95, 1.05)), 0.5, 300) : null;
    ctx.measurements.push({
      id: ids.uuid(),
      leadId: lead.id,
      measuredOn: dateOf(day),
      heightMm: height,
      leafCount,
      sheath: p.sheath,
      rootTips,
      bulbWidthMm,
      note: p.note,
    });
    lastDay = day;
    lastHeight = height;
    if (p.buds) budsDay = day;
  }
  lead.status = status;

  if (bloom && budsDay !== null) {
    const open = Math.max(firstSeenDay + bloom.open, budsDay + 5);
    const faded = Math.max(firstSeenDay + bloom.faded, open + 2);
    const sizeShare = asymptote / ctx.flowerBase;
    const spikes = rng.int(profile.spikes[0], profile.spikes[1]);
    let flowers = 0;
    for (let i = 0; i < spikes; i++) flowers += Math.max(1, Math.round(rng.between(profile.flowersPerSpike[0], profile.flowersPerSpike[1]) * clamp(sizeShare, 0.5, 1.5)));
    ctx.bloomRecords.push({
      id: ids.uuid(),
      leadId: lead.id,
      budsSeenOn: dateOf(budsDay),
      firstOpenOn: open <= today ? dateOf(open) : null,
      lastFadedOn: faded <= today ? dateOf(faded) : null,
      flowerCount: open <= today ? Math.min(500, flowers) : null,
      spikeCount: spikes,
      note: null,
    });
  }
}
