import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { LengthUnit } from '@/lib/units';
import { earlierLeadShapes, genusDefaultsFor, type BloomHistory, type BloomRecord, type IsoDate, type Lead, type LeadShape, type Measurement, type Plant } from '@/domain';
import { areas, bloomRecords, collections, leads, measurements, plants } from '../../db/schema';
import type { Executor } from './records-support';

/*
 * What the growth engine needs from the database, as the domain's plain types. One query per
 * table for a whole collection (or for one plant with its lineage), never one per plant or lead.
 */

// The columns the engine reads. Generated demo rows (db/seed/generate.ts) have the same shape,
// so the benchmark maps them through the same functions.
export type PlantRow = Pick<typeof plants.$inferSelect, 'id' | 'tag' | 'genus' | 'parentPlantId' | 'dividedOn' | 'medium' | 'areaId'> &
  Partial<Pick<typeof plants.$inferSelect, 'historyOnly' | 'givenAwayOn' | 'minNightTempC'>>;
export type LeadRow = Pick<typeof leads.$inferSelect, 'id' | 'plantId' | 'season' | 'label' | 'firstSeen' | 'status' | 'parentLeadId' | 'fromBackBulb'>;
export type MeasurementRow = Pick<
  typeof measurements.$inferSelect,
  'id' | 'leadId' | 'measuredOn' | 'heightMm' | 'leafCount' | 'sheath' | 'rootTips' | 'bulbWidthMm'
>;
export type BloomRow = Pick<typeof bloomRecords.$inferSelect, 'leadId' | 'budsSeenOn' | 'firstOpenOn' | 'lastFadedOn' | 'flowerCount' | 'spikeCount'>;

export interface EngineRows {
  plants: readonly PlantRow[];
  leads: readonly LeadRow[];
  measurements: readonly MeasurementRow[];
  blooms: readonly BloomRow[];
}

export interface EnginePlant {
  plant: Plant;
  tag: string;
  /** The plant's own leads, by season, first seen and label. */
  ownLeads: BloomHistory[];
  /**
   * Own leads plus, for a division, the leads of its parent (and the parent's ancestors) first
   * seen before the division: a division keeps its parent's history. Oldest first.
   */
  leads: BloomHistory[];
  /**
   * False for a read-only history copy and for a plant given away: they still lend their
   * history to divisions, but need no attention, measuring or bringing in.
   */
  active: boolean;
}

export interface EngineData {
  /** The month the collection's growth year starts (1–12): it says which season is the current one. */
  seasonStartMonth: number;
  /** The unit the collection shows lengths in: the stories are written in it. */
  units: LengthUnit;
  plants: EnginePlant[];
  plantById: Map<string, EnginePlant>;
  /** Every lead of the data by id, with the plant that owns it. */
  leadById: Map<string, { history: BloomHistory; plantId: string }>;
}

export const toDomainPlant = (r: PlantRow): Plant => ({
  id: r.id,
  genus: r.genus,
  parentPlantId: r.parentPlantId,
  dividedOn: r.dividedOn,
  medium: r.medium,
  areaId: r.areaId,
  // The grower's own limit; null (or a generated row without one) uses the genus default.
  minNightTempC: r.minNightTempC ?? null,
});

export const toDomainLead = (r: LeadRow): Lead => ({
  id: r.id,
  plantId: r.plantId,
  season: r.season,
  label: r.label,
  firstSeen: r.firstSeen,
  status: r.status,
  parentLeadId: r.parentLeadId,
  fromBackBulb: r.fromBackBulb,
});

export const toDomainMeasurement = (r: MeasurementRow): Measurement => ({
  id: r.id,
  leadId: r.leadId,
  date: r.measuredOn,
  heightMm: r.heightMm,
  leafCount: r.leafCount,
  sheath: r.sheath,
  rootTips: r.rootTips,
  bulbWidthMm: r.bulbWidthMm,
});

export const toDomainBloom = (r: BloomRow): BloomRecord => ({
  leadId: r.leadId,
  budsSeen: r.budsSeenOn,
  firstOpen: r.firstOpenOn,
  lastFaded: r.lastFadedOn,
  flowerCount: r.flowerCount,
  spikeCount: r.spikeCount,
});

