import type { ErrorRequestHandler } from 'express';
import type { Logger } from 'pino';
import { ZodError } from 'zod';
import type { ErrorBody, FieldIssue } from '@/shared/schemas/errors';

/** An error whose status, code and message are safe to show the person who caused it. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: FieldIssue[],
  ) {
    super(message);
  }
}

export const notFound = (what = 'That record') => new HttpError(404, 'not_found', `${what} was not found`);

/** A save of a stale copy (409): the body carries the record as it now stands (staleBodySchema). */
/** A 409 that carries the stored record (`current`): a stale version, or a record already there. */
export class StaleError extends HttpError {
  constructor(
    readonly current: unknown,
    message = 'Someone else saved a newer version; review it and save again',
    code = 'stale',
  ) {
    super(409, code, message);
  }
}

/**
 * zlib's codes for a body it could not inflate (Z_DATA_ERROR, Z_BUF_ERROR for one cut short …)
 * and Brotli's (ERR__ERROR_FORMAT_…), as body-parser passes them on for a broken
 * `Content-Encoding: gzip | deflate | br` body.
 */
export function isDecompressionError(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && /^(Z_[A-Z_]+|ERR__ERROR_[A-Z0-9_]+|ERR_BROTLI_[A-Z0-9_]+)$/.test(code);
}

export const undecodableBody = (encoding: string) =>
  new HttpError(400, 'malformed_body', `The request body says it is compressed (Content-Encoding: ${encoding}) but could not be decompressed`, [
    { field: 'body', reason: `not valid ${encoding} data` },
  ]);

/** A 400 for one field, in the same shape as a failed schema check. */
export const fieldError = (field: string, reason: string) =>
  new HttpError(400, 'invalid_input', 'Some fields need attention', [{ field, reason }]);

/** Turns zod issues into `{ field, reason }` pairs; `prefix` names where the input came from. */
export function fieldIssues(error: ZodError, prefix?: string): FieldIssue[] {
  return error.issues.map((issue) => {
    const field = issue.path.map(String).join('.') || (prefix ?? 'body');
    return { field: prefix && issue.path.length > 0 ? `${prefix}.${field}` : field, reason: issue.message };
  });
}

/**
 * Errors that mean the database cannot answer right now, not that the request was wrong:
 * refused or dropped connections (the driver's own codes and Node's socket codes), PostgreSQL
 * shutting down or starting up (57P01–57P03), out of connections (53300), connection failures
 * (08xxx), and a statement stopped by statement_timeout or lock_timeout (57014, 55P03; see
 * db/client.ts). All answer 503 `database_unavailable`.
 */
const DATABASE_DOWN_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  'EPIPE',
  'CONNECT_TIMEOUT',
  'CONNECTION_CLOSED',
  'CONNECTION_DESTROYED',
  'CONNECTION_ENDED',
  '57P01',
  '57P02',
  '57P03',
  '53300',
  '08000',
  '08001',
  '08003',
  '08004',
  '08006',
  '57014',
  '55P03',
]);

/** Looks through the ORM's and the session library's wrappers (`cause`) for a database-down code. */
function isDatabaseDown(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth += 1) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && DATABASE_DOWN_CODES.has(code)) return true;
  }
  return false;
}

/** The PostgreSQL error code, whether the driver's error arrives bare or wrapped by the ORM. */
function sqlState(error: unknown): string | undefined {
  for (let e: unknown = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth += 1) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && /^[0-9A-Z]{5}$/.test(code)) return code;
  }
  return undefined;
}

function body(code: string, message: string, details?: FieldIssue[]): ErrorBody {
  return { error: details ? { code, message, details } : { code, message } };
}

/** The one error handler: every failure leaves the server in the same body shape. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (error, req, res, _next) => {
    if (res.headersSent) {
      res.end();
      return;
    }
    if (error instanceof StaleError) {
      res.status(409).json({ error: { code: error.code, message: error.message }, current: error.current });
      return;
    }
    if (error instanceof HttpError) {
      const retryAfter = (error as { retryAfter?: unknown }).retryAfter;
      if (typeof retryAfter === 'number') res.set('Retry-After', String(retryAfter));
      res.status(error.status).json(body(error.code, error.message, error.details));
      return;
    }
    if (error instanceof ZodError) {
      res.status(400).json(body('invalid_input', 'Some fields need attention', fieldIssues(error)));
      return;
    }
    if (error instanceof URIError) {
      // The router could not percent-decode a path parameter ("%zz", "%ED%A0%80").
      res.status(400).json(body('malformed_path', 'The address is not valid', [{ field: 'path', reason: 'not valid percent-encoding' }]));
      return;
    }
    const type = (error as { type?: string }).type;
    if (type === 'entity.too.large') {
      res.status(413).json(body('too_large', 'The request is larger than the server accepts'));
      return;
    }
    if (type === 'entity.parse.failed') {
      res.status(400).json(body('malformed_json', 'The request body is not valid JSON', [{ field: 'body', reason: 'not valid JSON' }]));
      return;
    }
    if (type === 'charset.unsupported' || type === 'encoding.unsupported') {
      res.status(415).json(body('unsupported_encoding', 'The request body uses an unsupported encoding'));
      return;
    }
    if (isDecompressionError(error)) {
      const refused = undecodableBody((req.get('content-encoding') ?? '').trim().toLowerCase());
      res.status(400).json(body(refused.code, refused.message, refused.details));
      return;
    }
    if (sqlState(error) === '23503') {
      // A record the request refers to was deleted by someone else between the checks and the write.
      logger.warn({ err: error, url: req.originalUrl }, 'foreign key violation');
      res.status(409).json(body('gone', 'A record this refers to was just removed; reload and try again'));
      return;
    }
    if (isDatabaseDown(error)) {
      logger.error({ err: error, url: req.originalUrl }, 'database unavailable');
      res.status(503).json(body('database_unavailable', 'The database is not answering; try again in a minute'));
      return;
    }
    logger.error({ err: error, url: req.originalUrl }, 'unhandled error');
    res.status(500).json(body('internal', 'Something went wrong on the server'));
  };
}
