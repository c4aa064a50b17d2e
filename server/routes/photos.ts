import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { photoListQuerySchema, photoClientKeySchema, photoListSchema, photoSchema, photoSizeSchema, photoUploadCancelSchema, photoUploadFieldsSchema } from '@/shared/schemas/photos';
import type { AppContext } from '../context';
import { fieldError, HttpError, notFound } from '../errors';
import { requireRole } from '../middleware/access';
import { PHOTO_MAX_BYTES, processPhoto } from '../photos/process';
import { addPhoto, cancelUpload, deletePhoto, earlierUpload, listPhotos, readPhotoFile } from '../services/photos';
import { pathId } from '../services/records-support';
import { parse } from '../validate';
import { todayUtc } from './engine';

const base = '/collections/:collectionId';

/** One photo per request, so each file has its own progress bar, retry and answer. */
const receive = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: PHOTO_MAX_BYTES, files: 1, fields: 8, fieldSize: 1024, parts: 10 },
}).single('photo');

/** multer's refusals as the product's 400 and 413 answers. */
const receivePhoto: RequestHandler = (req, res, next) => {
  receive(req, res, (error: unknown) => {
    if (!error) return next();
    if (error instanceof multer.MulterError) {
      if (error.code === 'LIMIT_FILE_SIZE') {
        const reason = `The file is larger than ${PHOTO_MAX_BYTES / 1024 / 1024} MB`;
        return next(new HttpError(413, 'photo_too_large', reason, [{ field: 'photo', reason }]));
      }
      if (error.code === 'LIMIT_UNEXPECTED_FILE' || error.code === 'LIMIT_FILE_COUNT') {
        return next(fieldError(error.field ?? 'photo', 'Send one photo per request, in the field "photo"'));
      }
      return next(fieldError(error.field ?? 'body', error.message));
    }
    next(new HttpError(400, 'malformed_upload', 'The upload could not be read; try again', [{ field: 'photo', reason: 'not a readable multipart upload' }]));
  });
};

export function photoRoutes({ db, photos }: AppContext): Router {
  const router = Router();
  const viewer = requireRole(db, 'viewer');
  const grower = requireRole(db, 'grower');

  router.post(`${base}/photos`, grower, receivePhoto, async (req, res) => {
    const fields = parse(photoUploadFieldsSchema, { ...req.body });
    if (!req.file) throw fieldError('photo', 'Attach a photo in the field "photo"');
    const member = res.locals.membership!;
    // A resend of an upload already stored (or cancelled) is answered before any decoding.
    const earlier = fields.clientKey ? await earlierUpload(db, member, fields.clientKey) : null;
    if (earlier) return void res.status(200).json(photoSchema.parse(earlier));
    const today = todayUtc();
    const processed = await processPhoto(req.file.buffer, today);
    const { photo, created } = await addPhoto(db, photos, member, fields, processed, req.file.size, today);
    res.status(created ? 201 : 200).json(photoSchema.parse(photo));
  });

  /** Cancels an upload by the key it was sent under, before or after it arrived (idempotent). */
  router.delete(`${base}/photo-uploads/:clientKey`, grower, async (req, res) => {
    const { clientKey } = parse(z.object({ clientKey: photoClientKeySchema }), { clientKey: req.params.clientKey }, 'params');
    res.json(photoUploadCancelSchema.parse(await cancelUpload(db, photos, res.locals.membership!, clientKey)));
  });

  router.get(`${base}/photos`, viewer, async (req, res) => {
    const query = parse(photoListQuerySchema, req.query, 'query');
    const items = await listPhotos(db, res.locals.membership!.collectionId, query);
    res.json(photoListSchema.parse({ items }));
  });

  router.get(`${base}/photos/:photoId/:size`, viewer, async (req, res) => {
    const photoId = pathId(req.params.photoId, 'That photo');
    const size = photoSizeSchema.safeParse(req.params.size);
    if (!size.success) throw notFound('That photo size');
    const data = await readPhotoFile(db, photos, res.locals.membership!.collectionId, photoId, size.data);
    // A photo's files never change under its id; only this browser may keep them.
    res.set('Cache-Control', 'private, max-age=31536000, immutable');
    res.type('image/webp').send(data);
  });

  router.delete(`${base}/photos/:photoId`, grower, async (req, res) => {
    await deletePhoto(db, photos, res.locals.membership!, pathId(req.params.photoId, 'That photo'));
    res.status(204).end();
  });

  return router;
}
