import { describe, expect, it } from 'vitest';
import { exportDocumentSchema } from '@/shared/schemas/export';
import { parentsFirst } from '../../../server/services/restore';

function document(overrides: Record<string, unknown> = {}) {
  return {
    format: 'sympodia-export',
    version: 1,
    exportedAt: '2026-12-02T10:00:00.000Z',
    collection: { name: 'Bench', seasonStartMonth: 3, units: 'mm', latitude: null, longitude: null },
    areas: [{ id: 'a1', name: 'East', indoors: false, position: 0, notes: null }],
    plants: [
      { id: 'p1', tag: 'A-1', genus: 'C.', epithet: 'Quiet Meadow', areaId: 'a1' },
      { id: 'p2', tag: 'A-1B', genus: 'C.', epithet: 'Quiet Meadow', parentPlantId: 'p1', dividedOn: '2026-04-01' },
    ],
    leads: [{ id: 'l1', plantId: 'p1', season: 2026, label: '2026-A', firstSeen: '2026-03-10' }],
    measurements: [{ id: 'm1', leadId: 'l1', date: '2026-05-01', heightMm: 30 }],
    bloomRecords: [],
    careEntries: [{ id: 'c1', areaId: 'a1', kind: 'water', occurredOn: '2026-05-02' }],
    photos: [],
    ...overrides,
  };
}

const paths = (input: unknown) => {
  const result = exportDocumentSchema.safeParse(input);
  return result.success ? [] : result.error.issues.map((i) => i.path.join('.'));
};

describe('exportDocumentSchema', () => {
  it('accepts a complete document and fills what a hand-written file may leave out', () => {
    const parsed = exportDocumentSchema.parse(document());
    expect(parsed.plants[0]).toMatchObject({ isSpecies: false, clonalName: null, historyOnly: false, minNightTempC: null });
    expect(parsed.measurements[0]).toMatchObject({ sheath: 'none', leafCount: null, note: null });
  });

  it.each([
    ['a plant in an area the file lacks', { plants: [{ id: 'p1', tag: 'A', genus: 'C.', epithet: 'X', areaId: 'zz' }] }, 'plants.0.areaId'],
    ['a division without its date', { plants: [{ id: 'p1', tag: 'A', genus: 'C.', epithet: 'X' }, { id: 'p2', tag: 'B', genus: 'C.', epithet: 'X', parentPlantId: 'p1' }] }, 'plants.1.dividedOn'],
    ['two plants with one tag', { plants: [{ id: 'p1', tag: 'A', genus: 'C.', epithet: 'X' }, { id: 'p2', tag: 'A', genus: 'C.', epithet: 'X' }], leads: [], measurements: [] }, 'plants.1.tag'],
    ['a plant that is its own ancestor', { plants: [{ id: 'p1', tag: 'A', genus: 'C.', epithet: 'X', parentPlantId: 'p1', dividedOn: '2026-01-01' }], leads: [], measurements: [] }, 'plants.0.parentPlantId'],
    ['a lead of a plant the file lacks', { leads: [{ id: 'l1', plantId: 'nobody', season: 2026, label: 'A', firstSeen: '2026-03-10' }] }, 'leads.0.plantId'],
    ['a repeated lead id', { leads: [{ id: 'l1', plantId: 'p1', season: 2026, label: 'A', firstSeen: '2026-03-10' }, { id: 'l1', plantId: 'p1', season: 2026, label: 'B', firstSeen: '2026-03-10' }] }, 'leads.1.id'],
    ['a care entry for both a plant and an area', { careEntries: [{ id: 'c1', plantId: 'p1', areaId: 'a1', kind: 'water', occurredOn: '2026-05-02' }] }, 'careEntries.0.plantId'],
    ['a move to an unknown area', { careEntries: [{ id: 'c1', plantId: 'p1', kind: 'move', toAreaId: 'zz', occurredOn: '2026-05-02' }] }, 'careEntries.0.toAreaId'],
    ['a negative height', { measurements: [{ id: 'm1', leadId: 'l1', date: '2026-05-01', heightMm: -2 }] }, 'measurements.0.heightMm'],
    ['a date that is no date', { measurements: [{ id: 'm1', leadId: 'l1', date: '2026-02-30', heightMm: 2 }] }, 'measurements.0.date'],
    ['another program\'s file', { format: 'someone-elses-backup' }, 'format'],
  ])('refuses %s', (_what, overrides, path) => {
    expect(paths(document(overrides))).toContain(path);
  });
});

describe('parentsFirst', () => {
  it('puts every parent before its children, whatever the order given', () => {
    const rows = [
      { id: 'grandchild', parent: 'child' },
      { id: 'child', parent: 'root' },
      { id: 'other', parent: null },
      { id: 'root', parent: null },
    ];
    const order = parentsFirst(rows, (r) => r.parent).map((r) => r.id);
    expect(order).toHaveLength(4);
    expect(order.indexOf('root')).toBeLessThan(order.indexOf('child'));
    expect(order.indexOf('child')).toBeLessThan(order.indexOf('grandchild'));
  });
});
