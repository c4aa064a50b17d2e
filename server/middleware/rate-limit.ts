import type { Request, RequestHandler } from 'express';
import type { Sql } from 'postgres';
import { RateLimiterAbstract, RateLimiterMemory, RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import { getTableName } from 'drizzle-orm';
import { rateLimitCounts } from '../../db/schema';
import { HttpError } from '../errors';

export interface RateLimitSettings {
  /**
   * Per client address and window: failed sign-ins (whatever the account) and sign-ups; for the
   * routes that send mail, requests.
   */
  perIp: number;
  /**
   * Per window: failed sign-ins for one account from one address (the account-and-address
   * budget); for the routes that send mail, requests per recipient or per inviting account.
   */
  perAccount: number;
  windowSeconds: number;
  /**
   * Failed sign-ins for one account from every address together before sign-in pauses for that
   * account until the window ends (or a password reset), and its owner is told by mail. Far above
   * `perAccount`, so only a guesser spread over many addresses reaches it.
   */
  accountLock?: { failures: number; windowSeconds: number };
}

/**
 * OWASP ASVS 4.0.3 V2.2.1: slow the guesser without letting a stranger lock the owner out. A
 * person mistyping gets 10 tries per 15 minutes from their address; an address guessing at many
 * accounts 30; an account guessed at from everywhere pauses after 100 failures in an hour.
 */
export const DEFAULT_AUTH_LIMITS: RateLimitSettings = {
  perIp: 30,
  perAccount: 10,
  windowSeconds: 15 * 60,
  accountLock: { failures: 100, windowSeconds: 60 * 60 },
};
export const DEFAULT_ACCOUNT_LOCK = DEFAULT_AUTH_LIMITS.accountLock!;

/**
 * The counters' table when they are kept in PostgreSQL: `rateLimitCounts` in db/schema.ts, made
 * by a migration in the shape rate-limiter-flexible expects (key, points, expire in epoch ms).
 * Every limiter shares it: keys carry the limiter's prefix.
 */
export const RATE_LIMIT_TABLE = getTableName(rateLimitCounts);

/**
 * The driver rate-limiter-flexible expects (`pg`'s `query({ text, values })` → `{ rows }`), on the
 * project's own `postgres` client, so no second PostgreSQL driver is needed.
 */
function pgStyle(sql: Sql) {
  return {
    query: async ({ text, values }: { text: string; values?: unknown[] }) => ({
      rows: await sql.unsafe(text, (values ?? []) as never[]),
    }),
  };
}

/**
 * One budget per limiter. Without `store` the counts live in this process's memory (tests, one
 * server). With `store` (server/index.ts) they live in PostgreSQL, so every server process behind
 * one database shares them; while the database cannot be reached each process falls back to its
 * own memory counts rather than refusing or waving everyone through.
 */
export function createRateLimits(settings: RateLimitSettings = DEFAULT_AUTH_LIMITS, store?: { sql: Sql }) {
  const make = (keyPrefix: string, points: number, duration = settings.windowSeconds): RateLimiterAbstract => {
    const options = { duration, points, keyPrefix };
    if (!store) return new RateLimiterMemory(options);
    return new RateLimiterPostgres({
      ...options,
      storeClient: pgStyle(store.sql),
      storeType: 'pool',
      tableName: RATE_LIMIT_TABLE,
      tableCreated: true,
      insuranceLimiter: new RateLimiterMemory(options),
    });
  };
  const lock = settings.accountLock ?? DEFAULT_ACCOUNT_LOCK;
  return {
    /** Failed sign-ins and sign-ups per client address. */
    authIp: make('auth-ip', settings.perIp),
    /** Failed sign-ins per account and client address. */
    authAccountIp: make('auth-account-ip', settings.perAccount),
    /** Failed sign-ins per account from every address: the high bound that pauses the account. */
    authAccount: make('auth-account-all', lock.failures, lock.windowSeconds),
    // Routes that send mail (sign-up, invitations, password reset): counted apart from sign-in.
    mailIp: make('mail-ip', settings.perIp),
    mailAccount: make('mail-account', settings.perAccount),
  };
}

export type RateLimits = ReturnType<typeof createRateLimits>;

function retryAfterSeconds(result: unknown): number {
  return result instanceof RateLimiterRes ? Math.max(1, Math.ceil(result.msBeforeNext / 1000)) : 60;
}

const inMinutes = (seconds: number) => `${Math.max(1, Math.ceil(seconds / 60))} minute(s)`;

/** A 429 that says when to try again (the body, and Retry-After through the error handler). */
export class TooManyAttempts extends HttpError {
  constructor(
    readonly retryAfter: number,
    message = `Too many attempts; try again in ${inMinutes(retryAfter)}`,
  ) {
    super(429, 'rate_limited', message);
  }
}

export async function consume(limiter: RateLimiterAbstract, key: string): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (result) {
    if (result instanceof RateLimiterRes) throw new TooManyAttempts(retryAfterSeconds(result));
    throw result;
  }
}

