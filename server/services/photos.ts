import { randomUUID } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import type { Role } from '@/shared/schemas/auth';
import type { Photo, PhotoSize, PhotoUploadFields } from '@/shared/schemas/photos';
import type { Database } from '../../db/client';
import { leads, measurements, photos } from '../../db/schema';
import { HttpError, notFound } from '../errors';
import type { ProcessedPhoto } from '../photos/process';
import type { PhotoStore } from '../photos/store';
import { requireLead } from './leads';
import { requirePlant } from './plants';
import { assertNotFuture, assertWritablePlant } from './records-support';

type Member = { collectionId: string; userId: string; role: Role };
type PhotoRow = typeof photos.$inferSelect;

const WEBP = 'image/webp';

export const photoKey = (storageKey: string, size: PhotoSize) => `${storageKey}/${size}.webp`;

export function toPhoto(row: PhotoRow): Photo {
  const base = `/api/collections/${row.collectionId}/photos/${row.id}`;
  return {
    id: row.id,
    plantId: row.plantId,
    leadId: row.leadId,
    measurementId: row.measurementId,
    takenOn: row.takenOn,
    width: row.width,
    height: row.height,
    thumbWidth: row.thumbWidth,
    thumbHeight: row.thumbHeight,
    caption: row.caption,
    uploadedBy: row.uploadedBy,
    createdAt: row.createdAt.toISOString(),
    displayUrl: `${base}/display`,
    thumbUrl: `${base}/thumb`,
  };
}

/** What the photo is attached to, checked to belong to the member's collection. */
async function resolveTarget(db: Database, collectionId: string, fields: PhotoUploadFields) {
  if (fields.measurementId) {
    const [row] = await db
      .select({ id: measurements.id, leadId: measurements.leadId, measuredOn: measurements.measuredOn, plantId: leads.plantId })
      .from(measurements)
      .innerJoin(leads, eq(leads.id, measurements.leadId))
      .where(and(eq(measurements.id, fields.measurementId), eq(measurements.collectionId, collectionId)))
      .limit(1);
    if (!row) throw notFound('That measurement');
    return { plantId: row.plantId, leadId: row.leadId, measurementId: row.id, date: row.measuredOn };
  }
  if (fields.leadId) {
    const lead = await requireLead(db, collectionId, fields.leadId);
    return { plantId: lead.plantId, leadId: lead.id, measurementId: null, date: null };
  }
  const plant = await requirePlant(db, collectionId, fields.plantId!);
  return { plantId: plant.id, leadId: null, measurementId: null, date: null };
}

/**
 * Stores both sizes, then the row. When the row cannot be written the files are removed
 * again, so a refused or failed upload leaves neither a row nor a file behind.
 */
export async function addPhoto(
  db: Database,
  store: PhotoStore,
  member: Member,
  fields: PhotoUploadFields,
  processed: ProcessedPhoto,
  uploadedBytes: number,
  today: string,
): Promise<Photo> {
  const { collectionId } = member;
  assertNotFuture(fields.takenOn, 'takenOn');
  const target = await resolveTarget(db, collectionId, fields);
  await assertWritablePlant(db, collectionId, target.plantId);
  const id = randomUUID();
  const storageKey = `${collectionId}/${id}`;
  const keys = [photoKey(storageKey, 'display'), photoKey(storageKey, 'thumb')];
  try {
    await store.put(keys[0], processed.display.data, WEBP);
    await store.put(keys[1], processed.thumb.data, WEBP);
    const [row] = await db
      .insert(photos)
      .values({
        id,
        collectionId,
        plantId: target.plantId,
        leadId: target.leadId,
        measurementId: target.measurementId,
        takenOn: target.date ?? fields.takenOn ?? processed.takenOn ?? today,
        storageKey,
        width: processed.display.width,
        height: processed.display.height,
        thumbWidth: processed.thumb.width,
        thumbHeight: processed.thumb.height,
        bytes: uploadedBytes,
        caption: fields.caption ?? null,
        uploadedBy: member.userId,
      })
      .returning();
    return toPhoto(row);
  } catch (error) {
    await store.delete(keys).catch(() => {});
    throw error;
  }
}

/** A plant's photos (every lead's and its own) or one lead's, oldest first. */
export async function listPhotos(db: Database, collectionId: string, query: { plantId?: string; leadId?: string }): Promise<Photo[]> {
  if (query.plantId) await requirePlant(db, collectionId, query.plantId);
  if (query.leadId) await requireLead(db, collectionId, query.leadId);
  const rows = await db
    .select()
    .from(photos)
    .where(
      and(
        eq(photos.collectionId, collectionId),
        query.plantId ? eq(photos.plantId, query.plantId) : eq(photos.leadId, query.leadId!),
      ),
    )
    .orderBy(asc(photos.takenOn), asc(photos.createdAt), asc(photos.id));
  return rows.map(toPhoto);
}

async function requirePhoto(db: Database, collectionId: string, photoId: string): Promise<PhotoRow> {
  const [row] = await db
    .select()
    .from(photos)
    .where(and(eq(photos.id, photoId), eq(photos.collectionId, collectionId)))
    .limit(1);
  if (!row) throw notFound('That photo');
  return row;
}

export async function readPhotoFile(db: Database, store: PhotoStore, collectionId: string, photoId: string, size: PhotoSize) {
  const row = await requirePhoto(db, collectionId, photoId);
  const data = await store.get(photoKey(row.storageKey, size));
  if (!data) throw new HttpError(404, 'photo_file_missing', 'The file of this photo is missing from the photo store');
  return data;
}

/** An owner may delete any photo; a grower only one they uploaded. The row goes first, then the files. */
export async function deletePhoto(db: Database, store: PhotoStore, member: Member, photoId: string): Promise<void> {
  const row = await requirePhoto(db, member.collectionId, photoId);
  await assertWritablePlant(db, member.collectionId, row.plantId);
  if (member.role !== 'owner' && row.uploadedBy !== member.userId) {
    throw new HttpError(403, 'forbidden', 'Only the owner or the person who added this photo can delete it');
  }
  await db.delete(photos).where(eq(photos.id, row.id));
  await store.delete([photoKey(row.storageKey, 'display'), photoKey(row.storageKey, 'thumb')]);
}

/**
 * Runs a delete that takes photo rows with it (a plant, a lead, a collection: the rows go by
 * cascade), then removes those photos' files, so nothing of a deleted record stays on disk.
 */
export async function withPhotoFilesRemoved<T>(
  db: Database,
  store: PhotoStore,
  scope: { collectionId: string; plantId?: string; leadId?: string },
  remove: () => Promise<T>,
): Promise<T> {
  const rows = await db
    .select({ storageKey: photos.storageKey })
    .from(photos)
    .where(
      and(
        eq(photos.collectionId, scope.collectionId),
        scope.plantId ? eq(photos.plantId, scope.plantId) : undefined,
        scope.leadId ? eq(photos.leadId, scope.leadId) : undefined,
      ),
    );
  const result = await remove();
  await store.delete(rows.flatMap((r) => [photoKey(r.storageKey, 'display'), photoKey(r.storageKey, 'thumb')]));
  return result;
}
