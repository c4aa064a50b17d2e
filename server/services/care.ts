import { and, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { Role } from '@/shared/schemas/auth';
import type { CareEntry, careInputSchema } from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { careEntries, plants } from '../../db/schema';
import { fieldError, HttpError, notFound } from '../errors';
import { assertAreaInCollection, findArea } from './areas';
import { requirePlant } from './plants';
import { toCare } from './records-read';
import { assertNotFuture, assertWritablePlant, refuseHistoryOnly } from './records-support';

type Member = { collectionId: string; userId: string; role: Role };
type CareInput = z.infer<typeof careInputSchema>;

function columnsOf(input: CareInput) {
  return {
    kind: input.kind,
    occurredOn: input.occurredOn,
    note: input.note,
    withCalcium: input.kind === 'feed' ? input.withCalcium : null,
    newMedium: input.kind === 'repot' ? input.newMedium : null,
    product: input.kind === 'treat' ? input.product : null,
    target: input.kind === 'treat' ? input.target : null,
    toAreaId: input.kind === 'move' ? input.toAreaId : null,
    damageKind: input.kind === 'damage' ? input.damageKind : null,
  };
}

/**
 * Records a care entry for a plant or an area. For a plant, a move also puts the plant in
 * the new area and a repot sets its medium, in the same transaction as the entry, so the
 * plant's record and its history never disagree. An area's entry records only.
 */
export async function addCare(
  db: Database,
  member: Member,
  subject: { plantId: string } | { areaId: string },
  input: CareInput,
): Promise<CareEntry> {
  const { collectionId } = member;
  if ('plantId' in subject) refuseHistoryOnly(await requirePlant(db, collectionId, subject.plantId));
  else if (!(await findArea(db, collectionId, subject.areaId))) throw notFound('That area');
  assertNotFuture(input.occurredOn, 'occurredOn');
  if (input.kind === 'move') {
    await assertAreaInCollection(db, collectionId, input.toAreaId, 'toAreaId');
    if ('areaId' in subject && input.toAreaId === subject.areaId) throw fieldError('toAreaId', 'Choose an area other than this one');
  }

  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(careEntries)
      .values({
        ...columnsOf(input),
        collectionId,
        plantId: 'plantId' in subject ? subject.plantId : null,
        areaId: 'areaId' in subject ? subject.areaId : null,
        createdBy: member.userId,
      })
      .returning();
    if ('plantId' in subject && (input.kind === 'move' || input.kind === 'repot')) {
      await tx
        .update(plants)
        .set({
          ...(input.kind === 'move' ? { areaId: input.toAreaId } : { medium: input.newMedium }),
          version: sql`${plants.version} + 1`,
          updatedAt: sql`now()`,
        })
        .where(and(eq(plants.id, subject.plantId), eq(plants.collectionId, collectionId)));
    }
    return toCare(row);
  });
}

/** An owner may delete any care entry; a grower only one they recorded. */
export async function deleteCare(db: Database, member: Member, careId: string): Promise<void> {
  const [row] = await db
    .select({ id: careEntries.id, createdBy: careEntries.createdBy, plantId: careEntries.plantId })
    .from(careEntries)
    .where(and(eq(careEntries.id, careId), eq(careEntries.collectionId, member.collectionId)))
    .limit(1);
  if (!row) throw notFound('That care entry');
  await assertWritablePlant(db, member.collectionId, row.plantId);
  if (member.role !== 'owner' && row.createdBy !== member.userId) {
    throw new HttpError(403, 'forbidden', 'A grower may delete only the care entries they recorded; ask an owner');
  }
  await db.delete(careEntries).where(eq(careEntries.id, row.id));
}