const byLeadOrder = (a: BloomHistory, b: BloomHistory) =>
  a.lead.season - b.lead.season ||
  (a.lead.firstSeen < b.lead.firstSeen ? -1 : a.lead.firstSeen > b.lead.firstSeen ? 1 : 0) ||
  a.lead.label.localeCompare(b.lead.label) ||
  a.lead.id.localeCompare(b.lead.id);

/**
 * Maps rows to the engine's inputs and attaches inherited history to divisions. Measurements
 * come out sorted by date within each lead whatever the row order. A parent outside `rows`
 * (say, in another collection) contributes nothing.
 */
export function buildEngineData(rows: EngineRows, settings: CollectionEngineSettings = DEFAULT_ENGINE_SETTINGS): EngineData {
  const msByLead = new Map<string, Measurement[]>();
  for (const r of rows.measurements) {
    const list = msByLead.get(r.leadId);
    if (list) list.push(toDomainMeasurement(r));
    else msByLead.set(r.leadId, [toDomainMeasurement(r)]);
  }
  for (const list of msByLead.values()) list.sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : a.id.localeCompare(b.id)));
  const bloomByLead = new Map(rows.blooms.map((b) => [b.leadId, toDomainBloom(b)]));

  const ownByPlant = new Map<string, BloomHistory[]>();
  const leadById: EngineData['leadById'] = new Map();
  for (const r of rows.leads) {
    const history: BloomHistory = { lead: toDomainLead(r), measurements: msByLead.get(r.id) ?? [], bloom: bloomByLead.get(r.id) ?? null };
    leadById.set(r.id, { history, plantId: r.plantId });
    const list = ownByPlant.get(r.plantId);
    if (list) list.push(history);
    else ownByPlant.set(r.plantId, [history]);
  }
  for (const list of ownByPlant.values()) list.sort(byLeadOrder);

  const rowById = new Map(rows.plants.map((p) => [p.id, p]));
  const plantsOut: EnginePlant[] = rows.plants.map((p) => {
    const ownLeads = ownByPlant.get(p.id) ?? [];
    const inherited: BloomHistory[] = [];
    // Walk up the lineage; each ancestor contributes what it grew before the earliest
    // division on the way down to this plant.
    const seen = new Set([p.id]);
    let cutoff = p.dividedOn;
    let parent = p.parentPlantId ? rowById.get(p.parentPlantId) : undefined;
    while (parent && cutoff && !seen.has(parent.id)) {
      seen.add(parent.id);
      const before = cutoff;
      for (const h of ownByPlant.get(parent.id) ?? []) if (h.lead.firstSeen < before) inherited.push(h);
      if (!parent.parentPlantId || !parent.dividedOn) break;
      cutoff = parent.dividedOn < cutoff ? parent.dividedOn : cutoff;
      parent = rowById.get(parent.parentPlantId);
    }
    const leadsWithHistory = inherited.length ? [...inherited, ...ownLeads].sort(byLeadOrder) : ownLeads;
    return { plant: toDomainPlant(p), tag: p.tag, ownLeads, leads: leadsWithHistory, active: !p.historyOnly && !p.givenAwayOn };
  });
  return { ...settings, plants: plantsOut, plantById: new Map(plantsOut.map((p) => [p.plant.id, p])), leadById };
}

