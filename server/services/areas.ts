import { and, asc, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { Area, areaInputSchema, updateAreaInputSchema } from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { areas } from '../../db/schema';
import { fieldError, notFound, StaleError } from '../errors';
import { toArea } from './records-read';
import { duplicate, type Executor, withDuplicateAs } from './records-support';

const duplicateName = (name: string) => ({
  areas_collection_name_unique: duplicate('name', `There is already an area called "${name}" in this collection`),
});

export async function listAreas(db: Executor, collectionId: string): Promise<Area[]> {
  const rows = await db.select().from(areas).where(eq(areas.collectionId, collectionId)).orderBy(asc(areas.position), asc(areas.name));
  return rows.map(toArea);
}

export async function findArea(db: Executor, collectionId: string, areaId: string) {
  const [row] = await db.select().from(areas).where(and(eq(areas.id, areaId), eq(areas.collectionId, collectionId))).limit(1);
  return row;
}

/** An area id from a request body must name an area of this collection (400 otherwise). */
export async function assertAreaInCollection(db: Executor, collectionId: string, areaId: string | null | undefined, field: string) {
  if (!areaId) return;
  if (!(await findArea(db, collectionId, areaId))) throw fieldError(field, 'No such area in this collection');
}

/** A new area goes to the end of the walking order. */
export async function createArea(db: Database, collectionId: string, input: z.infer<typeof areaInputSchema>): Promise<Area> {
  const [row] = await withDuplicateAs(
    () =>
      db
        .insert(areas)
        .values({
          collectionId,
          ...input,
          position: sql`(select coalesce(max(${areas.position}) + 1, 0) from ${areas} where ${areas.collectionId} = ${collectionId})`,
        })
        .returning(),
    duplicateName(input.name),
  );
  return toArea(row);
}

export async function updateArea(
  db: Database,
  collectionId: string,
  areaId: string,
  version: number,
  changes: Partial<Omit<z.infer<typeof updateAreaInputSchema>, 'version'>>,
): Promise<Area> {
  const [row] = await withDuplicateAs(
    () =>
      db
        .update(areas)
        .set({ ...changes, version: sql`${areas.version} + 1`, updatedAt: sql`now()` })
        .where(and(eq(areas.id, areaId), eq(areas.collectionId, collectionId), eq(areas.version, version)))
        .returning(),
    duplicateName(changes.name ?? ''),
  );
  if (row) return toArea(row);
  const current = await findArea(db, collectionId, areaId);
  if (!current) throw notFound('That area');
  throw new StaleError(toArea(current));
}

/** Plants in the area keep their records and lose the area (the foreign key sets it null). */
export async function deleteArea(db: Database, collectionId: string, areaId: string): Promise<void> {
  const deleted = await db
    .delete(areas)
    .where(and(eq(areas.id, areaId), eq(areas.collectionId, collectionId)))
    .returning({ id: areas.id });
  if (deleted.length === 0) throw notFound('That area');
}
