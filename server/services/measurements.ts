import { and, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { Role } from '@/shared/schemas/auth';
import type {
  BloomRecord,
  bloomInputSchema,
  Measurement,
  measurementInputSchema,
  sheathMarkInputSchema,
  updateMeasurementInputSchema,
} from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { flowersFromSheath, genusDefaultsFor } from '@/domain';
import { bloomRecords, leads, measurements, plants } from '../../db/schema';
import { fieldError, HttpError, notFound, StaleError } from '../errors';
import { requireLead } from './leads';
import { toBloom, toMeasurement } from './records-read';
import { assertNotBeforeFirstSeen, assertNotFuture, assertWritablePlant, type Executor } from './records-support';

type MeasurementInput = z.infer<typeof measurementInputSchema>;
type MeasurementChanges = Partial<Omit<z.infer<typeof updateMeasurementInputSchema>, 'version'>>;
type Member = { collectionId: string; userId: string; role: Role };

/** `created` is false when the client key had been seen: the stored entry is returned. */
export interface Recorded {
  measurement: Measurement;
  created: boolean;
}

function assertMeasurementDate(date: string, firstSeen: string) {
  assertNotFuture(date, 'date');
  assertNotBeforeFirstSeen(date, firstSeen, 'date');
}

async function byClientKey(db: Executor, collectionId: string, leadId: string, clientKey: string): Promise<Recorded | undefined> {
  const [row] = await db
    .select()
    .from(measurements)
    .where(and(eq(measurements.collectionId, collectionId), eq(measurements.clientKey, clientKey)))
    .limit(1);
  if (!row) return undefined;
  if (row.leadId !== leadId) {
    throw new HttpError(409, 'client_key_reused', 'That entry key was already used for another lead; send a fresh key', [
      { field: 'clientKey', reason: 'already used for another lead' },
    ]);
  }
  return { measurement: toMeasurement(row), created: false };
}

/**
 * Stores one measurement, at most once per client key: a repeat (a retried upload from the
 * Rounds walk) returns the stored entry and writes nothing. Two copies racing each other
 * meet the unique index; ON CONFLICT DO NOTHING lets the loser read the winner's row.
 */
async function insertOnce(
  db: Executor,
  member: Member,
  leadId: string,
  values: Omit<typeof measurements.$inferInsert, 'collectionId' | 'leadId' | 'createdBy'>,
): Promise<Recorded> {
  const insert = db
    .insert(measurements)
    .values({ ...values, collectionId: member.collectionId, leadId, createdBy: member.userId });
  if (!values.clientKey) {
    const [row] = await insert.returning();
    return { measurement: toMeasurement(row), created: true };
  }
  const [row] = await insert.onConflictDoNothing({ target: [measurements.collectionId, measurements.clientKey] }).returning();
  if (row) return { measurement: toMeasurement(row), created: true };
  const stored = await byClientKey(db, member.collectionId, leadId, values.clientKey);
  if (!stored) throw new Error('client key conflict without a stored row');
  return stored;
}

export async function recordMeasurement(db: Database, member: Member, leadId: string, input: MeasurementInput): Promise<Recorded> {
  const lead = await requireLead(db, member.collectionId, leadId);
  await assertWritablePlant(db, member.collectionId, lead.plantId);
  if (input.clientKey) {
    const stored = await byClientKey(db, member.collectionId, lead.id, input.clientKey);
    if (stored) return stored;
  }
  assertMeasurementDate(input.date, lead.firstSeen);
  const { date, ...rest } = input;
  return db.transaction(async (tx) => {
    await lockLeadDay(tx, lead.id);
    // A copy of this very entry that won the lock first is the answer, not a second look.
    const stored = input.clientKey ? await byClientKey(tx, member.collectionId, lead.id, input.clientKey) : undefined;
    if (stored) return stored;
    await refuseSecondOnDate(tx, lead, date);
    return insertOnce(tx, member, lead.id, { ...rest, measuredOn: date, clientKey: input.clientKey ?? null });
  });
}

/**
 * One look per lead and day: a second measurement on a date that has one is refused with 409
 * `measurement_exists` and the stored one (to edit instead). Run under `lockLeadDay`, so two
 * saves racing for the same day cannot both land.
 */
/** Writers of one lead's looks take turns until their transaction ends. */
async function lockLeadDay(tx: Executor, leadId: string) {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`measurement-day:${leadId}`}))`);
}

async function refuseSecondOnDate(tx: Executor, lead: { id: string; label: string }, date: string, except?: string) {
  const [existing] = await tx
    .select()
    .from(measurements)
    .where(and(eq(measurements.leadId, lead.id), eq(measurements.measuredOn, date)))
    .limit(2);
  if (existing && existing.id !== except) {
    throw new StaleError(toMeasurement(existing), `Lead ${lead.label} already has a measurement on ${date}; edit that one instead`, 'measurement_exists');
  }
}

/**
 * A sheath mark from the Lead screen. On a day that already has a look, the mark is that look's
 * sheath (an edit of it); otherwise it is a new look, which needs the height the grower reads off
 * the bulb that day — no height is ever carried forward, since an invented one would flatten the
 * growth curve. A genus whose flowers do not come from a sheath takes no sheath mark.
 */
export async function markSheath(db: Database, member: Member, leadId: string, input: z.infer<typeof sheathMarkInputSchema>): Promise<Recorded> {
  const lead = await requireLead(db, member.collectionId, leadId);
  await assertWritablePlant(db, member.collectionId, lead.plantId);
  if (input.clientKey) {
    const stored = await byClientKey(db, member.collectionId, lead.id, input.clientKey);
    if (stored) return stored;
  }
  assertMeasurementDate(input.date, lead.firstSeen);
  const [plant] = await db.select({ genus: plants.genus }).from(plants).where(eq(plants.id, lead.plantId)).limit(1);
  const genus = genusDefaultsFor(plant?.genus);
  if (!flowersFromSheath(genus) && input.sheath !== 'none') {
    throw fieldError('sheath', `${plant?.genus ?? 'This genus'} does not flower from a sheath; mark buds or a spike as seen instead`);
  }
  return db.transaction(async (tx) => {
    await lockLeadDay(tx, lead.id);
    const stored = input.clientKey ? await byClientKey(tx, member.collectionId, lead.id, input.clientKey) : undefined;
    if (stored) return stored;
    const [sameDay] = await tx
      .select()
      .from(measurements)
      .where(and(eq(measurements.leadId, lead.id), eq(measurements.measuredOn, input.date)))
      .limit(1);
    if (sameDay) {
      const [row] = await tx
        .update(measurements)
        .set({ sheath: input.sheath, version: sql`${measurements.version} + 1`, updatedAt: sql`now()` })
        .where(eq(measurements.id, sameDay.id))
        .returning();
      return { measurement: toMeasurement(row), created: false };
    }
    if (input.heightMm === undefined) {
      throw fieldError('heightMm', "Type the bulb's height today: a sheath mark on a new day is saved as a measurement");
    }
    return insertOnce(tx, member, lead.id, {
      measuredOn: input.date,
      heightMm: input.heightMm,
      sheath: input.sheath,
      clientKey: input.clientKey ?? null,
    });
  });
}

async function findMeasurement(db: Executor, collectionId: string, measurementId: string) {
  const [row] = await db
    .select({ measurement: measurements, firstSeen: leads.firstSeen, plantId: leads.plantId })
    .from(measurements)
    .innerJoin(leads, eq(leads.id, measurements.leadId))
    .where(and(eq(measurements.id, measurementId), eq(measurements.collectionId, collectionId)))
    .limit(1);
  if (!row) throw notFound('That measurement');
  return row;
}

export async function updateMeasurement(
  db: Database,
  collectionId: string,
  measurementId: string,
  version: number,
  changes: MeasurementChanges,
): Promise<Measurement> {
  const { firstSeen, plantId } = await findMeasurement(db, collectionId, measurementId);
  await assertWritablePlant(db, collectionId, plantId);
  const { date, ...rest } = changes;
  if (date !== undefined) assertMeasurementDate(date, firstSeen);
  if (date !== undefined) {
    const { measurement } = await findMeasurement(db, collectionId, measurementId);
    if (measurement.measuredOn !== date) {
      const [other] = await db
        .select()
        .from(measurements)
        .where(and(eq(measurements.leadId, measurement.leadId), eq(measurements.measuredOn, date)))
        .limit(1);
      if (other) throw new StaleError(toMeasurement(other), `This lead already has a measurement on ${date}; edit that one instead`, 'measurement_exists');
    }
  }
  const [row] = await db
    .update(measurements)
    .set({ ...rest, ...(date !== undefined ? { measuredOn: date } : {}), version: sql`${measurements.version} + 1`, updatedAt: sql`now()` })
    .where(and(eq(measurements.id, measurementId), eq(measurements.collectionId, collectionId), eq(measurements.version, version)))
    .returning();
  if (row) return toMeasurement(row);
  throw new StaleError(toMeasurement((await findMeasurement(db, collectionId, measurementId)).measurement));
}

/** An owner may delete any measurement; a grower only one they recorded. */
export async function deleteMeasurement(db: Database, member: Member, measurementId: string): Promise<void> {
  const { measurement, plantId } = await findMeasurement(db, member.collectionId, measurementId);
  await assertWritablePlant(db, member.collectionId, plantId);
  if (member.role !== 'owner' && measurement.createdBy !== member.userId) {
    throw new HttpError(403, 'forbidden', 'A grower may delete only the measurements they recorded; ask an owner');
  }
  await db.delete(measurements).where(and(eq(measurements.id, measurement.id), eq(measurements.collectionId, member.collectionId)));
}

// ── Bloom records ─────────────────────────────────────────────────────────────────────

const BLOOM_DATES = ['budsSeenOn', 'firstOpenOn', 'lastFadedOn'] as const;

/**
 * Creates the lead's bloom record, or replaces it when the client sends the version it
 * read. A save without the version (or with an old one) while a record exists is stale.
 */
export async function putBloom(
  db: Database,
  collectionId: string,
  leadId: string,
  input: z.infer<typeof bloomInputSchema>,
): Promise<{ bloom: BloomRecord; created: boolean }> {
  const lead = await requireLead(db, collectionId, leadId);
  await assertWritablePlant(db, collectionId, lead.plantId);
  for (const field of BLOOM_DATES) {
    assertNotFuture(input[field], field);
    assertNotBeforeFirstSeen(input[field], lead.firstSeen, field);
  }
  const { version, ...values } = input;
  const current = async () => {
    const [row] = await db.select().from(bloomRecords).where(eq(bloomRecords.leadId, lead.id)).limit(1);
    return row;
  };

  const existing = await current();
  if (!existing) {
    const [row] = await db
      .insert(bloomRecords)
      .values({ ...values, collectionId, leadId: lead.id })
      .onConflictDoNothing({ target: bloomRecords.leadId })
      .returning();
    if (row) return { bloom: toBloom(row), created: true };
    // Someone else created it between our read and our insert.
    throw new StaleError(toBloom((await current())!));
  }
  if (version === undefined) throw new StaleError(toBloom(existing), 'This lead already has a bloom record; review it and save again');
  const [row] = await db
    .update(bloomRecords)
    .set({ ...values, version: sql`${bloomRecords.version} + 1`, updatedAt: sql`now()` })
    .where(and(eq(bloomRecords.leadId, lead.id), eq(bloomRecords.version, version)))
    .returning();
  if (row) return { bloom: toBloom(row), created: false };
  const now = await current();
  if (!now) throw notFound('That bloom record');
  throw new StaleError(toBloom(now));
}
