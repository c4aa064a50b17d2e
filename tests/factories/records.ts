import type { Database } from '../../db/client';
import { areas, careEntries, leads, measurements, plants } from '../../db/schema';

let counter = 0;
const next = () => {
  counter += 1;
  return counter;
};

const DAY = 24 * 60 * 60 * 1000;

/** A calendar date `n` days before today (UTC), as the API writes dates. */
export const daysAgo = (n: number) => new Date(Date.now() - n * DAY).toISOString().slice(0, 10);
/** A calendar date `n` days after today (UTC). */
export const daysAhead = (n: number) => daysAgo(-n);

// ── Request bodies that pass every rule; override any field ──────────────────────────────

export function buildAreaInput(overrides: Record<string, unknown> = {}) {
  return { name: `Bench ${next()}`, indoors: false, ...overrides };
}

export function buildPlantInput(overrides: Record<string, unknown> = {}) {
  return {
    tag: `T-${next()}`,
    genus: 'Rlc.',
    epithet: 'Harbor Lantern',
    isSpecies: false,
    clonalName: 'Dune',
    source: 'Society auction',
    acquiredOn: daysAgo(400),
    medium: 'bark',
    ...overrides,
  };
}

export function buildLeadInput(overrides: Record<string, unknown> = {}) {
  return { season: 2026, label: `L-${next()}`, firstSeen: daysAgo(90), status: 'growing', ...overrides };
}

export function buildMeasurementInput(overrides: Record<string, unknown> = {}) {
  return { date: daysAgo(10), heightMm: 42, leafCount: 2, sheath: 'none', rootTips: 3, ...overrides };
}

export function buildBloomInput(overrides: Record<string, unknown> = {}) {
  return { budsSeenOn: daysAgo(30), firstOpenOn: daysAgo(12), flowerCount: 4, spikeCount: 1, ...overrides };
}

export function buildCareInput(overrides: Record<string, unknown> = {}) {
  return { kind: 'water', occurredOn: daysAgo(1), ...overrides };
}

// ── Rows written directly (no HTTP), for arranging a test ────────────────────────────────

export async function insertArea(db: Database, collectionId: string, overrides: Partial<typeof areas.$inferInsert> = {}) {
  const [row] = await db.insert(areas).values({ collectionId, name: `Shelf ${next()}`, ...overrides }).returning();
  return row;
}

export async function insertPlant(db: Database, collectionId: string, overrides: Partial<typeof plants.$inferInsert> = {}) {
  const [row] = await db
    .insert(plants)
    .values({ collectionId, tag: `P-${next()}`, genus: 'C.', epithet: 'Quiet Meadow', ...overrides })
    .returning();
  return row;
}

export async function insertLead(
  db: Database,
  plant: { id: string; collectionId: string },
  overrides: Partial<typeof leads.$inferInsert> = {},
) {
  const [row] = await db
    .insert(leads)
    .values({ collectionId: plant.collectionId, plantId: plant.id, season: 2026, label: `L-${next()}`, firstSeen: daysAgo(90), ...overrides })
    .returning();
  return row;
}

export async function insertMeasurement(
  db: Database,
  lead: { id: string; collectionId: string },
  overrides: Partial<typeof measurements.$inferInsert> = {},
) {
  const [row] = await db
    .insert(measurements)
    .values({ collectionId: lead.collectionId, leadId: lead.id, measuredOn: daysAgo(20), heightMm: 30, leafCount: 1, ...overrides })
    .returning();
  return row;
}

export async function insertCare(db: Database, collectionId: string, overrides: Partial<typeof careEntries.$inferInsert> = {}) {
  const [row] = await db
    .insert(careEntries)
    .values({ collectionId, kind: 'water', occurredOn: daysAgo(2), ...overrides })
    .returning();
  return row;
}

/**
 * One of every record in a collection: an area, a plant in it with a lead, a measurement
 * and a care entry recorded by `createdBy` (the grower, in the role matrix).
 */
export async function buildRecords(db: Database, collectionId: string, createdBy: string) {
  const area = await insertArea(db, collectionId);
  const plant = await insertPlant(db, collectionId, { areaId: area.id, createdBy });
  const lead = await insertLead(db, plant);
  const measurement = await insertMeasurement(db, lead, { createdBy });
  const care = await insertCare(db, collectionId, { plantId: plant.id, createdBy });
  return { area, plant, lead, measurement, care };
}
