import { describe, expect, it } from 'vitest';
import { backtestBloomForecasts, type BacktestPlant } from '@/domain/backtest';
import type { BloomHistory } from '@/domain/bloom-window';
import { addDays, daysBetween } from '@/domain/dates';
import { buildLead, buildMeasurement, buildPlant } from './builders';

// Generated history: maturity moves around from season to season (±20 days), but first flower
// always follows maturity by 61 days — a plant whose memory-based date is poor.
const MATURITY_SHIFT = [0, 20, -15, 10, -20, 15];

function season(plantId: string, year: number, shift: number): BloomHistory {
  const lead = buildLead({ season: year, status: 'mature', id: `${plantId}-${year}`, plantId });
  const matured = addDays(`${year}-08-01`, shift);
  return {
    lead,
    measurements: [
      buildMeasurement(lead, 60, 80),
      buildMeasurement(lead, daysBetween(lead.firstSeen, matured), 160, { sheath: 'forming' }),
    ],
    bloom: { leadId: lead.id, budsSeen: null, firstOpen: addDays(matured, 61), lastFaded: null, flowerCount: 4, spikeCount: 1 },
  };
}

const collection: BacktestPlant[] = ['p1', 'p2'].map((id) => ({
  plant: buildPlant({ id }),
  leads: MATURITY_SHIFT.map((shift, i) => season(id, 2020 + i, shift)),
}));

describe('leave-one-season-out backtest', () => {
  const result = backtestBloomForecasts(collection);

  it('tests every season with a matured lead and a first flower', () => {
    expect(result.n).toBe(12);
    // The first season of each plant has no earlier bloom for the naive forecast.
    expect(result.naive.n).toBe(10);
  });

  it('beats "same day as last year" when flowering follows maturity', () => {
    expect(result.beatsNaive).toBe(true);
    // Plant interval 61 days shrunk toward the genus 66 days with weight 5/8, blended with the
    // plant's usual first-flower day, which its own seasons show to be poor (errors of 20–35
    // days): the day gets little weight, so the forecast stays well under the naive error.
    expect(result.medianAbsErrorDays!).toBeLessThanOrEqual(10);
    expect(result.medianAbsErrorDays!).toBeLessThan(result.naive.medianAbsErrorDays! / 3);
    // Naive errors are the season-to-season moves of maturity: 20, 35, 25, 30, 35 days.
    expect(result.naive.medianAbsErrorDays).toBe(30);
    // The window is sized from the errors the plant's seasons show, not from worst cases: an
    // 80% window holds most but not necessarily all of twelve dates.
    expect(result.shareInside80!).toBeGreaterThanOrEqual(0.75);
  });

  it('reports each season with its forecast and the naive date', () => {
    const row = result.rows.find((r) => r.leadId === 'p1-2021')!;
    expect(row.actual).toBe(addDays('2021-08-21', 61));
    expect(row.naive).toBe('2021-10-01');
    expect(row.naiveErrorDays).toBe(daysBetween('2021-10-01', row.actual));
  });

  it.each([
    ['an empty collection', []],
    ['plants without blooms', [{ plant: buildPlant(), leads: [{ ...season('p', 2020, 0), bloom: null }] }]],
  ])('handles %s', (_n, plants) => {
    const r = backtestBloomForecasts(plants as BacktestPlant[]);
    expect(r.n).toBe(0);
    expect(r.medianAbsErrorDays).toBeNull();
    expect(r.shareInside80).toBeNull();
    expect(r.beatsNaive).toBeNull();
  });
});
