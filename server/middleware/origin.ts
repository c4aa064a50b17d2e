import type { RequestHandler } from 'express';
import { HttpError } from '../errors';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * CSRF defence for cookie sessions: a state-changing request must carry an Origin header
 * naming this server (or an allowed development origin). Browsers always send Origin on
 * cross-site and same-site POST/PUT/PATCH/DELETE.
 */
export function originCheck(allowedOrigins: readonly string[]): RequestHandler {
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get('origin');
    const own = `${req.protocol}://${req.get('host')}`;
    if (origin && (origin === own || allowedOrigins.includes(origin))) return next();
    next(new HttpError(403, 'origin_refused', 'This request did not come from Sympodia’s own pages'));
  };
}
