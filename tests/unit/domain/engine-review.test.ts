// Regression tests for the review of the engine on the demo collection (generated scenarios only).
import { describe, expect, it } from 'vitest';
import { attentionList } from '@/domain/attention';
import { backtestBloomForecasts } from '@/domain/backtest';
import { CHANCE_FACTORS, forecastBloom, maturedOn, shrinkLogInterval, SHRINKAGE_MAX_SHIFT_SE, type BloomHistory } from '@/domain/bloom-window';
import { addDays, daysBetween } from '@/domain/dates';
import { formatDate } from '@/domain/words';
import { CATTLEYA_DEFAULTS, STANHOPEA_DEFAULTS } from '@/domain/genus-defaults';
import { fitLeadCurve } from '@/domain/growth-curve';
import { forecastLead } from '@/domain/lead-forecast';
import { compareWithPriorYears } from '@/domain/prior-years';
import type { Lead, Measurement } from '@/domain/types';
import { buildLead, buildMeasurement, buildPlant, measureAlongCurve } from './builders';

const CURVE = { a: 160, m: 70, s: 16 };

// A finished season: measured every 14 days on CURVE, sheath on day 153, open on 1 October.
function season(year: number, plantId = 'plant-1'): BloomHistory {
  const lead = buildLead({ season: year, status: 'mature', id: `${plantId}-${year}`, plantId });
  const ms = measureAlongCurve(lead, CURVE, 182, 14);
  ms.push(buildMeasurement(lead, 153, 160, { sheath: 'forming', id: `${lead.id}-sheath` }));
  return { lead, measurements: ms, bloom: { leadId: lead.id, budsSeen: null, firstOpen: `${year}-10-01`, lastFaded: null, flowerCount: 4, spikeCount: 1 } };
}

describe('young lead against last season (like with like)', () => {
  // Two measurements only (an 'insufficient' fit), exactly on last season's curve at the same age.
  const lead = buildLead({ season: 2026, id: 'young' });
  const current: BloomHistory = { lead, measurements: [buildMeasurement(lead, 42, 40), buildMeasurement(lead, 56, 64)], bloom: null };
  const history = [season(2025)];
  const today = addDays(lead.firstSeen, 56);

  it('does not penalise a lead as big as last season was at the same age', () => {
    const fit = fitLeadCurve(current.measurements, lead, { genusDefaults: CATTLEYA_DEFAULTS, today });
    const withoutFit = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, fit: { ...fit, method: 'insufficient' }, today });
    const prior = compareWithPriorYears({ current, plant: buildPlant(), plantLeads: [...history, current], today });
    expect(prior.lastSeason!.sizeRatio!).toBeGreaterThan(0.9);
    expect(withoutFit.chanceReasons.join(' ')).not.toMatch(/% of last season's/);
    // Only the plant's record counts: bloomed 1 of 1 seasons, shrunk toward the genus rate.
    expect(withoutFit.chance).toBeCloseTo((1 + 3 * CATTLEYA_DEFAULTS.bloomRate) / (1 + 3), 10);
  });

  it('expects flowers from the mature size the young lead is heading for, not its height today', () => {
    // Three seasons of 100, 150 and 200 mm with 2, 3 and 4 flowers; this lead tracks the 200 mm one.
    const sized = (year: number, a: number, flowers: number): BloomHistory => {
      const l = buildLead({ season: year, status: 'mature', id: `s-${year}` });
      return { lead: l, measurements: measureAlongCurve(l, { ...CURVE, a }, 182, 14), bloom: { leadId: l.id, budsSeen: null, firstOpen: `${year}-10-01`, lastFaded: null, flowerCount: flowers, spikeCount: 1 } };
    };
    const hist = [sized(2023, 100, 2), sized(2024, 150, 3), sized(2025, 200, 4)];
    const l = buildLead({ season: 2026, id: 'tracking' });
    const young: BloomHistory = { lead: l, measurements: [buildMeasurement(l, 42, 0.5 * 200 * 0.5), buildMeasurement(l, 56, 200 * 0.4)], bloom: null };
    const f = forecastBloom({ current: young, history: hist, genusDefaults: CATTLEYA_DEFAULTS, fit: null, today: addDays(l.firstSeen, 56) });
    expect(f.expectedFlowers.basis).toBe('plant-by-size');
    expect(f.expectedFlowers.perSpike).toBeGreaterThan(3.5);
  });

  it('still penalises a young lead that is small for its age, saying so', () => {
    const small: BloomHistory = { lead, measurements: [buildMeasurement(lead, 42, 20), buildMeasurement(lead, 56, 30)], bloom: null };
    const f = forecastBloom({ current: small, history, genusDefaults: CATTLEYA_DEFAULTS, fit: null, today });
    expect(f.chanceReasons.join(' ')).toMatch(/% of last season's lead at the same age \(56 days\)/);
    const base = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, fit: null, today });
    expect(f.chance).toBeCloseTo(base.chance * CHANCE_FACTORS.muchSmallerLead, 10);
  });
});

