import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addDays } from '@/domain/dates';
import { leadFlags, STALL_MIN_DAYS, type FlagInput } from '@/domain/flags';
import { CATTLEYA_DEFAULTS } from '@/domain/genus-defaults';
import { logisticHeight } from '@/domain/growth-curve';
import type { LeadHistory } from '@/domain/prior-years';
import type { Lead, Measurement } from '@/domain/types';
import { buildLead, buildMeasurement, buildPlant, measureAlongCurve } from './builders';

// Generated scenarios: last season's lead grew on a = 160 mm, m = 70 d, s = 16 d.
const LAST = { a: 160, m: 70, s: 16 };
const MEASURE_EVERY = 7;
const plant = buildPlant();
const lastLead = buildLead({ season: 2025, status: 'mature' });
const lastHistory: LeadHistory = { lead: lastLead, measurements: measureAlongCurve(lastLead, LAST, 182) };

/** A lead on last season's curve until `stopAge`, flat afterwards (±1 mm wobble). */
function stoppingLead(stopAge: number, until: number, lead: Lead = buildLead({ season: 2026 })): LeadHistory {
  const ms: Measurement[] = [];
  const stopHeight = logisticHeight(stopAge, LAST.a, LAST.m, LAST.s);
  for (let age = 0; age <= until; age += MEASURE_EVERY) {
    const h = age <= stopAge ? logisticHeight(age, LAST.a, LAST.m, LAST.s) : stopHeight + ((age / 7) % 2 === 0 ? 1 : -1);
    ms.push(buildMeasurement(lead, age, Math.round(h * 10) / 10));
  }
  return { lead, measurements: ms };
}

function input(current: LeadHistory, today: string, extra: Partial<FlagInput> = {}): FlagInput {
  return {
    current,
    plantLeads: [lastHistory, current],
    plant,
    genusDefaults: CATTLEYA_DEFAULTS,
    today,
    ...extra,
  };
}

/** First measuring day (age) on which a flag of `kind` appears, scanning the season. */
function firstFlagged(history: LeadHistory, kind: 'stalled' | 'aborted', until: number, extra: Partial<FlagInput> = {}) {
  for (let age = 0; age <= until; age += MEASURE_EVERY) {
    const today = addDays(history.lead.firstSeen, age);
    const flags = leadFlags(input(history, today, extra));
    if (flags.some((f) => f.kind === kind)) return { age, flags };
  }
  return null;
}

