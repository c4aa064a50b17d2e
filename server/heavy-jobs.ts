import type { RequestHandler } from 'express';
import { HttpError } from './errors';

/**
 * Imports and restores running at once in one server process. Each holds a file's records in
 * memory and keeps a core busy: one 60 MB restore took the server from 190 to 540 MB resident
 * and 28 s, two at once to 1.1 GB with health checks waiting up to 0.9 s (`npm run bench:restore`
 * on this project's 2-core machine), so one at a time.
 */
export const HEAVY_JOB_SLOTS = 1;

/** How long a refused job is told to wait, in seconds. */
export const BUSY_RETRY_AFTER_S = 60;

export class ServerBusy extends HttpError {
  readonly retryAfter = BUSY_RETRY_AFTER_S;
  constructor() {
    super(503, 'busy', 'The server is busy with other imports and restores; try again in a minute');
  }
}

/** A per-process count of heavy jobs: a job starts in a free slot or is refused at once. */
export class HeavyJobs {
  private running = 0;

  constructor(readonly slots = HEAVY_JOB_SLOTS) {}

  get active(): number {
    return this.running;
  }

  /** Takes a slot and returns its release (safe to call twice), or throws ServerBusy. */
  start(): () => void {
    if (this.running >= this.slots) throw new ServerBusy();
    this.running += 1;
    let released = false;
    return () => {
      if (released) return;
      released = true;
      this.running -= 1;
    };
  }
}

/**
 * Route middleware: the rest of the request runs in a slot, given back when the response has
 * been sent or the connection has closed, whichever comes first.
 */
export function heavyJob(jobs: HeavyJobs): RequestHandler {
  return (_req, res, next) => {
    const release = jobs.start();
    res.on('close', release);
    res.on('finish', release);
    next();
  };
}
