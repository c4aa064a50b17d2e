// The one story per lead (src/domain/story.ts): sentences written from the engine's own figures.
import { describe, expect, it } from 'vitest';
import type { BloomForecast } from '@/domain/bloom-window';
import type { LeadForecast } from '@/domain/lead-forecast';
import { chanceLevel, CHANCE_LEVELS, chanceWords, leadStory, monthSpan, trustWords, uncertainWindow, windowWords } from '@/domain/story';

const bloom = (overrides: Partial<BloomForecast> = {}): BloomForecast => ({
  leadId: 'l',
  stage: 'growing',
  stageDate: null,
  timing: 'forecast',
  firstOpen: { p10: '2027-02-17', p50: '2027-03-14', p90: '2027-04-16' },
  late: null,
  latestPlausible: '2027-05-20',
  lastFadedLikely: '2027-04-18',
  mode: 'days',
  chance: 0.78,
  chanceReasons: [],
  expectedFlowers: { count: 4, perSpike: 4, spikes: 1, basis: 'genus' },
  history: { seasons: 3, weight: 0.5 },
  shareGone: 0,
  heldOutHalfWidthDays: null,
  notes: [],
  ...overrides,
});

function forecast(overrides: { bloom?: Partial<BloomForecast>; sizeRatio?: number | null; daysAhead?: number | null; share?: number; maturityDate?: string; flags?: LeadForecast['flags'] } = {}): LeadForecast {
  return {
    leadId: 'l',
    fit: {
      method: 'free',
      matureHeightMm: 210,
      interval80: { lowMm: 190, highMm: 230 },
      standardErrorMm: 10,
      midpointDays: 70,
      scaleDays: 14,
      maturityDays: 111,
      maturityDate: overrides.maturityDate ?? '2026-07-22',
      residualSdMm: 3,
      n: 6,
      degreesOfFreedom: 3,
      rSquared: 0.99,
      quality: 'good',
      ageDaysToday: 60,
      expectedHeightTodayMm: 70,
      notes: [],
    },
    priorYears: {
      ageDays: 60,
      heightMm: 82,
      lastSeason: { leadId: 'k', season: 2025, heightAtSameAgeMm: 100, sizeRatio: overrides.sizeRatio === undefined ? 0.82 : overrides.sizeRatio, daysAhead: overrides.daysAhead === undefined ? -9 : overrides.daysAhead, finalHeightMm: 220 },
      earlier: [],
      verdict: 'behind',
      shareOfLastSeasonFinal: overrides.share ?? 82 / 220,
      notes: [],
    },
    flags: overrides.flags ?? [],
    bloom: bloom(overrides.bloom),
  };
}

const growing: { id: string; status: 'growing' | 'mature'; season: number } = { id: 'l', status: 'growing', season: 2026 };
const story = (f: LeadForecast, lead = growing, today = '2026-06-01') => leadStory({ lead, forecast: f, today, units: 'mm' });