const plantColumns = {
  id: plants.id,
  tag: plants.tag,
  genus: plants.genus,
  parentPlantId: plants.parentPlantId,
  dividedOn: plants.dividedOn,
  medium: plants.medium,
  areaId: plants.areaId,
  historyOnly: plants.historyOnly,
  givenAwayOn: plants.givenAwayOn,
  minNightTempC: plants.minNightTempC,
};
const leadColumns = {
  id: leads.id,
  plantId: leads.plantId,
  season: leads.season,
  label: leads.label,
  firstSeen: leads.firstSeen,
  status: leads.status,
  parentLeadId: leads.parentLeadId,
  fromBackBulb: leads.fromBackBulb,
};
const measurementColumns = {
  id: measurements.id,
  leadId: measurements.leadId,
  measuredOn: measurements.measuredOn,
  heightMm: measurements.heightMm,
  leafCount: measurements.leafCount,
  sheath: measurements.sheath,
  rootTips: measurements.rootTips,
  bulbWidthMm: measurements.bulbWidthMm,
};
const bloomColumns = {
  leadId: bloomRecords.leadId,
  budsSeenOn: bloomRecords.budsSeenOn,
  firstOpenOn: bloomRecords.firstOpenOn,
  lastFadedOn: bloomRecords.lastFadedOn,
  flowerCount: bloomRecords.flowerCount,
  spikeCount: bloomRecords.spikeCount,
};

export interface CollectionEngineSettings {
  seasonStartMonth: number;
  units: LengthUnit;
}

/** The schema's defaults, for data built without a collection row (the benchmark's). */
export const DEFAULT_ENGINE_SETTINGS: CollectionEngineSettings = { seasonStartMonth: 3, units: 'mm' };

async function engineSettingsOf(db: Executor, collectionId: string): Promise<CollectionEngineSettings> {
  const [row] = await db
    .select({ seasonStartMonth: collections.seasonStartMonth, units: collections.units })
    .from(collections)
    .where(eq(collections.id, collectionId))
    .limit(1);
  return row ?? DEFAULT_ENGINE_SETTINGS;
}

/** Everything the engine needs for a whole collection: five queries, run together. */
export async function loadCollectionEngineData(db: Executor, collectionId: string): Promise<EngineData> {
  const [plantRows, leadRows, measurementRows, bloomRows, settings] = await Promise.all([
    db.select(plantColumns).from(plants).where(eq(plants.collectionId, collectionId)).orderBy(asc(plants.tag)),
    db
      .select(leadColumns)
      .from(leads)
      .where(eq(leads.collectionId, collectionId))
      .orderBy(asc(leads.plantId), asc(leads.season), asc(leads.firstSeen), asc(leads.label)),
    db
      .select(measurementColumns)
      .from(measurements)
      .where(eq(measurements.collectionId, collectionId))
      .orderBy(asc(measurements.leadId), asc(measurements.measuredOn), asc(measurements.id)),
    db.select(bloomColumns).from(bloomRecords).where(eq(bloomRecords.collectionId, collectionId)).orderBy(asc(bloomRecords.leadId)),
    engineSettingsOf(db, collectionId),
  ]);
  return buildEngineData({ plants: plantRows, leads: leadRows, measurements: measurementRows, blooms: bloomRows }, settings);
}

/** The plant owning `leadId` in the collection, or null (also for another collection's lead). */
export async function plantIdOfLead(db: Executor, collectionId: string, leadId: string): Promise<string | null> {
  const [row] = await db
    .select({ plantId: leads.plantId })
    .from(leads)
    .where(and(eq(leads.id, leadId), eq(leads.collectionId, collectionId)))
    .limit(1);
  return row?.plantId ?? null;
}

/**
 * One plant of the collection with its own leads and its lineage's inherited history; null when
 * the plant is not in the collection. Reads the collection's plant list (ids and lineage only
 * are needed, but it is small) once, then leads, measurements and blooms of the lineage.
 */
