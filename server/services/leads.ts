import { and, asc, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { Lead, LeadDetail, leadInputSchema, updateLeadInputSchema } from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { bloomRecords, leads, measurements, plants } from '../../db/schema';
import { fieldError, notFound, StaleError } from '../errors';
import { requirePlant } from './plants';
import { toBloom, toLead, toMeasurement, toPlantRef } from './records-read';
import { assertNotFuture, assertWritablePlant, duplicate, type Executor, refuseHistoryOnly, withDuplicateAs } from './records-support';

type LeadChanges = Partial<Omit<z.infer<typeof updateLeadInputSchema>, 'version'>>;

const duplicateLabel = (label: string) => ({
  leads_plant_label_unique: duplicate('label', `This plant already has a lead labelled "${label}"`),
});

export async function findLead(db: Executor, collectionId: string, leadId: string) {
  const [row] = await db.select().from(leads).where(and(eq(leads.id, leadId), eq(leads.collectionId, collectionId))).limit(1);
  return row;
}

export async function requireLead(db: Executor, collectionId: string, leadId: string) {
  const row = await findLead(db, collectionId, leadId);
  if (!row) throw notFound('That lead');
  return row;
}

/** A parent lead must be another lead of the same plant, and must not descend from this one. */
async function assertParentLead(db: Executor, plantId: string, parentLeadId: string, selfId?: string) {
  if (parentLeadId === selfId) throw fieldError('parentLeadId', 'A lead cannot be its own parent');
  const [parent] = await db
    .select({ id: leads.id })
    .from(leads)
    .where(and(eq(leads.id, parentLeadId), eq(leads.plantId, plantId)))
    .limit(1);
  if (!parent) throw fieldError('parentLeadId', 'The parent lead must be another lead of this plant');
  if (!selfId) return;
  const ancestors = await db.execute<{ id: string }>(sql`
    with recursive up(id, parent, depth) as (
      select id, parent_lead_id, 0 from ${leads} where id = ${parentLeadId}
      union all
      select l.id, l.parent_lead_id, up.depth + 1 from ${leads} l join up on l.id = up.parent where up.depth < 1000
    )
    select id from up where id = ${selfId} limit 1`);
  if (ancestors.length > 0) throw fieldError('parentLeadId', 'That lead grew from this one; choosing it as parent would make a cycle');
}

export async function createLead(db: Database, collectionId: string, plantId: string, input: z.infer<typeof leadInputSchema>): Promise<Lead> {
  refuseHistoryOnly(await requirePlant(db, collectionId, plantId));
  assertNotFuture(input.firstSeen, 'firstSeen');
  if (input.parentLeadId) await assertParentLead(db, plantId, input.parentLeadId);
  const [row] = await withDuplicateAs(
    () => db.insert(leads).values({ ...input, collectionId, plantId }).returning(),
    duplicateLabel(input.label),
  );
  return toLead(row);
}

export async function leadDetail(db: Database, collectionId: string, leadId: string): Promise<LeadDetail> {
  const lead = await requireLead(db, collectionId, leadId);
  const [plant] = await db.select().from(plants).where(eq(plants.id, lead.plantId)).limit(1);
  const rows = await db
    .select()
    .from(measurements)
    .where(eq(measurements.leadId, lead.id))
    .orderBy(asc(measurements.measuredOn), asc(measurements.createdAt), asc(measurements.id));
  const [bloom] = await db.select().from(bloomRecords).where(eq(bloomRecords.leadId, lead.id)).limit(1);
  return {
    ...toLead(lead),
    plant: toPlantRef(plant),
    measurements: rows.map(toMeasurement),
    bloom: bloom ? toBloom(bloom) : null,
  };
}

/** The earliest date recorded on a lead (a measurement or a bloom date), or null. */
async function earliestRecordOn(db: Executor, leadId: string): Promise<string | null> {
  const [row] = await db.execute<{ earliest: string | null }>(sql`
    select min(d)::text as earliest from (
      select measured_on as d from ${measurements} where lead_id = ${leadId}
      union all
      select least(buds_seen_on, first_open_on, last_faded_on) from ${bloomRecords} where lead_id = ${leadId}
    ) dates`);
  return row?.earliest ?? null;
}

export async function updateLead(db: Database, collectionId: string, leadId: string, version: number, changes: LeadChanges): Promise<Lead> {
  const current = await requireLead(db, collectionId, leadId);
  await assertWritablePlant(db, collectionId, current.plantId);
  if (changes.firstSeen !== undefined) {
    assertNotFuture(changes.firstSeen, 'firstSeen');
    const earliest = await earliestRecordOn(db, leadId);
    if (earliest && changes.firstSeen > earliest) {
      throw fieldError('firstSeen', `This lead has a record on ${earliest}; it was first seen on or before that date`);
    }
  }
  // An unchanged parent is not re-checked: after a division the parent lead may be on the other piece.
  if (changes.parentLeadId && changes.parentLeadId !== current.parentLeadId) {
    await assertParentLead(db, current.plantId, changes.parentLeadId, leadId);
  }
  const [row] = await withDuplicateAs(
    () =>
      db
        .update(leads)
        .set({ ...changes, version: sql`${leads.version} + 1`, updatedAt: sql`now()` })
        .where(and(eq(leads.id, leadId), eq(leads.collectionId, collectionId), eq(leads.version, version)))
        .returning(),
    duplicateLabel(changes.label ?? ''),
  );
  if (row) return toLead(row);
  throw new StaleError(toLead(await requireLead(db, collectionId, leadId)));
}

export async function deleteLead(db: Database, collectionId: string, leadId: string): Promise<void> {
  await assertWritablePlant(db, collectionId, (await findLead(db, collectionId, leadId))?.plantId);
  const deleted = await db
    .delete(leads)
    .where(and(eq(leads.id, leadId), eq(leads.collectionId, collectionId)))
    .returning({ id: leads.id });
  if (deleted.length === 0) throw notFound('That lead');
}
