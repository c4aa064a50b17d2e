import type { Readable } from 'node:stream';
import zlib from 'node:zlib';
import type { Request } from 'express';
import { HttpError } from './errors';

const DECODERS: Record<string, () => zlib.Gunzip | zlib.Inflate | zlib.BrotliDecompress> = {
  gzip: () => zlib.createGunzip(),
  'x-gzip': () => zlib.createGunzip(),
  deflate: () => zlib.createInflate(),
  br: () => zlib.createBrotliDecompress(),
};

/** The request's Content-Encoding, lower case; `identity` when none is given. */
export const contentEncoding = (req: Request) => (req.get('content-encoding') ?? 'identity').trim().toLowerCase();

/**
 * A raw request body as its bytes were meant (for routes that stream the body themselves, as the
 * spreadsheet import does): gzip, deflate and br are inflated as they arrive, as express.json does
 * for JSON; any other Content-Encoding is refused with 415. Errors of the inflater are emitted on
 * the returned stream (see isDecompressionError).
 */
export function decodedBody(req: Request): Readable {
  const encoding = contentEncoding(req);
  if (encoding === 'identity') return req;
  const decoder = DECODERS[encoding];
  if (!decoder) throw new HttpError(415, 'unsupported_encoding', `The request body uses an unsupported encoding (${encoding})`, [{ field: 'body', reason: 'send it uncompressed, or as gzip, deflate or br' }]);
  const inflater = decoder();
  req.on('error', (error) => inflater.destroy(error));
  return req.pipe(inflater);
}
