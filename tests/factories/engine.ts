import { randomUUID } from 'node:crypto';
import type { BloomHistory, BloomRecord, Lead, LeadStatus, Measurement, Plant, SheathState } from '@/domain';
import type { Database } from '../../db/client';
import { areas, bloomRecords, leads, measurements, plants } from '../../db/schema';

const DAY = 24 * 60 * 60 * 1000;
/** A calendar date `n` days before today (UTC), as the routes count it. */
export const daysAgo = (n: number) => new Date(Date.now() - n * DAY).toISOString().slice(0, 10);
const plus = (date: string, n: number) => new Date(Date.parse(date) + n * DAY).toISOString().slice(0, 10);

const logistic = (t: number, a: number, m: number, s: number) => a / (1 + Math.exp((m - t) / s));

export interface PlantSpec {
  tag: string;
  genus?: string;
  medium?: string | null;
  area?: 'bench' | 'window' | null;
  parent?: string;
  dividedOn?: string;
}

export interface LeadSpec {
  label: string;
  firstSeen: string;
  status: LeadStatus;
  /** Heights (mm) by age in days since first seen, with the sheath seen that day. */
  heights: Array<[age: number, heightMm: number, sheath?: SheathState]>;
  bloom?: Omit<BloomRecord, 'leadId'>;
  fromBackBulb?: boolean;
}

/** Measurements every 14 days along a logistic, stopping at `untilAge`; a sheath forms at 95%. */
export function curve(size: number, untilAge: number, options: { midpoint?: number; scale?: number; flatFrom?: number } = {}): LeadSpec['heights'] {
  const m = options.midpoint ?? 70;
  const s = options.scale ?? 16;
  const out: LeadSpec['heights'] = [];
  for (let age = 7; age <= untilAge; age += 14) {
    const grownAge = options.flatFrom !== undefined ? Math.min(age, options.flatFrom) : age;
    const h = Math.round(logistic(grownAge, size, m, s) * 10) / 10;
    out.push([age, h, options.flatFrom === undefined && h >= 0.95 * size ? 'forming' : 'none']);
  }
  return out;
}

/** A finished earlier-season lead that bloomed about 60 days after its sheath showed. */
export function pastLead(label: string, firstSeen: string, size: number, status: LeadStatus = 'mature'): LeadSpec {
  return {
    label,
    firstSeen,
    status,
    heights: curve(size, 161),
    bloom: { budsSeen: plus(firstSeen, 190), firstOpen: plus(firstSeen, 208), lastFaded: plus(firstSeen, 240), flowerCount: 4, spikeCount: 1 },
  };
}

export interface EngineFixture {
  /** Plant id by tag. */
  plantIds: Record<string, string>;
  /** Lead id by `${tag}/${label}`. */
  leadIds: Record<string, string>;
  /** The domain's inputs, built here independently of the server's mapping. */
  domain: Record<string, { plant: Plant; own: BloomHistory[]; withHistory: BloomHistory[] }>;
  areaIds: { bench: string; window: string };
}

/**
 * Inserts plants with their leads, measurements and bloom records straight into the
 * collection, and returns the same records as the engine's plain types. A division's
 * `withHistory` carries its parent's leads first seen before `dividedOn`.
 */
export async function insertEngineRecords(
  db: Database,
  collectionId: string,
  specs: Array<{ plant: PlantSpec; leads: LeadSpec[] }>,
): Promise<EngineFixture> {
  const areaIds = { bench: randomUUID(), window: randomUUID() };
  await db.insert(areas).values([
    { id: areaIds.bench, collectionId, name: 'Shade bench', position: 0 },
    { id: areaIds.window, collectionId, name: 'East window', indoors: true, position: 1 },
  ]);
  const fixture: EngineFixture = { plantIds: {}, leadIds: {}, domain: {}, areaIds };
  for (const { plant: spec, leads: leadSpecs } of specs) {
    const id = randomUUID();
    fixture.plantIds[spec.tag] = id;
    const plant: Plant = {
      id,
      genus: spec.genus ?? 'C.',
      parentPlantId: spec.parent ? fixture.plantIds[spec.parent] : null,
      dividedOn: spec.dividedOn ?? null,
      medium: spec.medium === undefined ? 'bark' : spec.medium,
      areaId: spec.area === null ? null : areaIds[spec.area ?? 'bench'],
      minNightTempC: null,
    };
    await db.insert(plants).values({
      id,
      collectionId,
      tag: spec.tag,
      genus: plant.genus,
      epithet: 'Test Grex',
      medium: plant.medium,
      areaId: plant.areaId,
      parentPlantId: plant.parentPlantId,
      dividedOn: plant.dividedOn,
    });
    const own: BloomHistory[] = [];
    for (const ls of leadSpecs) {
      const leadId = randomUUID();
      fixture.leadIds[`${spec.tag}/${ls.label}`] = leadId;
      const lead: Lead = {
        id: leadId,
        plantId: id,
        season: Number(ls.firstSeen.slice(0, 4)),
        label: ls.label,
        firstSeen: ls.firstSeen,
        status: ls.status,
        parentLeadId: null,
        fromBackBulb: ls.fromBackBulb ?? false,
      };
      await db.insert(leads).values({ ...lead, collectionId });
      const ms: Measurement[] = ls.heights.map(([age, heightMm, sheath]) => ({
        id: randomUUID(),
        leadId,
        date: plus(ls.firstSeen, age),
        heightMm,
        leafCount: 1,
        sheath: sheath ?? 'none',
        rootTips: null,
        bulbWidthMm: null,
      }));
      if (ms.length) {
        await db.insert(measurements).values(
          ms.map((m) => ({
            id: m.id,
            collectionId,
            leadId,
            measuredOn: m.date,
            heightMm: m.heightMm,
            leafCount: m.leafCount,
            sheath: m.sheath,
            rootTips: m.rootTips,
            bulbWidthMm: m.bulbWidthMm,
          })),
        );
      }
      let bloom: BloomRecord | null = null;
      if (ls.bloom) {
        bloom = { leadId, ...ls.bloom };
        await db.insert(bloomRecords).values({
          collectionId,
          leadId,
          budsSeenOn: bloom.budsSeen,
          firstOpenOn: bloom.firstOpen,
          lastFadedOn: bloom.lastFaded,
          flowerCount: bloom.flowerCount,
          spikeCount: bloom.spikeCount,
        });
      }
      own.push({ lead, measurements: ms, bloom });
    }
    const inherited = spec.parent ? fixture.domain[spec.parent].withHistory.filter((h) => h.lead.firstSeen < spec.dividedOn!) : [];
    const bySeason = (a: BloomHistory, b: BloomHistory) => a.lead.season - b.lead.season || a.lead.firstSeen.localeCompare(b.lead.firstSeen);
    fixture.domain[spec.tag] = { plant, own: [...own].sort(bySeason), withHistory: [...inherited, ...own].sort(bySeason) };
  }
  return fixture;
}
