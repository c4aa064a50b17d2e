import { describe, expect, it } from 'vitest';
import { trendSentence } from '@/features/plants/trend-story';
import type { PlantTrendResponse } from '@/shared/schemas/engine';

const ID = '11111111-1111-4111-8111-111111111111';

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
