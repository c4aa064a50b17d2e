import { randomUUID } from 'node:crypto';
import { and, asc, eq, lt, sql } from 'drizzle-orm';
import type { Role } from '@/shared/schemas/auth';
import type { Photo, PhotoSize, PhotoUploadCancel, PhotoUploadFields } from '@/shared/schemas/photos';
import type { Database } from '../../db/client';
import { leads, measurements, photos, photoUploads } from '../../db/schema';
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
/** Both files of a photo in the store. */
export const photoFileKeys = (storageKey: string) => [photoKey(storageKey, 'display'), photoKey(storageKey, 'thumb')];

/**
 * How long an upload key is kept. A resend follows its first attempt within seconds and a
 * cancel within the upload's own minutes, so older keys are cleared as new ones come in.
 */
export const UPLOAD_KEY_DAYS = 2;

const keyRefusal = (code: string, message: string, reason: string) => new HttpError(409, code, message, [{ field: 'clientKey', reason }]);
/** Keys are their sender's: the same answer for a resend and for a cancel under another person's key. */
const someoneElsesKey = () => keyRefusal('client_key_reused', 'That upload key was already used by someone else; send a fresh key', 'already used');

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

export interface AddedPhoto {
  photo: Photo;
  /** False when the upload's key had already stored this photo (a resend). */
  created: boolean;
}

/** An earlier upload's key was taken inside the transaction: the row is rolled back. */
class UploadKeyTaken extends Error {}

/**
 * What an earlier upload under `clientKey` came to: its photo, or a 409 when it was
 * cancelled, its photo has since been deleted, or the key is someone else's. Null when the
 * key is new.
 */
export async function earlierUpload(db: Database, member: Member, clientKey: string): Promise<Photo | null> {
  // The key's row and its photo in one read, so a photo deleted meanwhile is not a 404.
  const [upload] = await db
    .select({ userId: photoUploads.userId, cancelledAt: photoUploads.cancelledAt, photo: photos })
    .from(photoUploads)
    .leftJoin(photos, eq(photos.id, photoUploads.photoId))
    .where(and(eq(photoUploads.collectionId, member.collectionId), eq(photoUploads.clientKey, clientKey)))
    .limit(1);
  if (!upload) return null;
  if (upload.userId !== member.userId) throw someoneElsesKey();
  if (upload.cancelledAt) throw keyRefusal('upload_cancelled', 'This upload was cancelled; choose the photo again to send it', 'cancelled');
  if (!upload.photo) throw keyRefusal('upload_photo_deleted', 'This upload was stored and its photo has since been deleted', 'photo deleted');
  return toPhoto(upload.photo);
}

/**
 * Stores both sizes, then the row, and with a client key the key's claim in the same
 * transaction. When the row cannot be written the files are removed again, so a refused,
 * cancelled or failed upload leaves neither a row nor a file behind; a resend under a key
 * that already stored its photo gets that photo.
 */
export async function addPhoto(
  db: Database,
  store: PhotoStore,
  member: Member,
  fields: PhotoUploadFields,
  processed: ProcessedPhoto,
  uploadedBytes: number,
  today: string,
): Promise<AddedPhoto> {
  const { collectionId } = member;
  assertNotFuture(fields.takenOn, 'takenOn');
  const target = await resolveTarget(db, collectionId, fields);
  await assertWritablePlant(db, collectionId, target.plantId);
  const id = randomUUID();
  const storageKey = `${collectionId}/${id}`;
  const keys = photoFileKeys(storageKey);
  try {
    await store.put(keys[0], processed.display.data, WEBP);
    await store.put(keys[1], processed.thumb.data, WEBP);
    const row = await db.transaction(async (tx) => {
      const [inserted] = await tx
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
      if (fields.clientKey) {
        await tx
          .delete(photoUploads)
          .where(and(eq(photoUploads.collectionId, collectionId), lt(photoUploads.createdAt, sql`now() - make_interval(days => ${UPLOAD_KEY_DAYS})`)));
        // Waits for a cancel or resend holding the same key, then finds its row taken.
        const claimed = await tx
          .insert(photoUploads)
          .values({ collectionId, clientKey: fields.clientKey, userId: member.userId, photoId: id })
          .onConflictDoNothing()
          .returning({ photoId: photoUploads.photoId });
        if (claimed.length === 0) throw new UploadKeyTaken();
      }
      return inserted;
    });
    return { photo: toPhoto(row), created: true };
  } catch (error) {
    await store.delete(keys).catch(() => {});
    if (error instanceof UploadKeyTaken && fields.clientKey) {
      const earlier = await earlierUpload(db, member, fields.clientKey);
      if (earlier) return { photo: earlier, created: false };
    }
    throw error;
  }
}

/**
 * Cancels the upload sent under `clientKey`, whether or not it has reached the server. The
 * key's row is taken, so an upload still on its way is refused when it arrives, and one
 * already stored is removed with its files.
 *
 * A photo already stored is locked before the key's row: deleting a photo (or its lead or
 * plant) takes the photo row first and then, through the foreign key, the key's row, and the
 * same order here keeps the two from deadlocking.
 */
export async function cancelUpload(db: Database, store: PhotoStore, member: Member, clientKey: string): Promise<PhotoUploadCancel> {
  const removed = await db.transaction(async (tx) => {
    const stored = await tx
      .select({ id: photos.id })
      .from(photos)
      .innerJoin(photoUploads, eq(photoUploads.photoId, photos.id))
      .where(and(eq(photoUploads.collectionId, member.collectionId), eq(photoUploads.clientKey, clientKey)))
      .for('update', { of: photos });
    const [upload] = await tx
      .insert(photoUploads)
      .values({ collectionId: member.collectionId, clientKey, userId: member.userId, cancelledAt: sql`now()` })
      .onConflictDoUpdate({
        target: [photoUploads.collectionId, photoUploads.clientKey],
        set: { cancelledAt: sql`coalesce(${photoUploads.cancelledAt}, now())` },
        setWhere: eq(photoUploads.userId, member.userId),
      })
      .returning({ photoId: photoUploads.photoId });
    if (!upload) throw someoneElsesKey();
    if (!upload.photoId) return null;
    // Not locked above only when the upload committed while this waited for the key's row.
    if (!stored.some((p) => p.id === upload.photoId)) await tx.select({ id: photos.id }).from(photos).where(eq(photos.id, upload.photoId)).for('update');
    const [photo] = await tx.delete(photos).where(eq(photos.id, upload.photoId)).returning({ storageKey: photos.storageKey });
    return photo ?? null;
  });
  // The row is gone and the cancel has happened; files a failing store keeps are only unreachable leftovers.
  if (removed) await store.delete(photoFileKeys(removed.storageKey)).catch(() => {});
  return { removed: Boolean(removed) };
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
  await store.delete(photoFileKeys(row.storageKey));
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
  await store.delete(rows.flatMap((r) => photoFileKeys(r.storageKey)));
  return result;
}
