import { and, asc, desc, eq, inArray, ne, or, type SQL, sql } from 'drizzle-orm';
import type { z } from 'zod';
import {
  MIN_BULBS_PER_DIVISION,
  type divideInputSchema,
  type Plant,
  type PlantDetail,
  type plantInputSchema,
  type plantListQuerySchema,
  type PlantListItem,
  type updatePlantInputSchema,
} from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { areas, careEntries, leads, photos, plants } from '../../db/schema';
import { fieldError, notFound, StaleError } from '../errors';
import { assertAreaInCollection } from './areas';
import { leadSummariesByPlant, toCare, toPlant, toPlantRef } from './records-read';
import { assertNotFuture, assertWritablePlant, duplicate, type Executor, refuseHistoryOnly, withDuplicateAs } from './records-support';

type PlantInput = z.infer<typeof plantInputSchema>;
type PlantChanges = Partial<Omit<z.infer<typeof updatePlantInputSchema>, 'version'>>;
type ListQuery = z.infer<typeof plantListQuerySchema>;

const duplicateTag = (tag: string, field = 'tag') => ({
  plants_collection_tag_unique: duplicate(field, `Another plant in this collection already has the tag "${tag}"`),
});

export async function findPlant(db: Executor, collectionId: string, plantId: string) {
  const [row] = await db.select().from(plants).where(and(eq(plants.id, plantId), eq(plants.collectionId, collectionId))).limit(1);
  return row;
}

export async function requirePlant(db: Executor, collectionId: string, plantId: string) {
  const row = await findPlant(db, collectionId, plantId);
  if (!row) throw notFound('That plant');
  return row;
}

/** `%` and `_` typed by a grower are literal characters, not wildcards. */
const containsPattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/** The name as shown ("Rlc. Harbor Lantern 'Dune'"), so a search can span genus, grex and clone. */
const displayNameSql = sql`(${plants.genus} || ' ' || ${plants.epithet} || coalesce(' ''' || ${plants.clonalName} || '''', ''))`;

function listConditions(collectionId: string, query: ListQuery): SQL {
  const conditions: SQL[] = [eq(plants.collectionId, collectionId)];
  if (query.q) {
    const pattern = containsPattern(query.q);
    conditions.push(
      or(
        sql`${plants.tag} ilike ${pattern}`,
        sql`${plants.epithet} ilike ${pattern}`,
        sql`${plants.clonalName} ilike ${pattern}`,
        sql`${displayNameSql} ilike ${pattern}`,
      )!,
    );
  }
  // "Den" finds "Den."; the trailing dot of an abbreviation is optional when filtering.
  if (query.genus) conditions.push(sql`rtrim(lower(${plants.genus}), '.') = rtrim(lower(${query.genus}), '.')`);
  if (query.areaId) conditions.push(eq(plants.areaId, query.areaId));
  if (query.leadStatus) {
    const status = query.leadStatus;
    conditions.push(sql`exists (select 1 from ${leads} where ${leads.plantId} = ${plants.id} and ${leads.status} = ${status})`);
  }
  return and(...conditions)!;
}

function listOrder(query: ListQuery): SQL[] {
  const dir = query.order === 'desc' ? desc : asc;
  // Tags compare without regard to case ("c-12" beside "C-12"), then exactly, then by id.
  const byTag = [sql`lower(${plants.tag}) asc`, asc(plants.tag), asc(plants.id)];
  switch (query.sort) {
    case 'name':
      return [dir(plants.genus), dir(plants.epithet), sql`${plants.clonalName} ${sql.raw(query.order)} nulls first`, ...byTag];
    case 'updated':
      return [dir(plants.updatedAt), ...byTag];
    case 'acquired':
      // A plant with no acquisition date goes last whichever way the list runs.
      return [sql`${plants.acquiredOn} ${sql.raw(query.order)} nulls last`, ...byTag];
    default:
      return [sql`lower(${plants.tag}) ${sql.raw(query.order)}`, dir(plants.tag), dir(plants.id)];
  }
}

