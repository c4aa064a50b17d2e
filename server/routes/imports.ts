import { type Request, Router } from 'express';
import { z } from 'zod';
import { importCheckSchema, importOptionsSchema, type ImportProgressLine, mappingAnswerSchema, mappingRequestSchema } from '@/shared/schemas/imports';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { heavyJob } from '../heavy-jobs';
import { requireRole } from '../middleware/access';
import { checkImport, ImportRefused, mappingFor, readUpload, runImport } from '../services/imports';
import { contentEncoding, decodedBody } from '../request-body';
import { parse } from '../validate';

const base = '/collections/:collectionId/imports';

const optionsQuerySchema = z.object({
  options: z
    .string()
    .max(20_000, 'At most 20,000 characters')
    .optional()
    .transform((text, ctx) => {
      if (text === undefined) return {};
      try {
        return JSON.parse(text) as unknown;
      } catch {
        ctx.addIssue({ code: 'custom', message: 'options is not valid JSON' });
        return z.NEVER;
      }
    })
    .pipe(importOptionsSchema),
});

/** The file travels as the raw request body, so it can be parsed as it arrives. */
function assertCsv(req: Request): void {
  if (!req.is(['text/*', 'application/vnd.ms-excel', 'application/octet-stream'])) {
    throw new HttpError(415, 'not_csv', 'Send the spreadsheet as CSV (Content-Type text/csv)', [{ field: 'file', reason: 'send the file as text/csv' }]);
  }
}

async function upload(req: Request) {
  const { options } = parse(optionsQuerySchema, req.query, 'query');
  assertCsv(req);
  const encoding = contentEncoding(req);
  // A compressed body's length says nothing of the file's size: that is counted as it inflates.
  const length = encoding === 'identity' ? req.get('content-length') : undefined;
  return readUpload(decodedBody(req), options, length ? Number(length) : undefined, encoding);
}

export function importRoutes({ db, logger, heavyJobs }: AppContext): Router {
  const router = Router();
  // Importing writes plants, leads and measurements: growers and owners; viewers get 403.
  const grower = requireRole(db, 'grower');
  // Reading and planning a file holds its rows and a core: a few at once per process (heavy-jobs.ts).
  const heavy = heavyJob(heavyJobs);

  router.post(`${base}/mapping`, grower, async (req, res) => {
    const { headers } = parse(mappingRequestSchema, req.body);
    res.json(mappingAnswerSchema.parse(await mappingFor(db, res.locals.membership!.collectionId, headers)));
  });

  router.post(`${base}/check`, grower, heavy, async (req, res) => {
    const { reader, options, encoding } = await upload(req);
    res.json(importCheckSchema.parse(await checkImport(db, res.locals.membership!.collectionId, reader, options, encoding)));
  });

  /**
   * Answers NDJSON once the file is known to be writable: `writing` lines as batches are
   * stored, then one `done` (or `failed`) line. A file with issues gets an ordinary 400.
   */
  router.post(base, grower, heavy, async (req, res) => {
    const { reader, options, encoding } = await upload(req);
    const send = (line: ImportProgressLine) => res.write(`${JSON.stringify(line)}\n`);
    try {
      const counts = await runImport(db, res.locals.membership!, reader, options, {
        encoding,
        onStart: (total) => {
          // no-transform keeps the compression middleware from holding the lines back.
          res.status(200).set({ 'Content-Type': 'application/x-ndjson; charset=utf-8', 'Cache-Control': 'no-store, no-transform' });
          res.flushHeaders();
          send({ phase: 'writing', done: 0, total });
        },
        onProgress: (done, total) => send({ phase: 'writing', done, total }),
      });
      send({ phase: 'done', counts });
      res.end();
    } catch (error) {
      if (!res.headersSent || error instanceof ImportRefused) throw error;
      logger.error({ err: error, url: req.originalUrl }, 'import failed after it started; rolled back');
      send({ phase: 'failed', error: { code: 'import_failed', message: 'The import stopped and nothing was saved; try again' } });
      res.end();
    }
  });

  return router;
}
