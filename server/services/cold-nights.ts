import { and, asc, eq, isNull } from 'drizzle-orm';
import { plantsToBringIn } from '@/domain/cold-nights';
import { genusDefaultsFor } from '@/domain/genus-defaults';
import type { BringInPlant, ColdNights } from '@/shared/schemas/cold-nights';
import type { Database } from '../../db/client';
import { areas, collections, plants } from '../../db/schema';
import { notFound } from '../errors';
import type { WeatherClient } from '../weather/client';

/** "C. Quillon Dawn 'Oriel'": the name as written on a label. */
export const plantLabelName = (p: { genus: string; epithet: string; clonalName: string | null }) =>
  `${p.genus} ${p.epithet}${p.clonalName ? ` '${p.clonalName}'` : ''}`;

/**
 * The plants that stand outdoors and still belong to the collection: plants in indoor areas,
 * read-only history copies and plants given away are never listed. Plants with no area are
 * only counted (where they stand is unknown).
 */
async function outdoorPlants(db: Database, collectionId: string) {
  const rows = await db
    .select({
      id: plants.id,
      tag: plants.tag,
      genus: plants.genus,
      epithet: plants.epithet,
      clonalName: plants.clonalName,
      areaId: plants.areaId,
      minNightTempC: plants.minNightTempC,
      areaName: areas.name,
      indoors: areas.indoors,
    })
    .from(plants)
    .leftJoin(areas, eq(areas.id, plants.areaId))
    .where(and(eq(plants.collectionId, collectionId), eq(plants.historyOnly, false), isNull(plants.givenAwayOn)))
    .orderBy(asc(plants.tag));
  return {
    outdoors: rows.filter((r) => r.areaId !== null && r.indoors === false),
    unplaced: rows.filter((r) => r.areaId === null).length,
  };
}

/**
 * Tonight and the next three nights at the collection's location, each with the outdoor
 * plants whose minimum night temperature (own limit, else genus default) is above the forecast
 * minimum, coldest margin first. A collection with no location gets `no_location`; a forecast
 * that failed gets `unavailable` with the reason. 404 for an unknown collection.
 */
export async function coldNightsFor(db: Database, weather: WeatherClient, collectionId: string): Promise<ColdNights> {
  const [collection] = await db
    .select({ latitude: collections.latitude, longitude: collections.longitude })
    .from(collections)
    .where(eq(collections.id, collectionId));
  if (!collection) throw notFound('That collection');
  const { latitude, longitude } = collection;
  if (latitude === null || longitude === null) return { status: 'no_location' };

  const [forecast, standing] = await Promise.all([weather.nightLows({ latitude, longitude }), outdoorPlants(db, collectionId)]);
  if (forecast.status !== 'ok') return { status: 'unavailable', reason: forecast.reason };

  const byId = new Map(standing.outdoors.map((p) => [p.id, p]));
  const domainPlants = standing.outdoors.map((p) => ({ id: p.id, genus: p.genus, areaId: p.areaId, minNightTempC: p.minNightTempC }));
  return {
    status: 'ok',
    latitude,
    longitude,
    fetchedAt: forecast.fetchedAt,
    unplacedPlants: standing.unplaced,
    nights: forecast.nights.map((night) => ({
      date: night.date,
      lowC: night.lowC,
      plants: plantsToBringIn(domainPlants, night.lowC).map((item): BringInPlant => {
        const p = byId.get(item.plantId)!;
        return {
          plantId: p.id,
          tag: p.tag,
          name: plantLabelName(p),
          areaId: p.areaId!,
          areaName: p.areaName ?? '',
          limitC: item.limitC,
          limitSource: item.limitSource,
          lowC: night.lowC,
          marginC: Math.round(item.marginC * 10) / 10,
        };
      }),
    })),
  };
}

/** "limit 13 °C (C. default)" or "limit 10 °C (this plant's own)". */
export function describeLimit(p: Pick<BringInPlant, 'limitC' | 'limitSource' | 'name'>): string {
  const genus = p.name.split(' ')[0];
  return `limit ${formatC(p.limitC)} (${p.limitSource === 'plant' ? "this plant's own" : `${genusDefaultsFor(genus).genus === '*' ? 'default' : `${genus} default`}`})`;
}

export const formatC = (c: number) => `${Number.isInteger(c) ? c : c.toFixed(1)} °C`;

/** One line per plant, for mail: "SH-001 C. Quillon Dawn 'Oriel' (Shade-house bench): limit 13 °C (C. default), 2.2 °C under". */
export function bringInLine(p: BringInPlant): string {
  return `${p.tag} ${p.name} (${p.areaName}): ${describeLimit(p)}, forecast ${formatC(p.lowC)}, ${formatC(p.marginC)} under`;
}