/** One page of plants: one query for the page, one for the total, two for the current leads. */
export async function listPlants(db: Database, collectionId: string, query: ListQuery) {
  const where = listConditions(collectionId, query);
  const rows = await db
    .select({ plant: plants, areaName: areas.name })
    .from(plants)
    .leftJoin(areas, eq(areas.id, plants.areaId))
    .where(where)
    .orderBy(...listOrder(query))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
  const [{ total }] = await db.select({ total: sql<number>`count(*)::int` }).from(plants).where(where);
  const summaries = await leadSummariesByPlant(db, { plantIds: rows.map((r) => r.plant.id) }, { currentOnly: true });
  const items: PlantListItem[] = rows.map(({ plant, areaName }) => ({
    ...toPlant(plant),
    areaName,
    currentLeads: summaries.get(plant.id) ?? [],
  }));
  return { items, page: query.page, pageSize: query.pageSize, total };
}

export async function createPlant(db: Database, collectionId: string, userId: string, input: PlantInput): Promise<Plant> {
  assertNotFuture(input.acquiredOn, 'acquiredOn');
  await assertAreaInCollection(db, collectionId, input.areaId, 'areaId');
  const [row] = await withDuplicateAs(
    () => db.insert(plants).values({ ...input, collectionId, createdBy: userId }).returning(),
    duplicateTag(input.tag),
  );
  return toPlant(row);
}

export async function plantDetail(db: Database, collectionId: string, plantId: string): Promise<PlantDetail> {
  const [found] = await db
    .select({ plant: plants, areaName: areas.name })
    .from(plants)
    .leftJoin(areas, eq(areas.id, plants.areaId))
    .where(and(eq(plants.id, plantId), eq(plants.collectionId, collectionId)))
    .limit(1);
  if (!found) throw notFound('That plant');
  const { plant, areaName } = found;

  const family = await db
    .select()
    .from(plants)
    .where(
      and(
        eq(plants.collectionId, collectionId),
        ne(plants.id, plant.id),
        plant.parentPlantId
          ? or(eq(plants.id, plant.parentPlantId), eq(plants.parentPlantId, plant.parentPlantId), eq(plants.parentPlantId, plant.id))
          : eq(plants.parentPlantId, plant.id),
      ),
    )
    .orderBy(asc(plants.tag));
  const parent = family.find((p) => p.id === plant.parentPlantId);
  const siblings = plant.parentPlantId ? family.filter((p) => p.parentPlantId === plant.parentPlantId) : [];
  const children = family.filter((p) => p.parentPlantId === plant.id);

  const leadsByPlant = await leadSummariesByPlant(db, { plantIds: [plant.id] }, { currentOnly: false });
  const care = await db
    .select()
    .from(careEntries)
    .where(and(eq(careEntries.plantId, plant.id), eq(careEntries.collectionId, collectionId)))
    .orderBy(desc(careEntries.occurredOn), desc(careEntries.createdAt));

  return {
    ...toPlant(plant),
    areaName,
    leads: leadsByPlant.get(plant.id) ?? [],
    lineage: {
      parent: parent ? toPlantRef(parent) : null,
      siblings: siblings.map(toPlantRef),
      children: children.map(toPlantRef),
    },
    care: care.map(toCare),
  };
}

/** Version-checked update: `UPDATE … WHERE version = $v`, so two saves of one copy cannot both land. */
export async function updatePlant(db: Database, collectionId: string, plantId: string, version: number, changes: PlantChanges): Promise<Plant> {
  assertNotFuture(changes.acquiredOn, 'acquiredOn');
  await assertWritablePlant(db, collectionId, plantId);
  await assertAreaInCollection(db, collectionId, changes.areaId, 'areaId');
  const [row] = await withDuplicateAs(
    () =>
      db
        .update(plants)
        .set({ ...changes, version: sql`${plants.version} + 1`, updatedAt: sql`now()` })
        .where(and(eq(plants.id, plantId), eq(plants.collectionId, collectionId), eq(plants.version, version)))
        .returning(),
    duplicateTag(changes.tag ?? ''),
  );
  if (row) return toPlant(row);
  throw new StaleError(toPlant(await requirePlant(db, collectionId, plantId)));
}

/**
 * Deletes a plant with its records (owners only, by the route): leads, measurements, bloom
 * records and care entries go with it; divisions keep theirs. A read-only history copy may be
 * deleted too: it is the owner's to keep or drop, and a division that inherited from it simply
 * loses that history (its parent link is cleared).
 */
