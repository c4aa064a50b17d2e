import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  BUDS_OPEN_CHANCE,
  BLOOM_SHRINKAGE_K,
  CHANCE_FACTORS,
  blendWithSeason,
  forecastBloom,
  maturedOn,
  shrinkLogInterval,
  type BloomHistory,
} from '@/domain/bloom-window';
import { addDays, daysBetween } from '@/domain/dates';
import { BRASSAVOLA_DEFAULTS, CATTLEYA_DEFAULTS, DENDROBIUM_DEFAULTS } from '@/domain/genus-defaults';
import type { BloomRecord, Lead, SheathState, TemperatureReading } from '@/domain/types';
import { buildLead, buildMeasurement } from './builders';

// Generated scenarios: a Cattleya whose leads mature (sheath forming) on 1 August, show buds on
// 10 September, open on 1 October (61 days after maturity) and fade on 5 November.
function pastSeason(season: number, opts: { open?: boolean; sheath?: SheathState; height?: number; flowers?: number; spikes?: number } = {}): BloomHistory {
  const lead = buildLead({ season, status: 'mature' });
  const height = opts.height ?? 160;
  const measurements = [
    buildMeasurement(lead, 60, height * 0.5),
    buildMeasurement(lead, 120, height * 0.9),
    buildMeasurement(lead, daysBetween(lead.firstSeen, `${season}-08-01`), height, { sheath: opts.sheath ?? 'forming' }),
  ];
  const bloom: BloomRecord | null =
    opts.open === false
      ? null
      : {
          leadId: lead.id,
          budsSeen: `${season}-09-10`,
          firstOpen: `${season}-10-01`,
          lastFaded: `${season}-11-05`,
          flowerCount: opts.flowers ?? 4,
          spikeCount: opts.spikes ?? 1,
        };
  return { lead, measurements, bloom };
}

function currentLead(sheath: SheathState | null, overrides: Partial<Lead> = {}, height = 160): BloomHistory {
  const lead = buildLead({ season: 2026, ...overrides });
  const measurements = [buildMeasurement(lead, 60, height * 0.5), buildMeasurement(lead, 120, height * 0.9)];
  if (sheath) measurements.push(buildMeasurement(lead, daysBetween(lead.firstSeen, '2026-08-03'), height, { sheath }));
  return { lead, measurements, bloom: null };
}

const fourSeasons = [2022, 2023, 2024, 2025].map((s) => pastSeason(s));

describe('shrinkLogInterval (weight n/(n + k))', () => {
  it.each([
    [[], 0],
    [[60], 1 / (1 + BLOOM_SHRINKAGE_K)],
    [[60, 60, 60], 3 / (3 + BLOOM_SHRINKAGE_K)],
  ])('with plant intervals %j gives weight %d and the weighted log-mean', (days, w) => {
    const genus = { mu: Math.log(30), sigma: 0.5 };
    const r = shrinkLogInterval(days, genus);
    expect(r.weight).toBeCloseTo(w, 12);
    const expectedMu = days.length ? w * Math.log(60) + (1 - w) * Math.log(30) : Math.log(30);
    expect(r.mu).toBeCloseTo(expectedMu, 12);
    expect(r.sigma).toBeGreaterThan(0);
  });

  it('drops non-positive and non-finite intervals', () => {
    expect(shrinkLogInterval([0, -3, Number.NaN], { mu: 1, sigma: 0.2 }).n).toBe(0);
  });
});

describe('maturedOn', () => {
  it('is the first sheath for a sheathed genus and full height for Dendrobium', () => {
    const h = pastSeason(2025);
    expect(maturedOn(h, CATTLEYA_DEFAULTS)).toBe('2025-08-01');
    const lead = buildLead({ season: 2025, status: 'mature' });
    const den = { lead, measurements: [buildMeasurement(lead, 50, 100), buildMeasurement(lead, 100, 290), buildMeasurement(lead, 130, 300)] };
    expect(maturedOn(den, DENDROBIUM_DEFAULTS)).toBe(addDays(lead.firstSeen, 100));
    expect(maturedOn({ ...den, lead: { ...lead, status: 'growing' } }, DENDROBIUM_DEFAULTS)).toBeNull();
  });
});