describe('stalled and aborted leads (generated scenarios)', () => {
  // Height stops at day 70 = half of last season's size (80 mm of 160 mm).
  const stopAge = 70;
  const stalled = stoppingLead(stopAge, 200);

  it(`flags a lead that stops at half of last season's size within ${STALL_MIN_DAYS} days plus one measuring interval`, () => {
    const hit = firstFlagged(stalled, 'stalled', 200);
    expect(hit).not.toBeNull();
    expect(hit!.age - stopAge).toBeLessThanOrEqual(STALL_MIN_DAYS + MEASURE_EVERY);
    const flag = hit!.flags[0];
    expect(flag.severity).toBe('warning');
    expect(flag.reason).toMatch(/^no height gain in \d+ days \(about \d+ mm expected\) at (4[5-9]|5[0-5])% of last season's final size$/);
    expect(flag.shareOfReference!).toBeCloseTo(0.5, 1);
  });

  it(`calls it aborted once the stall passes the genus limit (${CATTLEYA_DEFAULTS.stallAbortDays} days for C.)`, () => {
    const hit = firstFlagged(stalled, 'aborted', 200);
    expect(hit).not.toBeNull();
    expect(hit!.age - stopAge).toBeGreaterThanOrEqual(CATTLEYA_DEFAULTS.stallAbortDays);
    expect(hit!.age - stopAge).toBeLessThanOrEqual(CATTLEYA_DEFAULTS.stallAbortDays + MEASURE_EVERY);
    expect(hit!.flags[0].severity).toBe('alert');
    expect(hit!.flags[0].reason).toMatch(/past the 60-day limit for C\./);
  });

  it('calls it aborted at once when the plant starts a replacement lead after the stall', () => {
    const replacement = buildLead({ season: 2026, id: 'lead-2026-b', label: '2026-B', firstSeen: addDays('2026-03-01', 95) });
    const today = addDays('2026-03-01', 105);
    const flags = leadFlags(input(stalled, today, { plantLeads: [lastHistory, stalled, { lead: replacement, measurements: [] }] }));
    expect(flags).toHaveLength(1);
    expect(flags[0].kind).toBe('aborted');
    expect(flags[0].reason).toMatch(/started lead 2026-B on 2026-06-04/);
  });

  it.each([
    ['dried_off', /^marked dried off by the grower at [\d.]+ mm at \d+% of last season's final size$/],
    ['rotted', /^marked rotted by the grower/],
  ] as const)('flags a lead the grower marked %s', (status, pattern) => {
    const lead = buildLead({ season: 2026, status });
    const h = { lead, measurements: measureAlongCurve(lead, LAST, 42) };
    const flags = leadFlags(input(h, '2026-05-01'));
    expect(flags).toHaveLength(1);
    expect(flags[0]).toMatchObject({ kind: 'aborted', severity: 'alert' });
    expect(flags[0].reason).toMatch(pattern);
  });

  it('does not flag a stop at 55% of last season for the first lead after a division, but does at 40%', () => {
    const divided = buildPlant({ dividedOn: '2025-12-01' });
    const at55 = stoppingLead(72, 150);
    const at40 = stoppingLead(63, 150);
    expect(firstFlagged(at55, 'stalled', 150, { plant: divided })).toBeNull();
    const hit = firstFlagged(at40, 'stalled', 150, { plant: divided });
    expect(hit).not.toBeNull();
    expect(hit!.flags[0].reason).toMatch(/division/);
  });

  it.each([
    ['a lead with a sheath', 'forming'],
    ['a lead marked mature', 'mature-status'],
  ])('does not flag %s', (_n, variant) => {
    const base = stoppingLead(stopAge, 140);
    const lead = variant === 'mature-status' ? { ...base.lead, status: 'mature' as const } : base.lead;
    const ms = base.measurements.map((m) => (variant === 'forming' ? { ...m, sheath: 'forming' as const } : m));
    expect(leadFlags(input({ lead, measurements: ms }, addDays(lead.firstSeen, 140)))).toEqual([]);
  });

  it.each([
    ['no measurements', []],
    ['one measurement', [0]],
  ])('returns no flags with %s', (_n, ages) => {
    const lead = buildLead({ season: 2026 });
    const h = { lead, measurements: ages.map((a) => buildMeasurement(lead, a, 5)) };
    expect(leadFlags(input(h, '2026-08-01'))).toEqual([]);
  });

  it('never flags a healthy lead (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.record({
          sizeRatio: fc.double({ min: 0.9, max: 1.3, noNaN: true }),
          m: fc.double({ min: 55, max: 90, noNaN: true }),
          s: fc.double({ min: 12, max: 22, noNaN: true }),
          noise: fc.array(fc.double({ min: -1.5, max: 1.5, noNaN: true }), { minLength: 30, maxLength: 30 }),
          every: fc.integer({ min: 5, max: 14 }),
        }),
        ({ sizeRatio, m, s, noise, every }) => {
          const lead = buildLead({ season: 2026 });
          const ms: Measurement[] = [];
          let i = 0;
          for (let age = 0; age <= 200 && i < noise.length; age += every, i++) {
            ms.push(buildMeasurement(lead, age, Math.max(0, logisticHeight(age, LAST.a * sizeRatio, m, s) + noise[i])));
          }
          const h = { lead, measurements: ms };
          for (const mm of ms) expect(leadFlags(input(h, mm.date))).toEqual([]);
        },
      ),
      { numRuns: Number(process.env.DOMAIN_PROPERTY_RUNS ?? 200) },
    );
  }, 120_000);
});