describe('windows of leads not open yet start no earlier than today', () => {
  // Matured (sheath) on 3 August; on 1 December it has not opened.
  const lead = buildLead({ season: 2026, status: 'mature', id: 'late' });
  const current: BloomHistory = {
    lead,
    measurements: [...measureAlongCurve(lead, CURVE, 140, 14), buildMeasurement(lead, daysBetween(lead.firstSeen, '2026-08-03'), 160, { sheath: 'forming' })],
    bloom: null,
  };
  const history = [season(2024), season(2025)];

  it('conditions the distribution on "not open by today" and says so', () => {
    const today = '2026-10-20';
    const f = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today });
    expect(f.firstOpen!.p10 >= today).toBe(true);
    expect(f.firstOpen!.p10 < f.firstOpen!.p50 && f.firstOpen!.p50 < f.firstOpen!.p90).toBe(true);
    expect(f.notes.join(' ')).toMatch(/not open by 2026-10-20/);
    const early = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-08-04' });
    expect(early.notes.join(' ')).not.toMatch(/not open by/);
    expect(f.firstOpen!.p90 >= early.firstOpen!.p90).toBe(true);
  });

  it.each(['2026-09-15', '2026-10-01', '2026-10-20'])('no percentile before today on %s', (today) => {
    const f = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today });
    expect(f.firstOpen!.p10 >= today).toBe(true);
    expect(f.firstOpen!.p10 <= f.firstOpen!.p50 && f.firstOpen!.p50 <= f.firstOpen!.p90).toBe(true);
  });

  it('two months past its usual 1 October it is late, its chance low and falling', () => {
    const nov = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-11-10' });
    const dec = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-12-01' });
    for (const f of [nov, dec]) {
      expect(f.timing).toBe('late');
      expect(f.late!.likelyWas < '2026-10-15').toBe(true);
    }
    expect(dec.late!.daysLate).toBeGreaterThan(nov.late!.daysLate);
    expect(dec.chance).toBeLessThan(nov.chance);
    expect(dec.chance).toBeLessThan(0.15);
  });

  it.each(['2027-01-15', '2027-03-01'])('past its latest plausible date, on %s it is probably not flowering this season', (today) => {
    const f = forecastBloom({ current, history, genusDefaults: CATTLEYA_DEFAULTS, today });
    expect(f.timing).toBe('unlikely');
    expect(f.firstOpen).toBeNull();
    expect(f.latestPlausible! < today).toBe(true);
    expect(f.chance).toBeLessThan(0.05);
    expect(f.chanceReasons.join(' ')).toMatch(/past the latest date its record makes plausible/);
  });

  it('counts a growing lead past its predicted maturity from today', () => {
    const g: BloomHistory = { lead: buildLead({ season: 2026, id: 'slow' }), measurements: [], bloom: null };
    const f = forecastBloom({ current: g, history, genusDefaults: CATTLEYA_DEFAULTS, today: '2026-09-01', fit: { maturityDate: '2026-08-01', method: 'free', matureHeightMm: 160 } as never });
    expect(f.firstOpen!.p10 >= '2026-09-01').toBe(true);
    expect(f.notes.join(' ')).toMatch(/past its predicted maturity date 2026-\d\d-\d\d and not mature yet/);
  });
});

// A lead that grew to half size by day 70 and stayed flat, measured weekly until `until`.
function stalledLead(plantId: string, until: string): BloomHistory {
  const lead = buildLead({ season: 2026, id: `${plantId}-2026`, plantId });
  const ms: Measurement[] = [];
  for (let age = 0; age <= daysBetween(lead.firstSeen, until); age += 7) ms.push(buildMeasurement(lead, age, Math.round(80 * Math.min(1, age / 70) + 1)));
  return { lead, measurements: ms, bloom: null };
}

describe('aborted by the stall limit', () => {
  it('gives a lead aborted by a long stall no bloom window and the reason', () => {
    const plant = buildPlant();
    const current = stalledLead('plant-1', '2026-09-01');
    const f = forecastLead({ plant, leads: [season(2025), current], leadId: current.lead.id, today: '2026-09-01' })!;
    const aborted = f.flags.find((x) => x.kind === 'aborted');
    expect(aborted).toBeDefined();
    expect(current.lead.status).toBe('growing');
    expect(f.bloom.stage).toBe('lost');
    expect(f.bloom.chance).toBe(0);
    expect(f.bloom.firstOpen).toBeNull();
    expect(f.bloom.chanceReasons).toContain(aborted!.reason);
  });
});

