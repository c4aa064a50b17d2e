import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { RoundStop } from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { areas, plants } from '../../db/schema';
import { fieldError } from '../errors';
import { leadSummariesByPlant, toPlantRef } from './records-read';

/**
 * The measuring walk: every plant in the saved order; plants never placed follow, by the
 * area's walking position, the area's name and the tag. Three queries for the whole walk.
 */
export async function getRounds(db: Database, collectionId: string): Promise<{ stops: RoundStop[] }> {
  const rows = await db
    .select({ plant: plants, areaName: areas.name })
    .from(plants)
    .leftJoin(areas, eq(areas.id, plants.areaId))
    // A read-only history copy and a plant given away are not on the walk.
    .where(and(eq(plants.collectionId, collectionId), eq(plants.historyOnly, false), isNull(plants.givenAwayOn)))
    .orderBy(
      sql`${plants.roundPosition} asc nulls last`,
      sql`${areas.position} asc nulls last`,
      sql`${areas.name} asc nulls last`,
      asc(plants.tag),
      asc(plants.id),
    );
  const summaries = await leadSummariesByPlant(db, { collectionId }, { currentOnly: true });
  return {
    stops: rows.map(({ plant, areaName }) => ({
      plant: { ...toPlantRef(plant), areaName },
      leads: summaries.get(plant.id) ?? [],
    })),
  };
}

/** Saves the walking order: listed plants by index, every other plant unplaced; one transaction. */
export async function saveRoundsOrder(db: Database, collectionId: string, plantIds: string[]): Promise<void> {
  const seen = new Map<string, number>();
  plantIds.forEach((id, i) => {
    if (seen.has(id)) throw fieldError(`plantIds.${i}`, `Listed twice (also at ${seen.get(id)})`);
    seen.set(id, i);
  });
  await db.transaction(async (tx) => {
    if (plantIds.length > 0) {
      const found = await tx
        .select({ id: plants.id })
        .from(plants)
        .where(and(eq(plants.collectionId, collectionId), inArray(plants.id, plantIds)));
      const ours = new Set(found.map((p) => p.id));
      const stranger = plantIds.findIndex((id) => !ours.has(id));
      if (stranger >= 0) throw fieldError(`plantIds.${stranger}`, 'Not a plant of this collection');
    }
    await tx.update(plants).set({ roundPosition: null }).where(eq(plants.collectionId, collectionId));
    if (plantIds.length === 0) return;
    // One statement for the whole order; the ids were checked above, and travel as one parameter.
    await tx.execute(sql`
      update ${plants} set round_position = (o.position - 1)::int
      from unnest(string_to_array(${plantIds.join(',')}, ',')::uuid[]) with ordinality as o(id, position)
      where ${plants.id} = o.id and ${plants.collectionId} = ${collectionId}`);
  });
}