describe('forecastBloom', () => {
  it('forecasts from maturity with the plant history shrunk toward the genus', () => {
    // The intervals alone (the seasonal blend is checked below).
    const f = forecastBloom({ current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10', seasonalPrior: false });
    expect(f.stage).toBe('sheath_forming');
    expect(f.stageDate).toBe('2026-08-03');
    expect(f.history.seasons).toBe(4);
    expect(f.history.weight).toBeCloseTo(4 / 7, 12);
    // Plant 61 days, genus 45 + 21 = 66 days: the likely date lies between.
    const likely = daysBetween('2026-08-03', f.firstOpen!.p50);
    expect(likely).toBeGreaterThanOrEqual(61);
    expect(likely).toBeLessThanOrEqual(66);
    expect(f.firstOpen!.p10 < f.firstOpen!.p50 && f.firstOpen!.p50 < f.firstOpen!.p90).toBe(true);
    expect(f.mode).toBe('days');
    expect(f.chance).toBeGreaterThan(0.85);
  });

  it('a short history gives a wider window than a long one', () => {
    const short = forecastBloom({ current: currentLead('forming'), history: fourSeasons.slice(3), genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
    const long = forecastBloom({ current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
    const span = (f: typeof short) => daysBetween(f.firstOpen!.p10, f.firstOpen!.p90);
    expect(span(short)).toBeGreaterThan(span(long));
  });

  it('switches to buds → open once buds are seen, and to the actual date once open', () => {
    const c = currentLead('budded');
    const buds = forecastBloom({ current: { ...c, bloom: { leadId: c.lead.id, budsSeen: '2026-09-12', firstOpen: null, lastFaded: null, flowerCount: null, spikeCount: null } }, history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-09-15' });
    expect(buds.stage).toBe('buds_visible');
    // Visible buds are very likely but not certain to open (bud blast).
    expect(buds.chance).toBe(BUDS_OPEN_CHANCE);
    expect(buds.chance).toBeLessThan(1);
    const d = daysBetween('2026-09-12', buds.firstOpen!.p50);
    expect(d).toBeGreaterThanOrEqual(21);
    expect(d).toBeLessThanOrEqual(22);
    const open = forecastBloom({ current: { ...c, bloom: { leadId: c.lead.id, budsSeen: '2026-09-12', firstOpen: '2026-10-02', lastFaded: null, flowerCount: 5, spikeCount: 1 } }, history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-10-05' });
    expect(open.stage).toBe('in_flower');
    expect(open.chance).toBe(1);
    expect(open.chanceReasons).toContain('in flower');
    const faded = forecastBloom({ current: { ...c, bloom: { leadId: c.lead.id, budsSeen: '2026-09-12', firstOpen: '2026-10-02', lastFaded: '2026-11-01', flowerCount: 5, spikeCount: 1 } }, history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-11-10' });
    expect(faded.stage).toBe('faded');
    expect(faded.chanceReasons).toEqual(['bloomed this season']);
    expect(open.firstOpen).toEqual({ p10: '2026-10-02', p50: '2026-10-02', p90: '2026-10-02' });
    expect(open.expectedFlowers.count).toBe(5);
  });

  it('uses the predicted maturity date of the growth fit while the lead grows', () => {
    const f = forecastBloom({
      current: currentLead(null),
      history: fourSeasons,
      genusDefaults: CATTLEYA_DEFAULTS,
      today: '2026-07-01',
      fit: { maturityDate: '2026-08-05', method: 'free', matureHeightMm: 165 } as never,
    });
    expect(f.stage).toBe('growing');
    expect(f.firstOpen).not.toBeNull();
    expect(f.notes.join(' ')).toMatch(/predicted maturity date 2026-08-05/);
  });

  it('gives no window for a growing lead with no fit, and none for a lost lead', () => {
    expect(forecastBloom({ current: currentLead(null), history: [], genusDefaults: CATTLEYA_DEFAULTS, today: '2026-07-01' }).firstOpen).toBeNull();
    const lost = forecastBloom({ current: currentLead('forming', { status: 'rotted' }), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
    expect(lost.stage).toBe('lost');
    expect(lost.chance).toBe(0);
    expect(lost.firstOpen).toBeNull();
  });

  it.each([
    ['B. (green-sheath bloomer), dry sheath', BRASSAVOLA_DEFAULTS, 'dry', false, CHANCE_FACTORS.drySheathGreenBloomer],
    ['C. with unknown habit, dry sheath', CATTLEYA_DEFAULTS, 'dry', false, CHANCE_FACTORS.drySheathUnknownHabit],
    ['C. that bloomed from dry sheaths before', CATTLEYA_DEFAULTS, 'dry', true, 1],
    ['C. with an empty sheath', CATTLEYA_DEFAULTS, 'empty', false, CHANCE_FACTORS.emptySheath],
  ] as const)('chance for %s', (_n, genus, sheath, dryHistory, factor) => {
    // The sheath formed on 3 August; on 10 September, when buds usually show, it is looked at
    // again. A sheath still forming rules nothing out yet; an empty or dry one means buds still
    // have to form and open, which rules out the usual days and moves the window later.
    const history = [2022, 2023, 2024, 2025].map((s) => pastSeason(s, { sheath: dryHistory ? 'dry' : 'forming' }));
    const withLook = (state: SheathState): BloomHistory => {
      const c = currentLead('forming');
      return { ...c, measurements: [...c.measurements, buildMeasurement(c.lead, daysBetween(c.lead.firstSeen, '2026-09-10'), 160, { sheath: state })] };
    };
    const base = forecastBloom({ current: withLook('forming'), history, genusDefaults: genus, today: '2026-09-10' });
    const f = forecastBloom({ current: withLook(sheath), history, genusDefaults: genus, today: '2026-09-10' });
    expect(f.shareGone).toBeGreaterThan(base.shareGone);
    // The chance: the sheath factor on the plant's record (as it stood on 3 August, before any
    // day had gone by), then conditioned on the share of the usual timing ruled out.
    const baseRecord = forecastBloom({ current: withLook('forming'), history, genusDefaults: genus, today: '2026-08-03' });
    expect(baseRecord.shareGone).toBe(0);
    const c = Math.min(0.98, baseRecord.chance * factor);
    const ahead = 1 - f.shareGone;
    expect(f.chance).toBeCloseTo((c * ahead) / (c * ahead + 1 - c), 10);
    expect(f.chance).toBeLessThan(base.chance * factor);
    // The window moves later and widens.
    expect(f.firstOpen!.p50 > base.firstOpen!.p50).toBe(true);
    expect(f.firstOpen!.p90 > base.firstOpen!.p90).toBe(true);
    expect(f.notes.join(' ')).toMatch(/may still bud later, or wait for next season/);
  });

  it('a lead much smaller than last season is less likely to bloom', () => {
    const small = forecastBloom({ current: currentLead('forming', {}, 90), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-03' });
    const full = forecastBloom({ current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-03' });
    expect(small.chance).toBeCloseTo(full.chance * CHANCE_FACTORS.muchSmallerLead, 10);
    expect(small.chanceReasons.join(' ')).toMatch(/56% of last season's final size/);
  });

  it('a plant that rarely blooms gets a lower chance than the genus rate', () => {
    const history = [2022, 2023, 2024, 2025].map((s) => pastSeason(s, { open: s === 2024 }));
    const f = forecastBloom({ current: currentLead('forming'), history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-03' });
    // (1 + 3·0.8)/(4 + 3)
    expect(f.chance).toBeCloseTo((1 + BLOOM_SHRINKAGE_K * 0.8) / (4 + BLOOM_SHRINKAGE_K), 10);
  });

  it('expects flowers per spike from bulb size across the plant history', () => {
    const history = [
      pastSeason(2022, { height: 100, flowers: 2 }),
      pastSeason(2023, { height: 150, flowers: 3 }),
      pastSeason(2024, { height: 200, flowers: 8, spikes: 2 }),
    ];
    const f = forecastBloom({ current: currentLead('forming', {}, 175), history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
    // Flowers per spike 2, 3, 4 at 100, 150, 200 mm: a line of 0.02 per mm, 3.5 at 175 mm.
    expect(f.expectedFlowers.basis).toBe('plant-by-size');
    expect(f.expectedFlowers.perSpike).toBeCloseTo(3.5, 10);
    const none = forecastBloom({ current: currentLead('forming'), history: [], genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
    expect(none.expectedFlowers).toMatchObject({ basis: 'genus', perSpike: CATTLEYA_DEFAULTS.flowersPerSpike });
  });

  it('runs in degree-days when temperature readings cover the history', () => {
    const readings: TemperatureReading[] = [];
    for (let d = '2022-01-01'; d <= '2026-08-10'; d = addDays(d, 1)) readings.push({ areaId: 'a', date: d, minC: 13.5, maxC: 23.5 });
    const f = forecastBloom({ current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10', readings });
    expect(f.mode).toBe('degree-days');
    // Constant 15 degree-days a day: the same answer as counting days (degree-day mode runs on
    // the intervals alone, so the days forecast is taken without the seasonal blend).
    const days = forecastBloom({ current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10', seasonalPrior: false });
    expect(Math.abs(daysBetween(days.firstOpen!.p50, f.firstOpen!.p50))).toBeLessThanOrEqual(1);
  });

  it('blends in the plant\'s usual first-flower day once the lead has matured', () => {
    const input = { current: currentLead('forming'), history: fourSeasons, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' };
    const blended = forecastBloom(input);
    const intervals = forecastBloom({ ...input, seasonalPrior: false });
    const usual = fourSeasons.map((h) => daysBetween(`${h.lead.season}-08-03`, h.bloom!.firstOpen!));
    const lo = Math.min(...usual, daysBetween('2026-08-03', intervals.firstOpen!.p50));
    const hi = Math.max(...usual, daysBetween('2026-08-03', intervals.firstOpen!.p50));
    // A precision-weighted mean lies between the interval forecast and the seasonal days.
    const likely = daysBetween('2026-08-03', blended.firstOpen!.p50);
    expect(likely).toBeGreaterThanOrEqual(lo - 1);
    expect(likely).toBeLessThanOrEqual(hi + 1);
    expect(blended.notes.some((n) => n.includes('usual first-flower day'))).toBe(true);
    expect(blended.firstOpen!.p10 < blended.firstOpen!.p50 && blended.firstOpen!.p50 < blended.firstOpen!.p90).toBe(true);
  });

  it.each([
    ['no past first flower', [] as number[]],
    ['one past first flower', [0]],
  ])('blendWithSeason with %s', (_name, seasons) => {
    const past = seasons.map((i) => ({
      season: 2025 - i, leadId: `l${i}`, matureToOpenDays: 60, budsToOpenDays: null, sheathBudsToOpenDays: null, openToFadedDays: null, matureToOpenDegreeDays: null,
      budsToOpenDegreeDays: null, bloomed: true, bloomedFromDrySheath: false, tallestMm: 150, flowerCount: null, spikeCount: null,
      maturedOn: `${2025 - i}-08-01`, firstOpen: `${2025 - i}-09-30`,
    }));
    const ln = { mu: Math.log(60), sigma: 0.3 };
    const b = blendWithSeason('2026-08-01', 2026, ln, ln, past);
    if (seasons.length === 0) expect(b).toBeNull();
    else {
      // Interval and seasonal day agree (60 days after 1 August is 30 September): the blend is that day.
      expect(b!.window.p50).toBe('2026-09-30');
      expect(b!.seasonalWeight).toBeGreaterThan(0);
      expect(b!.seasonalWeight).toBeLessThan(1);
    }
  });

  it('percentiles are always ordered (fast-check)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 5, max: 200 }), { maxLength: 6 }), fc.constantFrom<SheathState>('none', 'forming', 'empty', 'dry'), (gaps, sheath) => {
        const history = gaps.map((g, i) => {
          const h = pastSeason(2015 + i);
          return { ...h, bloom: { ...h.bloom!, firstOpen: addDays(`${2015 + i}-08-01`, g), budsSeen: null } };
        });
        const f = forecastBloom({ current: currentLead(sheath === 'none' ? 'forming' : sheath), history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-10' });
        // A window, in order and from today on; or none only because the record says the time has gone.
        if (f.firstOpen === null) expect(f.timing).toBe('unlikely');
        else {
          expect(f.firstOpen.p10 <= f.firstOpen.p50 && f.firstOpen.p50 <= f.firstOpen.p90).toBe(true);
          expect(f.firstOpen.p10 >= '2026-08-10').toBe(true);
        }
        expect(f.chance).toBeGreaterThanOrEqual(0);
        expect(f.chance).toBeLessThanOrEqual(1);
      }),
      { numRuns: 200 },
    );
  });
});
