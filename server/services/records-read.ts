import { and, asc, desc, eq, inArray, type SQL, sql } from 'drizzle-orm';
import type { Area, BloomRecord, CareEntry, Lead, LeadSummary, Measurement, Plant, PlantRef } from '@/shared/schemas/records';
import { areas, bloomRecords, careEntries, leads, measurements, plants } from '../../db/schema';
import type { Executor } from './records-support';

// Rows → contract types. Column names stay in server/; the wire uses the contract's names.

export const toArea = (r: typeof areas.$inferSelect): Area => ({
  id: r.id,
  collectionId: r.collectionId,
  name: r.name,
  indoors: r.indoors,
  position: r.position,
  notes: r.notes,
  version: r.version,
});

export const toPlant = (r: typeof plants.$inferSelect): Plant => ({
  id: r.id,
  collectionId: r.collectionId,
  tag: r.tag,
  genus: r.genus,
  epithet: r.epithet,
  isSpecies: r.isSpecies,
  clonalName: r.clonalName,
  source: r.source,
  acquiredOn: r.acquiredOn,
  areaId: r.areaId,
  medium: r.medium,
  notes: r.notes,
  parentPlantId: r.parentPlantId,
  dividedOn: r.dividedOn,
  minNightTempC: r.minNightTempC,
  historyOnly: r.historyOnly,
  givenAwayOn: r.givenAwayOn,
  givenTo: r.givenTo,
  receivedFrom: r.receivedFrom,
  version: r.version,
});

export const toPlantRef = (r: typeof plants.$inferSelect): PlantRef => ({
  id: r.id,
  tag: r.tag,
  genus: r.genus,
  epithet: r.epithet,
  isSpecies: r.isSpecies,
  clonalName: r.clonalName,
  dividedOn: r.dividedOn,
  historyOnly: r.historyOnly,
});

export const toLead = (r: typeof leads.$inferSelect): Lead => ({
  id: r.id,
  plantId: r.plantId,
  season: r.season,
  label: r.label,
  firstSeen: r.firstSeen,
  parentLeadId: r.parentLeadId,
  status: r.status,
  fromBackBulb: r.fromBackBulb,
  version: r.version,
});

export const toMeasurement = (r: typeof measurements.$inferSelect): Measurement => ({
  id: r.id,
  leadId: r.leadId,
  date: r.measuredOn,
  heightMm: r.heightMm,
  leafCount: r.leafCount,
  sheath: r.sheath,
  rootTips: r.rootTips,
  bulbWidthMm: r.bulbWidthMm,
  note: r.note,
  createdBy: r.createdBy,
  version: r.version,
});

export const toBloom = (r: typeof bloomRecords.$inferSelect): BloomRecord => ({
  id: r.id,
  leadId: r.leadId,
  budsSeenOn: r.budsSeenOn,
  firstOpenOn: r.firstOpenOn,
  lastFadedOn: r.lastFadedOn,
  flowerCount: r.flowerCount,
  spikeCount: r.spikeCount,
  note: r.note,
  version: r.version,
});

export const toCare = (r: typeof careEntries.$inferSelect): CareEntry => ({
  id: r.id,
  plantId: r.plantId,
  areaId: r.areaId,
  kind: r.kind,
  occurredOn: r.occurredOn,
  withCalcium: r.withCalcium,
  newMedium: r.newMedium,
  product: r.product,
  target: r.target,
  toAreaId: r.toAreaId,
  damageKind: r.damageKind,
  note: r.note,
  createdBy: r.createdBy,
});

/** Newest first: a later date wins, and on one date the later entry. */
export const latestMeasurementOrder = [desc(measurements.measuredOn), desc(measurements.createdAt), desc(measurements.id)];

/** A lead belongs to its plant's latest season (the season the list and Rounds show). */
const inLatestSeason = sql`${leads.season} = (select max(l2.season) from ${leads} l2 where l2.plant_id = ${leads.plantId})`;

/**
 * Leads with their latest measurement, grouped by plant, in two queries whatever the number
 * of plants: one for the leads, one (DISTINCT ON) for the latest measurement of each.
 * `scope` selects the leads (by plant ids, or a whole collection); `currentOnly` keeps the
 * plant's latest season. Leads come newest season first, then by label.
 */
export async function leadSummariesByPlant(
  db: Executor,
  scope: { plantIds: string[] } | { collectionId: string },
  options: { currentOnly: boolean },
): Promise<Map<string, LeadSummary[]>> {
  const byPlant = new Map<string, LeadSummary[]>();
  if ('plantIds' in scope && scope.plantIds.length === 0) return byPlant;
  const conditions: SQL[] = [
    'plantIds' in scope ? inArray(leads.plantId, scope.plantIds) : eq(leads.collectionId, scope.collectionId),
  ];
  if (options.currentOnly) conditions.push(inLatestSeason);
  const where = and(...conditions);

  const leadRows = await db.select().from(leads).where(where).orderBy(desc(leads.season), asc(leads.label));
  if (leadRows.length === 0) return byPlant;
  const latestRows = await db
    .selectDistinctOn([measurements.leadId])
    .from(measurements)
    .where(inArray(measurements.leadId, db.select({ id: leads.id }).from(leads).where(where)))
    .orderBy(measurements.leadId, ...latestMeasurementOrder);
  const latest = new Map(latestRows.map((m) => [m.leadId, toMeasurement(m)]));

  for (const lead of leadRows) {
    const list = byPlant.get(lead.plantId) ?? [];
    list.push({ ...toLead(lead), latest: latest.get(lead.id) ?? null });
    byPlant.set(lead.plantId, list);
  }
  return byPlant;
}
