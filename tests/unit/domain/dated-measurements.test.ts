import { describe, expect, it } from 'vitest';
import { countOnOrBefore, datedMeasurements } from '@/domain/dated-measurements';
import { toDayNumber } from '@/domain/dates';
import { fitLeadCurve } from '@/domain/growth-curve';
import { genusDefaultsFor } from '@/domain/genus-defaults';
import { tallestHeight } from '@/domain/prior-years';
import type { Measurement } from '@/domain/types';
import { buildLead, buildMeasurement, measureAlongCurve } from './builders';

const lead = buildLead();
const other = buildLead({ id: 'lead-other', season: 2025 });

describe('datedMeasurements', () => {
  it("keeps the lead's own, validly dated looks, by date, same-day ones in list order, with day numbers", () => {
    const list: Measurement[] = [
      buildMeasurement(lead, 30, 40, { id: 'late' }),
      buildMeasurement(other, 5, 99),
      buildMeasurement(lead, 10, 20, { id: 'same-day-first' }),
      { ...buildMeasurement(lead, 12, 25), id: 'bad-date', date: '2026-02-30' },
      buildMeasurement(lead, 10, 21, { id: 'same-day-second' }),
      buildMeasurement(lead, 0, 5, { id: 'first' }),
    ];
    const d = datedMeasurements(list, lead.id);
    expect(d.ms.map((m) => m.id)).toEqual(['first', 'same-day-first', 'same-day-second', 'late']);
    expect(d.days).toEqual(d.ms.map((m) => toDayNumber(m.date)));
    expect(list[0].id).toBe('late'); // the caller's list is left as it was
  });

  it('is remembered per list and lead, and a list that grew is read again', () => {
    const list = measureAlongCurve(lead, { a: 100, m: 60, s: 12 }, 70);
    const first = datedMeasurements(list, lead.id);
    expect(datedMeasurements(list, lead.id)).toBe(first);
    expect(datedMeasurements(list, other.id).ms).toEqual([]);
    list.push(buildMeasurement(lead, 77, 95));
    const grown = datedMeasurements(list, lead.id);
    expect(grown).not.toBe(first);
    expect(grown.ms).toHaveLength(first.ms.length + 1);
  });

  it('counts the looks on or before a date (all of them without one)', () => {
    const d = datedMeasurements(measureAlongCurve(lead, { a: 100, m: 60, s: 12 }, 70), lead.id);
    expect(countOnOrBefore(d, undefined)).toBe(d.ms.length);
    expect(countOnOrBefore(d, d.ms[3].date)).toBe(4);
    expect(countOnOrBefore(d, '2000-01-01')).toBe(0);
  });

  it('readers that share a list see the same answers as with a fresh copy of it', () => {
    const list = measureAlongCurve(lead, { a: 120, m: 55, s: 10 }, 84).reverse();
    const genusDefaults = genusDefaultsFor('C.');
    const today = '2026-05-10';
    const shared = [fitLeadCurve(list, lead, { genusDefaults, today }), tallestHeight({ lead, measurements: list }, today)];
    const fresh = [fitLeadCurve([...list], lead, { genusDefaults, today }), tallestHeight({ lead, measurements: [...list] }, today)];
    expect(shared).toEqual(fresh);
    // A later day reads more of the same list.
    expect(tallestHeight({ lead, measurements: list }, '2026-06-30')).toBeGreaterThan(shared[1] as number);
  });
});