describe('one story per lead', () => {
  it('names each size figure: against last season at the same age and against its final size', () => {
    const s = story(forecast());
    expect(s.size).toBe("82 mm at day 60: 82% of last season's lead at the same age and 37% of last season's final size (220 mm); about 9 days behind it.");
    expect(s.figures).toMatchObject({ ofLastSeasonAtSameAge: 0.82, daysAhead: -9 });
  });

  it('drops the days ahead or behind near last season\'s final size, where a few millimetres take weeks', () => {
    const s = story(forecast({ sizeRatio: 0.95, daysAhead: -92, share: 0.95 }));
    expect(s.size).not.toMatch(/92 days/);
    expect(s.size).toMatch(/near last season’s final size/);
    expect(s.figures.daysAhead).toBeNull();
  });

  it('never dates a maturity in the past as what will happen', () => {
    const ahead = story(forecast({ maturityDate: '2026-07-22' }));
    expect(ahead.growth).toBe('Likely mature around 22 Jul 2026 at about 210 mm (80%: 190–230 mm).');
    const overdue = story(forecast({ maturityDate: '2026-05-10' }));
    expect(overdue.growth).toMatch(/^Past the date its curve put maturity at \(10 May 2026\) and still growing/);
  });

  it('gives a flagged lead its flag on the chip, and no maturity date', () => {
    const flag = { kind: 'stalled' as const, severity: 'warning' as const, reason: 'no height gain in 35 days (about 40 mm expected) at 48% of last season\'s final size', plantId: 'p', leadId: 'l', stalledSince: '2026-04-27', stallDays: 35, shareOfReference: 0.48 };
    const s = story(forecast({ flags: [flag] }));
    expect(s.chip).toEqual({ label: 'Stalled', tone: 'warning' });
    expect(s.flag).toBe(`Stalled: ${flag.reason}.`);
    expect(s.growth).toBeNull();
  });

  it('says a window of months in words, not as a likely date range', () => {
    const wide = story(forecast({ bloom: { firstOpen: { p10: '2027-04-12', p50: '2027-06-14', p90: '2027-12-28' }, chance: 0.87 } }));
    expect(wide.bloom).toBe('First flower sometime from April to December 2027 — timing uncertain until the bulb matures; flowering likely (87%), about 4 flowers.');
    expect(wide.figures.uncertain).toBe(true);
    expect(story(forecast()).bloom).toBe('First flower about 14 Mar 2027 (80%: 17 Feb – 16 Apr 2027); flowering likely (78%), about 4 flowers.');
  });

  it('tells a late lead as late, and one past its latest plausible date as probably not this season', () => {
    const late = story(forecast({ bloom: { stage: 'sheath_forming', timing: 'late', late: { likelyWas: '2026-11-21', daysLate: 12 }, firstOpen: { p10: '2026-12-05', p50: '2026-12-15', p90: '2026-12-28' }, chance: 0.61 } }), growing, '2026-12-03');
    expect(late.chip.label).toBe('Late to flower');
    expect(late.bloom).toBe('Late: its record made 21 Nov 2026 likely, 12 days ago. If it still flowers, most likely about 15 Dec 2026 (80%: 5 Dec – 28 Dec 2026); chance now possible (61%), falling each day it stays closed.');
    const gone = story(forecast({ bloom: { timing: 'unlikely', firstOpen: null, latestPlausible: '2026-11-28', chance: 0.03 } }), growing, '2026-12-03');
    expect(gone.bloom).toBe('Probably not flowering this season: not open yet and past 28 Nov 2026, the latest date its record makes plausible (chance very unlikely (3%)).');
  });

  it('writes a recorded flower as a record', () => {
    const s = story(forecast({ bloom: { stage: 'in_flower', timing: 'record', firstOpen: { p10: '2026-11-11', p50: '2026-11-11', p90: '2026-11-11' }, lastFadedLikely: '2026-12-16', chance: 1 } }), { ...growing, status: 'mature' }, '2026-12-03');
    expect(s.bloom).toBe('In flower since 11 Nov 2026; likely to fade about 16 Dec 2026.');
    expect(s.chance).toBeNull();
  });

  it('writes lengths in the collection\'s unit (210 mm = 8.3 in)', () => {
    const s = leadStory({ lead: growing, forecast: forecast(), today: '2026-06-01', units: 'in' });
    expect(s.growth).toContain('about 8.3 in');
  });

  it('tells the trust figures at the lead\'s own stage', () => {
    const figures = { n: 4, medianAbsErrorDays: 3, shareInside80: 0.75, naive: { n: 4, medianAbsErrorDays: 17 } };
    expect(trustWords('buds', figures)).toBe("Over 4 past seasons, this plant's forecasts made once buds were seen were off by a median of 3 days; 3 of 4 fell inside the window. Expecting last season's date would have been off by 17 days.");
    expect(trustWords('buds', { ...figures, n: 0, medianAbsErrorDays: null })).toMatch(/^Not enough history yet/);
    expect(trustWords(null, null)).toBe('Nothing left to forecast for this lead.');
  });
});

describe('chance words', () => {
  it.each([
    [0.99, 'almost certain', '●●●●'],
    [0.95, 'almost certain', '●●●●'],
    [0.8, 'likely', '●●●○'],
    [0.5, 'possible', '●●○○'],
    [0.2, 'unlikely', '●○○○'],
    [0.05, 'very unlikely', '○○○○'],
  ])('%d is %s', (chance, word, dots) => {
    expect(chanceLevel(chance)).toMatchObject({ word, dots });
    expect(chanceWords(chance)).toBe(`${word} (${Math.round(chance * 100)}%)`);
  });

  it('bands cover 0–1 from the top down', () => {
    expect(CHANCE_LEVELS.map((l) => l.min)).toEqual([...CHANCE_LEVELS.map((l) => l.min)].sort((a, b) => b - a));
    expect(CHANCE_LEVELS.at(-1)!.min).toBe(0);
  });
});

describe('windows in words', () => {
  it.each([
    [{ p10: '2026-12-12', p50: '2026-12-19', p90: '2026-12-30' }, 'about 19 Dec 2026 (80%: 12 Dec – 30 Dec 2026)'],
    [{ p10: '2026-12-20', p50: '2027-01-04', p90: '2027-01-30' }, 'about 4 Jan 2027 (80%: 20 Dec 2026 – 30 Jan 2027)'],
    [{ p10: '2026-11-02', p50: '2027-01-10', p90: '2027-03-30' }, 'sometime from November 2026 to March 2027 — timing uncertain'],
  ])('%j', (w, words) => {
    expect(windowWords(w)).toBe(words);
  });

  it('calls more than 90 days uncertain', () => {
    expect(uncertainWindow({ p10: '2027-01-01', p50: '2027-02-01', p90: '2027-04-01' })).toBe(false);
    expect(uncertainWindow({ p10: '2027-01-01', p50: '2027-02-01', p90: '2027-04-02' })).toBe(true);
    expect(monthSpan('2027-06-01', '2027-06-20')).toBe('June 2027');
  });
});
