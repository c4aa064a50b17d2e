import type { Logger } from 'pino';
import type { Database } from '../db/client';
import type { HeavyJobs } from './heavy-jobs';
import type { Auth } from './auth';
import type { SessionValidator } from './middleware/session';
import type { Mailer } from './mail/mailer';
import type { PhotoStore } from './photos/store';
import type { RateLimits } from './middleware/rate-limit';
import type { FingerprintMemo } from './services/engine-data';
import type { WeatherClient } from './weather/client';

/** Everything a route needs from the outside world; tests build it with their own parts. */
export interface AppContext {
  db: Database;
  auth: Auth;
  /** Lucia's session check with a collection's membership in the same query (sessionMiddleware). */
  validateSession: SessionValidator;
  logger: Logger;
  rateLimits: RateLimits;
  /** Each collection's record fingerprint, for the engine's answer cache. */
  fingerprints: FingerprintMemo;
  /** Sends invitations, reset links and the weekly digest over SMTP. */
  mailer: Mailer;
  /** Where photo files are kept: local disk or an S3-compatible store. */
  photos: PhotoStore;
  /** Night minimum forecasts for cold-night checks; failures come back as "unavailable". */
  weather: WeatherClient;
  /** Imports and restores running in this process: a few at once, the rest told to come back. */
  heavyJobs: HeavyJobs;
}
