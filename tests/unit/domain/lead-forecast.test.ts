import { describe, expect, it } from 'vitest';
import type { BloomHistory } from '@/domain/bloom-window';
import { forecastLead } from '@/domain/lead-forecast';
import { buildLead, buildMeasurement, buildPlant, measureAlongCurve } from './builders';

// Generated: three seasons on a = 160 mm, m = 70 d, s = 16 d, flowering 61 days after the sheath.
function season(year: number): BloomHistory {
  const lead = buildLead({ season: year, status: 'mature' });
  const ms = measureAlongCurve(lead, { a: 160, m: 70, s: 16 }, 182, 14);
  ms.push(buildMeasurement(lead, 153, 160, { sheath: 'forming', id: `${lead.id}-sheath` }));
  return { lead, measurements: ms, bloom: { leadId: lead.id, budsSeen: null, firstOpen: `${year}-10-01`, lastFaded: null, flowerCount: 4, spikeCount: 1 } };
}

describe('forecastLead', () => {
  const plant = buildPlant();
  const lead = buildLead({ season: 2026 });
  const current: BloomHistory = { lead, measurements: measureAlongCurve(lead, { a: 165, m: 70, s: 16 }, 112, 14), bloom: null };
  const leads = [season(2023), season(2024), season(2025), current];

  it('puts fit, comparison, flags and bloom window together', () => {
    const f = forecastLead({ plant, leads, leadId: lead.id, today: '2026-06-21' })!;
    expect(f.fit.method).toMatch(/free|scale-only-plant-shape/);
    expect(f.fit.matureHeightMm).toBeGreaterThan(150);
    expect(f.fit.matureHeightMm).toBeLessThan(180);
    expect(f.priorYears.verdict).toBe('level');
    expect(f.flags).toEqual([]);
    expect(f.bloom.stage).toBe('growing');
    expect(f.bloom.firstOpen!.p50 > f.fit.maturityDate).toBe(true);
  });

  it('returns null for an unknown lead', () => {
    expect(forecastLead({ plant, leads, leadId: 'nope', today: '2026-06-21' })).toBeNull();
  });
});
