import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import { FUTURE_DATE_TOLERANCE_DAYS } from '@/shared/schemas/records';
import type { Database } from '../../db/client';
import { plants } from '../../db/schema';
import { fieldError, HttpError, notFound } from '../errors';

/** The database or an open transaction: services take either. */
export type Executor = Database | Parameters<Parameters<Database['transaction']>[0]>[0];

const uuid = z.uuid();

/**
 * An id from the path. A malformed one is answered like a missing record (404), as the
 * collection guard does for a malformed collection id.
 */
export function pathId(value: unknown, what: string): string {
  const parsed = uuid.safeParse(value);
  if (!parsed.success) throw notFound(what);
  return parsed.data;
}

/** The name of the unique index a query broke, if that is why it failed (SQLSTATE 23505). */
export function uniqueViolation(error: unknown): string | undefined {
  for (let e: unknown = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth += 1) {
    const { code, constraint_name: constraint } = e as { code?: unknown; constraint_name?: unknown };
    if (code === '23505') return typeof constraint === 'string' ? constraint : '';
  }
  return undefined;
}

/** Runs a write and turns a broken unique index into a 409 naming the duplicate. */
export async function withDuplicateAs<T>(write: () => Promise<T>, messages: Record<string, HttpError>): Promise<T> {
  try {
    return await write();
  } catch (error) {
    const constraint = uniqueViolation(error);
    if (constraint !== undefined && messages[constraint]) throw messages[constraint];
    throw error;
  }
}

export const duplicate = (field: string, message: string) =>
  new HttpError(409, 'duplicate', message, [{ field, reason: message }]);

/** The latest calendar date accepted: today in UTC plus the tolerance for growers east of UTC. */
export function latestAllowedDate(now = new Date()): string {
  const day = 24 * 60 * 60 * 1000;
  return new Date(now.getTime() + FUTURE_DATE_TOLERANCE_DAYS * day).toISOString().slice(0, 10);
}

/** Refuses a date in the future (400 naming `field`). Calendar dates compare as strings. */
export function assertNotFuture(date: string | null | undefined, field: string): void {
  if (date && date > latestAllowedDate()) {
    throw fieldError(field, `${date} is in the future; record what has happened, up to today`);
  }
}

/** Refuses a date before the lead was first seen (400 naming `field`). */
export function assertNotBeforeFirstSeen(date: string | null | undefined, firstSeen: string, field: string): void {
  if (date && date < firstSeen) {
    throw fieldError(field, `${date} is before the lead was first seen (${firstSeen})`);
  }
}

/**
 * The parsed fields the client actually sent. The update schemas are partials of the
 * create schemas, whose defaults (status 'growing', isSpecies false …) would otherwise
 * overwrite stored values the client never meant to change. Own keys only: `key in parsed`
 * would find `toString`, `constructor`, `valueOf` … on the prototype and save nothing as a change.
 */
export function sentFields<T extends Record<string, unknown>>(parsed: T, raw: unknown): Partial<Omit<T, 'version'>> {
  const sent = raw && typeof raw === 'object' ? Object.keys(raw) : [];
  const out: Record<string, unknown> = {};
  for (const key of sent) if (key !== 'version' && Object.hasOwn(parsed, key)) out[key] = parsed[key];
  if (Object.keys(out).length === 0) throw fieldError('body', 'Send at least one field to change');
  return out as Partial<Omit<T, 'version'>>;
}

/** The answer to any write to a history-only plant or to anything that hangs off it. */
export const readOnlyCopy = () =>
  new HttpError(409, 'read_only', "This plant is a read-only copy of another grower's record, brought in with a division; it cannot be changed");

/** Refuses a write to a plant row already read (a history-only copy: 409). */
export function refuseHistoryOnly(plant: { historyOnly: boolean } | undefined): void {
  if (plant?.historyOnly) throw readOnlyCopy();
}

/**
 * Refuses a write to a history-only plant of the collection or to its leads, measurements,
 * bloom records, care entries or photos (409). A plant not in the collection is left to the
 * caller's own not-found check.
 */
export async function assertWritablePlant(db: Executor, collectionId: string, plantId: string | null | undefined): Promise<void> {
  if (!plantId) return;
  const [row] = await db
    .select({ historyOnly: plants.historyOnly })
    .from(plants)
    .where(and(eq(plants.id, plantId), eq(plants.collectionId, collectionId)))
    .limit(1);
  refuseHistoryOnly(row);
}
