import { describe, expect, it } from 'vitest';
import { attentionList, type AttentionPlant } from '@/domain/attention';
import type { BloomHistory } from '@/domain/bloom-window';
import { addDays, daysBetween } from '@/domain/dates';
import { logisticHeight } from '@/domain/growth-curve';
import type { Lead, Measurement, SheathState } from '@/domain/types';
import { buildLead, buildMeasurement, buildPlant, measureAlongCurve } from './builders';

// A generated collection on 2026-09-01.
const TODAY = '2026-09-01';
const CURVE = { a: 160, m: 70, s: 16 };

function lastSeason(plantId: string): BloomHistory {
  const lead = buildLead({ season: 2025, status: 'mature', id: `${plantId}-2025`, plantId });
  const measurements = measureAlongCurve(lead, CURVE, 182, 14);
  measurements.push(buildMeasurement(lead, 153, 160, { sheath: 'forming', id: `${plantId}-sheath` }));
  return {
    lead,
    measurements,
    bloom: { leadId: lead.id, budsSeen: '2025-09-10', firstOpen: '2025-10-01', lastFaded: '2025-11-01', flowerCount: 4, spikeCount: 1 },
  };
}

function current(plantId: string, overrides: Partial<Lead>, ms: (lead: Lead) => Measurement[]): BloomHistory {
  const lead = buildLead({ season: 2026, id: `${plantId}-2026`, plantId, ...overrides });
  return { lead, measurements: ms(lead), bloom: null };
}

function plantWith(id: string, lead: BloomHistory): AttentionPlant {
  return { plant: buildPlant({ id }), leads: [lastSeason(id), lead] };
}

const untilDay = (lead: Lead, date: string) => daysBetween(lead.firstSeen, date);
const withSheath = (lead: Lead, date: string, sheath: SheathState) =>
  buildMeasurement(lead, untilDay(lead, date), 160, { sheath, id: `${lead.id}-${date}` });

const collection: AttentionPlant[] = [
  // Growing, measured weekly until 9 August (day 161): 23 days ago.
  plantWith('p1-due', current('p1-due', {}, (l) => measureAlongCurve(l, { ...CURVE, m: 110 }, untilDay(l, '2026-08-09'), 7))),
  // Stopped at half size on day 70, measured weekly since.
  plantWith(
    'p2-stalled',
    current('p2-stalled', {}, (l) => {
      const out: Measurement[] = [];
      for (let age = 0; age <= untilDay(l, '2026-08-30'); age += 7) out.push(buildMeasurement(l, age, Math.round(logisticHeight(Math.min(age, 70), CURVE.a, CURVE.m, CURVE.s))));
      return out;
    }),
  ),
  // Mature with an empty sheath last looked at 10 days ago.
  plantWith('p3-sheath', current('p3-sheath', { status: 'mature' }, (l) => [...measureAlongCurve(l, CURVE, 140, 14), withSheath(l, '2026-08-22', 'empty')])),
  // Sheath formed on 10 August: with one season of history the window opens in early September.
  plantWith('p4-bloom', current('p4-bloom', { status: 'mature' }, (l) => [...measureAlongCurve(l, CURVE, 140, 14), withSheath(l, '2026-08-10', 'forming'), withSheath(l, '2026-08-28', 'forming')])),
  // Marked dried off by the grower.
  plantWith('p5-dried', current('p5-dried', { status: 'dried_off' }, (l) => measureAlongCurve(l, CURVE, 49, 7))),
];

describe('attentionList', () => {
  const items = attentionList(collection, TODAY);
  const kindsFor = (plantId: string) => items.filter((i) => i.target.plantId === plantId).map((i) => i.kind);

  it('lists each kind of item with a reason and a link target', () => {
    expect(kindsFor('p1-due')).toEqual(['measure']);
    expect(items.find((i) => i.target.plantId === 'p1-due')!.reason).toBe('no measurement in 23 days (measure every 14)');
    expect(kindsFor('p2-stalled')).toContain('aborted');
    expect(kindsFor('p3-sheath')).toContain('sheath');
    expect(items.find((i) => i.kind === 'sheath')!.reason).toMatch(/^sheath empty at the last look, 22 Aug 2026 \(10 days ago\)/);
    expect(kindsFor('p4-bloom')).toContain('bloom');
    expect(items.find((i) => i.kind === 'bloom')!.reason).toMatch(/^First flower about \d+ (Sep|Oct) 2026 \(80%: .+\); flowering (almost certain|likely|possible) \(\d+%\)/);
    expect(kindsFor('p5-dried')).toEqual(['aborted']);
    for (const i of items) {
      expect(i.target.leadId).toMatch(new RegExp(`^${i.target.plantId}-2026$`));
      expect(i.reason.length).toBeGreaterThan(10);
    }
  });

  it('puts aborted and stalled leads first and leaves last season\'s leads out', () => {
    expect(items[0].kind).toBe('aborted');
    const order = ['aborted', 'stalled', 'sheath', 'bloom', 'measure'];
    const ranks = items.map((i) => order.indexOf(i.kind));
    expect([...ranks].sort((a, b) => a - b)).toEqual(ranks);
    expect(items.some((i) => i.target.leadId.endsWith('-2025'))).toBe(false);
  });

  it.each([
    ['an empty collection', []],
    ['a plant with no leads', [{ plant: buildPlant(), leads: [] }]],
    ['a lead not yet seen on that date', [plantWith('later', current('later', { firstSeen: addDays(TODAY, 10) }, () => []))]],
  ])('lists nothing for the current leads of %s', (_n, plants) => {
    const out = attentionList(plants as AttentionPlant[], TODAY);
    expect(out.filter((i) => i.target.leadId.endsWith('-2026'))).toEqual([]);
  });
});