export async function loadPlantEngineData(db: Executor, collectionId: string, plantId: string): Promise<{ data: EngineData; plant: EnginePlant } | null> {
  const plantRows = await db.select(plantColumns).from(plants).where(eq(plants.collectionId, collectionId)).orderBy(asc(plants.tag));
  const byId = new Map(plantRows.map((p) => [p.id, p]));
  const target = byId.get(plantId);
  if (!target) return null;
  const lineage: PlantRow[] = [target];
  for (let p = target; p.parentPlantId && byId.has(p.parentPlantId) && !lineage.some((x) => x.id === p.parentPlantId); ) {
    p = byId.get(p.parentPlantId)!;
    lineage.push(p);
  }
  const ids = lineage.map((p) => p.id);
  const leadsOfLineage = and(eq(leads.collectionId, collectionId), inArray(leads.plantId, ids));
  const [leadRows, measurementRows, bloomRows, settings] = await Promise.all([
    db.select(leadColumns).from(leads).where(leadsOfLineage).orderBy(asc(leads.plantId), asc(leads.season), asc(leads.firstSeen), asc(leads.label)),
    db
      .select(measurementColumns)
      .from(measurements)
      .innerJoin(leads, eq(leads.id, measurements.leadId))
      .where(and(eq(measurements.collectionId, collectionId), leadsOfLineage))
      .orderBy(asc(measurements.leadId), asc(measurements.measuredOn), asc(measurements.id)),
    db
      .select(bloomColumns)
      .from(bloomRecords)
      .innerJoin(leads, eq(leads.id, bloomRecords.leadId))
      .where(and(eq(bloomRecords.collectionId, collectionId), leadsOfLineage))
      .orderBy(asc(bloomRecords.leadId)),
    engineSettingsOf(db, collectionId),
  ]);
  const data = buildEngineData({ plants: lineage, leads: leadRows, measurements: measurementRows, blooms: bloomRows }, settings);
  return { data, plant: data.plantById.get(plantId)! };
}

/** Area names of the collection by id (for grouping a comparison by area). */
export async function areaNames(db: Executor, collectionId: string): Promise<Map<string, string>> {
  const rows = await db.select({ id: areas.id, name: areas.name }).from(areas).where(eq(areas.collectionId, collectionId)).orderBy(asc(areas.position), asc(areas.name));
  return new Map(rows.map((r) => [r.id, r.name]));
}

/**
 * A cheap summary of everything the engine reads for a collection: row count, latest
 * `updated_at` and sum of row versions per table. Every write path stamps `updated_at` and
 * bumps `version`, and a delete lowers the count, so any change to the inputs changes it.
 * Measurements have no collection index, so this scans them; fine at collection sizes.
 */
export async function engineFingerprint(db: Executor, collectionId: string): Promise<string> {
  const part = (table: string) =>
    sql.raw(`(select count(*) || ':' || coalesce(max(updated_at)::text, '') || ':' || coalesce(sum(version), 0) from ${table} where collection_id = `);
  const [row] = await db.execute<{ p: string; l: string; m: string; b: string; a: string; s: string | null }>(sql`
    select ${part('plants')}${collectionId}) as p,
           ${part('leads')}${collectionId}) as l,
           ${part('measurements')}${collectionId}) as m,
           ${part('bloom_records')}${collectionId}) as b,
           ${part('areas')}${collectionId}) as a,
           (select season_start_month || ':' || units from collections where id = ${collectionId}) as s`);
  return `${row.p}|${row.l}|${row.m}|${row.b}|${row.a}|${row.s}`;
}

/** How long a collection's fingerprint is trusted without asking the database again. */
export const FINGERPRINT_TTL_MS = 1000;

/**
 * Remembers each collection's fingerprint for FINGERPRINT_TTL_MS, so a cached engine answer
 * costs no query at all. Writes made through this process `forget` the collection at once;
 * a write through another server process shows within the TTL. A read that was in flight
 * when the collection was forgotten is not stored (the generation moved on meanwhile).
 */
export class FingerprintMemo {
  private entries = new Map<string, { fingerprint: string; at: number }>();
  private generations = new Map<string, number>();

  constructor(
    private readonly read: (collectionId: string) => Promise<string>,
    private readonly ttlMs = FINGERPRINT_TTL_MS,
    private readonly now: () => number = Date.now,
  ) {}

  /** Reads in flight, per collection and generation: concurrent misses share one query. */
  private pending = new Map<string, { generation: number; read: Promise<string> }>();

  async get(collectionId: string): Promise<string> {
    const hit = this.entries.get(collectionId);
    if (hit) {
      const age = this.now() - hit.at;
      if (age < this.ttlMs) {
        // Past half its life the fingerprint is read again in the background, so under steady
        // traffic no request waits for that query and none sees one older than the TTL.
        if (age >= this.ttlMs / 2) this.fetch(collectionId).catch(() => {});
        return hit.fingerprint;
      }
    }
    return this.fetch(collectionId);
  }