/** Counts every attempt against the client's address before the route runs. */
export function limitByIp(limiter: RateLimiterAbstract): RequestHandler {
  return async (req: Request, _res, next) => {
    await consume(limiter, req.ip ?? 'unknown');
    next();
  };
}

export interface SignInAttempt {
  /** The password was right: the address and the account get this attempt back; the account-and-address count starts again. */
  succeeded(): Promise<void>;
}

/**
 * The three sign-in budgets, taken before the password is checked (so guesses sent in parallel
 * cannot slip past a limit) and given back on success, so a person who signs in is never
 * counted as guessing:
 *   1. failures from this address, whatever the account (`perIp`);
 *   2. failures for this account from this address (`perAccount`): the guesser is held back,
 *      the owner elsewhere is not;
 *   3. failures for this account from every address (`accountLock`): only then is the right
 *      password refused from anywhere, until the window ends or the password is reset, and
 *      `onLock` is called once, on the first refusal, to tell the owner.
 * A refused attempt gives back what it took from the budgets before the one that refused it.
 */
export async function beginSignIn(limits: RateLimits, email: string, ip: string, onLock: () => void): Promise<SignInAttempt> {
  const pair = accountAndAddress(email, ip);
  const taken: Array<[RateLimiterAbstract, string]> = [];
  const giveBack = () => Promise.all(taken.map(([limiter, key]) => limiter.reward(key, 1)));
  const take = async (limiter: RateLimiterAbstract, key: string, refusal: (retryAfter: number, result: RateLimiterRes) => TooManyAttempts) => {
    try {
      await limiter.consume(key);
      taken.push([limiter, key]);
    } catch (result) {
      if (!(result instanceof RateLimiterRes)) throw result;
      await giveBack();
      throw refusal(retryAfterSeconds(result), result);
    }
  };
  await take(limits.authIp, ip, (s) => new TooManyAttempts(s, `Too many failed sign-ins from your network; try again in ${inMinutes(s)}`));
  await take(limits.authAccountIp, pair, (s) => new TooManyAttempts(s, `Too many wrong passwords for this account from here; try again in ${inMinutes(s)}, or reset your password`));
  await take(limits.authAccount, email, (s, result) => {
    if (result.consumedPoints === limits.authAccount.points + 1) onLock();
    return new TooManyAttempts(s, `Sign-in to this account is paused for ${inMinutes(s)} after many wrong passwords from elsewhere; reset your password by mail to sign in now`);
  });
  return {
    succeeded: async () => {
      await Promise.all([limits.authIp.reward(ip, 1), limits.authAccount.reward(email, 1), limits.authAccountIp.delete(pair)]);
    },
  };
}

const accountAndAddress = (email: string, ip: string) => `${email}|${ip}`;

/** After a password reset: the account-wide pause and this address's count for the account end. */
export async function clearSignInCounts(limits: RateLimits, email: string, ip: string): Promise<void> {
  await Promise.all([limits.authAccount.delete(email), limits.authAccountIp.delete(accountAndAddress(email, ip))]);
}
