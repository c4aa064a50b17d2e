import { describe, expect, it } from 'vitest';
import { leadSummary, trustSummary } from '@/features/leads/lead-story';
import { trendSentence } from '@/features/plants/trend-story';
import type { LeadForecastResponse, PlantTrendResponse } from '@/shared/schemas/engine';

const ID = '11111111-1111-4111-8111-111111111111';

function forecast(overrides: { sizeRatio?: number | null; daysAhead?: number | null; status?: 'growing' | 'mature'; method?: 'free' | 'insufficient' } = {}): LeadForecastResponse {
  return {
    today: '2026-06-01',
    lead: { id: ID, plantId: ID, season: 2026, label: '2026-A', firstSeen: '2026-04-02', status: overrides.status ?? 'growing' },
    fit: {
      method: overrides.method ?? 'free',
      matureHeightMm: 210,
      interval80: { lowMm: 190, highMm: 230 },
      standardErrorMm: 10,
      midpointDays: 70,
      scaleDays: 14,
      maturityDays: 111,
      maturityDate: '2026-07-22',
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
      lastSeason: { leadId: ID, season: 2025, heightAtSameAgeMm: 100, sizeRatio: overrides.sizeRatio === undefined ? 0.82 : overrides.sizeRatio, daysAhead: overrides.daysAhead === undefined ? -9 : overrides.daysAhead, finalHeightMm: 220 },
      earlier: [],
      verdict: 'behind',
      shareOfLastSeasonFinal: 0.37,
      notes: [],
    },
    flags: [],
    bloom: {
      leadId: ID,
      stage: 'growing',
      stageDate: null,
      firstOpen: null,
      lastFadedLikely: null,
      mode: 'days',
      chance: 0.7,
      chanceReasons: [],
      expectedFlowers: { count: 4, perSpike: 4, spikes: 1, basis: 'genus' },
      history: { seasons: 0, weight: 0 },
      notes: [],
    },
    trust: { n: 0, medianAbsErrorDays: null, shareInside80: null, naive: { n: 0, medianAbsErrorDays: null }, beatsNaive: null },
  };
}

describe('leadSummary', () => {
  // The issue's own example sentence: "82% of last season's size at day 60, about 9 days behind".
  it('says how the lead stands against last season and when it should mature', () => {
    expect(leadSummary(forecast(), 'mm')).toBe(
      "82% of last season's size at day 60, about 9 days behind; likely mature around 22 Jul 2026 at about 210 mm (80%: 190–230 mm).",
    );
  });
  it.each([
    [4, 'about 4 days ahead'],
    [1, 'about 1 day ahead'],
    [0, 'level with last season'],
  ])('daysAhead %d reads "%s"', (daysAhead, words) => {
    expect(leadSummary(forecast({ daysAhead }), 'mm')).toContain(words);
  });
  it('without a season to compare, gives the height at this age', () => {
    expect(leadSummary(forecast({ sizeRatio: null }), 'mm')).toMatch(/^82 mm at day 60, with no earlier lead/);
  });
  it('shows inches when the collection uses them (210 mm = 8.3 in)', () => {
    expect(leadSummary(forecast(), 'in')).toContain('about 8.3 in (80%: 7.5–9.1 in)');
  });
  it('says nothing of maturing once the lead is mature', () => {
    expect(leadSummary(forecast({ status: 'mature' }), 'mm')).not.toContain('likely mature');
  });
});

describe('trustSummary', () => {
  it('admits when there is no history to check against', () => {
    expect(trustSummary(forecast())).toMatch(/Not enough history/);
  });
  it('reports the median error and the share inside the window in fifths', () => {
    const f = forecast();
    f.trust = { n: 5, medianAbsErrorDays: 6, shareInside80: 0.8, naive: { n: 5, medianAbsErrorDays: 9 }, beatsNaive: true };
    expect(trustSummary(f)).toBe(
      "Last seasons' forecasts for this plant were off by a median of 6 days; 4 in 5 fell inside the window. Expecting last season's date would have been off by 9 days.",
    );
  });
  it('says plainly when the forecast does no better than memory', () => {
    const f = forecast();
    f.trust = { n: 4, medianAbsErrorDays: 20, shareInside80: 1, naive: { n: 4, medianAbsErrorDays: 16 }, beatsNaive: false };
    expect(trustSummary(f)).toContain('off by 16 days, so trust your memory as much as this forecast.');
  });
});

describe('trendSentence', () => {
  const trend = (slope: number | null): PlantTrendResponse => ({
    plantId: ID,
    today: '2026-06-01',
    seasons: [],
    slopeMmPerSeason: slope,
    rSquared: slope === null ? null : 0.81,
    residualSdMm: null,
    excludedSeasons: [],
    notes: [],
    flagHistory: [],
  });
  it.each([
    [12, 'growing by about 12 mm a season (r² 0.81)'],
    [-25, 'shrinking by about 25 mm a season'],
    [0.2, 'stayed about the same size'],
  ])('slope %d mm reads "%s"', (slope, words) => {
    expect(trendSentence(trend(slope), 'mm')).toContain(words);
  });
  it('does not call a scatter a trend', () => {
    const scattered = { ...trend(3), rSquared: 0.05 };
    expect(trendSentence(scattered, 'mm')).toBe('No clear trend: mature leads vary from season to season more than they grow or shrink (r² 0.05).');
  });
  it('needs two seasons', () => {
    expect(trendSentence(trend(null), 'mm')).toMatch(/Not enough mature leads/);
  });
});
