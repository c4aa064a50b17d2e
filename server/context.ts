import type { Logger } from 'pino';
import type { Database } from '../db/client';
import type { Auth } from './auth';
import type { RateLimits } from './middleware/rate-limit';

/** Everything a route needs from the outside world; tests build it with their own parts. */
export interface AppContext {
  db: Database;
  auth: Auth;
  logger: Logger;
  rateLimits: RateLimits;
}
