import { randomUUID } from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { type ExportDocument, exportDocumentSchema, exportZipQuerySchema, RESTORE_MAX_BYTES, restoreResultSchema } from '@/shared/schemas/export';
import type { AppContext } from '../context';
import { fieldError, fieldIssues, HttpError } from '../errors';
import { requireRole } from '../middleware/access';
import { exportFileName, loadExport, writeExportZip } from '../services/export';
import { heavyJob } from '../heavy-jobs';
import { restoreCollection } from '../services/restore';
import { MAX_RESTORE_ISSUES, readExportDocument } from '../services/restore-reader';
import { parse, unstorableText } from '../validate';

const base = '/collections/:collectionId';

/** Where an uploaded export file waits while it is read; each is removed once its answer has gone. */
const RESTORE_SPOOL = path.join(os.tmpdir(), 'sympodia-restores');

// The file goes to disk as it arrives and is read from there record by record (restore-reader.ts):
// sixteen 64 MB uploads held in memory took a server to 4.4 GB.
const receive = multer({
  storage: multer.diskStorage({
    destination: (_req, _file, done) => fs.mkdir(RESTORE_SPOOL, { recursive: true }).then(() => done(null, RESTORE_SPOOL), (error: Error) => done(error, RESTORE_SPOOL)),
    filename: (_req, _file, done) => done(null, `${randomUUID()}.json`),
  }),
  limits: { fileSize: RESTORE_MAX_BYTES, files: 1, fields: 0, parts: 1 },
}).single('document');

/**
 * The export file arrives as a multipart upload in the field "document" (the app sends it so, with
 * upload progress), or as a JSON body up to the API's usual size. Read only after the role check,
 * so nobody but an owner can make the server hold a large file.
 */
const receiveDocument: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) return next();
  res.on('close', () => {
    if (req.file) void fs.rm(req.file.path, { force: true });
  });
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

/** The document sent: read from the uploaded file record by record, or the small JSON body checked whole. */
async function documentFrom(req: Parameters<RequestHandler>[0]): Promise<ExportDocument> {
  if (req.file) return readExportDocument(createReadStream(req.file.path));
  if (req.is('multipart/form-data')) throw fieldError('document', 'Attach the export file in the field "document"');
  const parsed = exportDocumentSchema.safeParse(req.body);
  if (!parsed.success) {
    throw new HttpError(400, 'invalid_input', 'The export file has problems; nothing was restored', fieldIssues(parsed.error).slice(0, MAX_RESTORE_ISSUES));
  }
  const unstorable = unstorableText(parsed.data);
  if (unstorable.length > 0) throw new HttpError(400, 'invalid_input', 'The export file has text that cannot be stored; nothing was restored', unstorable);
  return parsed.data;
}

export function exportRoutes({ db, photos, logger, heavyJobs }: AppContext): Router {
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

  // In a heavy-job slot from before the upload is read: a busy server says so at once.
  router.post(`${base}/restore`, owner, heavyJob(heavyJobs), receiveDocument, async (req, res) => {
    const document = await documentFrom(req);
    const { collectionId, userId } = res.locals.membership!;
    const result = await restoreCollection(db, collectionId, userId, document);
    res.status(201).json(restoreResultSchema.parse(result));
  });

  return router;
}
