import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { exportDocumentSchema, exportZipQuerySchema, RESTORE_MAX_BYTES, restoreResultSchema } from '@/shared/schemas/export';
import type { AppContext } from '../context';
import { fieldError, fieldIssues, HttpError } from '../errors';
import { requireRole } from '../middleware/access';
import { exportFileName, loadExport, writeExportZip } from '../services/export';
import { restoreCollection } from '../services/restore';
import { parse, unstorableText } from '../validate';

const base = '/collections/:collectionId';

/** The most field problems one answer lists; a file with more is broken throughout. */
const MAX_ISSUES = 20;

const receive = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: RESTORE_MAX_BYTES, files: 1, fields: 0, parts: 1 },
}).single('document');

/**
 * The export file arrives as a multipart upload in the field "document" (the app sends it so, with
 * upload progress), or as a JSON body up to the API's usual size. Read only after the role check,
 * so nobody but an owner can make the server hold a large file.
 */
const receiveDocument: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) return next();
  receive(req, res, (error: unknown) => {
    if (!error) return next();
    if (error instanceof multer.MulterError) {
      if (error.code === 'LIMIT_FILE_SIZE') {
        const reason = `The file is larger than ${RESTORE_MAX_BYTES / 1024 / 1024} MB`;
        return next(new HttpError(413, 'export_too_large', reason, [{ field: 'document', reason }]));
      }
      return next(fieldError(error.field ?? 'document', 'Send the export file alone, in the field "document"'));
    }
    next(new HttpError(400, 'malformed_upload', 'The upload could not be read; try again', [{ field: 'document', reason: 'not a readable multipart upload' }]));
  });
};

function documentFrom(req: Parameters<RequestHandler>[0]): unknown {
  if (!req.file) {
    if (req.is('multipart/form-data')) throw fieldError('document', 'Attach the export file in the field "document"');
    return req.body;
  }
  try {
    return JSON.parse(req.file.buffer.toString('utf8').replace(/^\uFEFF/, ''));
  } catch {
    throw fieldError('document', 'The file is not valid JSON; choose the .json file a Sympodia export gave you');
  }
}

export function exportRoutes({ db, photos, logger }: AppContext): Router {
  const router = Router();
  // Any member may take a copy of what they can already read.
  const viewer = requireRole(db, 'viewer');
  const owner = requireRole(db, 'owner');

  router.get(`${base}/export.zip`, viewer, async (req, res) => {
    const query = parse(exportZipQuerySchema, req.query, 'query');
    const now = new Date();
    const snapshot = await loadExport(db, res.locals.membership!.collectionId, now);
    res.attachment(exportFileName(snapshot.document.collection.name, now, 'zip'));
    res.set('Cache-Control', 'private, no-store');
    try {
      await writeExportZip(res, snapshot, { store: query.photos === 'yes' ? photos : null, logger });
    } catch (error) {
      // The headers have gone; all that is left is to cut the download short so it is not taken for whole.
      logger.error({ err: error, collectionId: res.locals.membership!.collectionId }, 'export zip failed');
      res.destroy(error as Error);
    }
  });

  router.get(`${base}/export.json`, viewer, async (_req, res) => {
    const now = new Date();
    const { document } = await loadExport(db, res.locals.membership!.collectionId, now);
    res.attachment(exportFileName(document.collection.name, now, 'json'));
    res.set('Cache-Control', 'private, no-store');
    res.type('application/json').send(JSON.stringify(document, null, 1));
  });

  router.post(`${base}/restore`, owner, receiveDocument, async (req, res) => {
    const parsed = exportDocumentSchema.safeParse(documentFrom(req));
    if (!parsed.success) {
      const details = fieldIssues(parsed.error).slice(0, MAX_ISSUES);
      throw new HttpError(400, 'invalid_input', 'The export file has problems; nothing was restored', details);
    }
    const unstorable = unstorableText(parsed.data);
    if (unstorable.length > 0) throw new HttpError(400, 'invalid_input', 'The export file has text that cannot be stored; nothing was restored', unstorable);
    const { collectionId, userId } = res.locals.membership!;
    const result = await restoreCollection(db, collectionId, userId, parsed.data);
    res.status(201).json(restoreResultSchema.parse(result));
  });

  return router;
}