export async function deletePlant(db: Database, collectionId: string, plantId: string): Promise<void> {
  const deleted = await db
    .delete(plants)
    .where(and(eq(plants.id, plantId), eq(plants.collectionId, collectionId)))
    .returning({ id: plants.id });
  if (deleted.length === 0) throw notFound('That plant');
}

/**
 * Divides a plant into new plants, one per piece, moving the chosen leads (with their
 * measurements and bloom records) to each. Everything runs in one transaction: a piece that
 * fails (a duplicate tag) undoes the pieces written before it. New plants are always new
 * rows, so a division cannot make a cycle in the lineage.
 */
export async function dividePlant(
  db: Database,
  collectionId: string,
  userId: string,
  parentId: string,
  input: z.infer<typeof divideInputSchema>,
) {
  assertNotFuture(input.dividedOn, 'dividedOn');
  const claimed = new Map<string, number>();
  for (const [i, piece] of input.pieces.entries()) {
    await assertAreaInCollection(db, collectionId, piece.areaId, `pieces.${i}.areaId`);
    for (const leadId of piece.leadIds) {
      const other = claimed.get(leadId);
      if (other !== undefined) throw fieldError(`pieces.${i}.leadIds`, `A lead can go to one piece only; ${leadId} is already in piece ${other + 1}`);
      claimed.set(leadId, i);
    }
  }

  return db.transaction(async (tx) => {
    // Locks the parent and its leads so a concurrent division cannot move the same lead twice.
    const [parent] = await tx
      .select()
      .from(plants)
      .where(and(eq(plants.id, parentId), eq(plants.collectionId, collectionId)))
      .for('update');
    if (!parent) throw notFound('That plant');
    refuseHistoryOnly(parent);
    const wanted = [...claimed.keys()];
    const own = wanted.length
      ? await tx
          .select({ id: leads.id })
          .from(leads)
          .where(and(inArray(leads.id, wanted), eq(leads.plantId, parent.id), eq(leads.collectionId, collectionId)))
          .for('update')
      : [];
    const ownIds = new Set(own.map((l) => l.id));
    for (const [i, piece] of input.pieces.entries()) {
      const foreign = piece.leadIds.find((id) => !ownIds.has(id));
      if (foreign) throw fieldError(`pieces.${i}.leadIds`, `${foreign} is not a lead of the plant being divided`);
    }

    const created: Plant[] = [];
    const warnings: Array<{ piece: number; message: string }> = [];
    for (const [i, piece] of input.pieces.entries()) {
      const [row] = await withDuplicateAs(
        () =>
          tx
            .insert(plants)
            .values({
              collectionId,
              tag: piece.tag,
              genus: parent.genus,
              epithet: parent.epithet,
              isSpecies: parent.isSpecies,
              clonalName: parent.clonalName,
              source: parent.source,
              areaId: piece.areaId ?? parent.areaId,
              medium: piece.medium ?? parent.medium,
              parentPlantId: parent.id,
              dividedOn: input.dividedOn,
              createdBy: userId,
            })
            .returning(),
        duplicateTag(piece.tag, `pieces.${i}.tag`),
      );
      if (piece.leadIds.length > 0) {
        await tx
          .update(leads)
          .set({ plantId: row.id, version: sql`${leads.version} + 1`, updatedAt: sql`now()` })
          .where(inArray(leads.id, piece.leadIds));
        // A moved lead's photos show the new plant now.
        await tx.update(photos).set({ plantId: row.id }).where(inArray(photos.leadId, piece.leadIds));
      } else {
        warnings.push({ piece: i, message: `Piece ${i + 1} (${piece.tag}) has no lead; a division usually needs a lead to grow on` });
      }
      if (piece.bulbCount !== null && piece.bulbCount < MIN_BULBS_PER_DIVISION) {
        warnings.push({
          piece: i,
          message: `Piece ${i + 1} (${piece.tag}) has ${piece.bulbCount} ${piece.bulbCount === 1 ? 'bulb' : 'bulbs'}; common practice is at least ${MIN_BULBS_PER_DIVISION} with a lead`,
        });
      }
      created.push(toPlant(row));
    }
    return { plants: created, warnings };
  });
}