describe('Today list and lead page agree', () => {
  it('bloom item carries the lead page chance for a mature lead', () => {
    const plant = buildPlant({ id: 'p' });
    const lead: Lead = buildLead({ season: 2026, status: 'mature', id: 'p-2026', plantId: 'p' });
    // Sheathed at 140 mm on a curve heading for 150 mm, last season 160 mm: 88% by its tallest
    // height, about 94% by the fit's mature height — the two sides used to disagree on the chance.
    const ms = [...measureAlongCurve(lead, { a: 150, m: 70, s: 16 }, 112, 14), buildMeasurement(lead, 113, 140, { sheath: 'forming', id: 'sh' })];
    const current: BloomHistory = { lead, measurements: ms, bloom: null };
    const leads = [season(2023, 'p'), season(2024, 'p'), season(2025, 'p'), current];
    const today = '2026-09-01';
    const page = forecastLead({ plant, leads, leadId: lead.id, today })!;
    const items = attentionList([{ plant, leads }], today, { bloomLookaheadDays: 120 });
    const bloom = items.find((i) => i.kind === 'bloom')!;
    expect(bloom).toBeDefined();
    expect(bloom.date).toBe(page.bloom.firstOpen!.p10);
    expect(bloom.reason).toContain(`(${Math.round(page.bloom.chance * 100)}%)`);
    expect(bloom.reason).toContain(`about ${formatDate(page.bloom.firstOpen!.p50)}`);
    expect(bloom.story.bloom).toBe(bloom.reason);
  });
});

describe("a division's inherited parent leads", () => {
  const parent = buildPlant({ id: 'parent' });
  const division = buildPlant({ id: 'div', parentPlantId: 'parent', dividedOn: '2026-05-01' });
  // The parent's own still-growing lead, first seen before the division date.
  const parentLead = stalledLead('parent', '2026-09-01');
  const parentLeads = [season(2023, 'parent'), season(2024, 'parent'), season(2025, 'parent'), parentLead];
  const divLead = buildLead({ season: 2026, id: 'div-2026', plantId: 'div', firstSeen: '2026-06-01' });
  const divCurrent: BloomHistory = { lead: divLead, measurements: measureAlongCurve(divLead, CURVE, 84, 14), bloom: null };
  const divisionHistory = [...parentLeads, divCurrent];

  it("are not reported as the division's current leads", () => {
    const items = attentionList([{ plant: division, leads: divisionHistory }], '2026-09-01');
    expect(items.every((i) => i.target.leadId === 'div-2026')).toBe(true);
    expect(items.some((i) => i.target.leadId === parentLead.lead.id)).toBe(false);
  });

  it("are not scored twice in the backtest", () => {
    const divSeason = season(2027, 'div');
    const r = backtestBloomForecasts([
      { plant: parent, leads: parentLeads },
      { plant: division, leads: [...parentLeads, divSeason] },
    ]);
    // One season of its own, tested at each stage it went through (growing, sheath, buds).
    expect([...new Set(r.rows.filter((x) => x.plantId === 'div').map((x) => x.leadId))]).toEqual(['div-2027']);
    expect(r.rows.filter((x) => x.plantId === 'div' && x.atMaturity)).toHaveLength(1);
    expect(r.n).toBe(3 + 1);
  });
});

describe('limited translation of the interval shrinkage', () => {
  const genus = { mu: Math.log(66), sigma: 0.55 };
  it('leaves the weight n/(n + k) when the plant is near the genus', () => {
    const plain = shrinkLogInterval([61, 62, 60], genus);
    const limited = shrinkLogInterval([61, 62, 60], genus, undefined, { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE });
    expect(limited.weight).toBe(plain.weight);
    expect(limited.mu).toBe(plain.mu);
  });

  it('keeps a consistent plant far from the genus within one standard error of its own mean', () => {
    const days = [210, 220, 200];
    const plain = shrinkLogInterval(days, genus);
    const limited = shrinkLogInterval(days, genus, undefined, { maxShiftSe: SHRINKAGE_MAX_SHIFT_SE });
    const own = days.reduce((s, d) => s + Math.log(d), 0) / 3;
    expect(limited.mu).toBeGreaterThan(plain.mu);
    expect(own - limited.mu).toBeCloseTo(limited.sigma / Math.sqrt(1 + 1 / 6) / Math.sqrt(3), 10);
    expect(limited.weight).toBeGreaterThan(plain.weight);
    expect(limited.sigma).toBe(plain.sigma);
  });
});

describe('maturity of a bulb without a sheath', () => {
  it('is where the growth curve levels off, not a late look a few millimetres taller', () => {
    // Stanhopea-like: on a curve to 54 mm by day 110 (measured every 10 days), then one look at
    // bud time five months later at 57 mm. 95% of 57 mm is 54.2 mm: the late look alone would pass.
    const lead = buildLead({ season: 2025, status: 'mature', id: 'stan' });
    const ms = measureAlongCurve(lead, { a: 54, m: 50, s: 12 }, 110, 10).map((m) => ({ ...m, heightMm: Math.round(m.heightMm) }));
    ms.push(buildMeasurement(lead, 260, 57));
    const matured = maturedOn({ lead, measurements: ms }, STANHOPEA_DEFAULTS)!;
    // The curve reaches 95% at m + s·ln 19 ≈ 85 days: the first look on or after it.
    expect(daysBetween(lead.firstSeen, matured)).toBe(90);
  });
});