  /**
   * Reads the fingerprint (sharing a read in flight) and remembers it, dated from when the read
   * began (it shows the records as of then), unless the collection was forgotten meanwhile.
   */
  private async fetch(collectionId: string): Promise<string> {
    const generation = this.generations.get(collectionId) ?? 0;
    const inFlight = this.pending.get(collectionId);
    if (inFlight && inFlight.generation === generation) return inFlight.read;
    const started = this.now();
    const read = this.read(collectionId);
    this.pending.set(collectionId, { generation, read });
    try {
      const fingerprint = await read;
      if ((this.generations.get(collectionId) ?? 0) === generation) {
        this.entries.set(collectionId, { fingerprint, at: started });
      }
      return fingerprint;
    } finally {
      if (this.pending.get(collectionId)?.read === read) this.pending.delete(collectionId);
    }
  }

  forget(collectionId: string): void {
    this.entries.delete(collectionId);
    this.pending.delete(collectionId);
    this.generations.set(collectionId, (this.generations.get(collectionId) ?? 0) + 1);
  }
}

/**
 * Engine answers kept per key (route, collection, query, today) for as long as the
 * collection's fingerprint stays the same: the engine is deterministic in its inputs, and a
 * whole-collection answer costs tens of milliseconds of fitting, while checking the
 * fingerprint costs one query. Least recently used keys are dropped past `maxEntries`.
 * Concurrent misses for the same key and fingerprint share one computation.
 */
export class EngineCache {
  private entries = new Map<string, { fingerprint: string; value: Promise<unknown> }>();

  constructor(private readonly maxEntries = 200) {}

  async get<T>(key: string, fingerprint: string, compute: () => Promise<T>): Promise<T> {
    const hit = this.entries.get(key);
    if (hit && hit.fingerprint === fingerprint) {
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit.value as Promise<T>;
    }
    const value = compute();
    this.entries.set(key, { fingerprint, value });
    value.catch(() => {
      if (this.entries.get(key)?.value === value) this.entries.delete(key);
    });
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
    return value;
  }

  clear(): void {
    this.entries.clear();
  }
}

/**
 * Fitted shapes of a plant's earlier leads (`earlierLeadShapes`), kept across requests. The
 * key holds everything the fits read — the plant's genus, the season, `today`, and every
 * earlier lead's status, first-seen date and measurements — so a changed record simply misses.
 * Whole-collection answers refit only the plants whose history changed.
 */
export class ShapeCache {
  private entries = new Map<string, readonly LeadShape[]>();

  constructor(private readonly maxEntries = 5000) {}

  get(p: EnginePlant, season: number, today: IsoDate): readonly LeadShape[] {
    const hash = createHash('sha1');
    for (const h of p.leads) {
      if (h.lead.season >= season) continue;
      hash.update(`|${h.lead.id}:${h.lead.season}:${h.lead.status}:${h.lead.firstSeen}`);
      for (const m of h.measurements) hash.update(`,${m.leadId}:${m.date}:${m.heightMm}`);
    }
    const key = `${p.plant.id}|${p.plant.genus}|${season}|${today}|${hash.digest('base64')}`;
    const hit = this.entries.get(key);
    if (hit) {
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit;
    }
    const shapes = earlierLeadShapes(p.leads, genusDefaultsFor(p.plant.genus), season, today);
    this.entries.set(key, shapes);
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
    return shapes;
  }
}

/**
 * An engine answer as sent: the JSON bytes, a strong ETag of them, and the gzip of them made
 * once on first need. Kept in the EngineCache, so a repeated request costs no serializing,
 * hashing or compressing; the ETag lets a client revalidate with a 304.
 */
export class PreparedAnswer {
  readonly body: Buffer;
  readonly etag: string;
  private gzipped: Buffer | null = null;

  constructor(json: string) {
    this.body = Buffer.from(json, 'utf8');
    this.etag = `"${createHash('sha1').update(this.body).digest('base64url')}"`;
  }

  get gzip(): Buffer {
    this.gzipped ??= gzipSync(this.body);
    return this.gzipped;
  }
}
