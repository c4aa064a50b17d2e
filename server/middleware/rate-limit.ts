import type { Request, RequestHandler } from 'express';
import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible';
import { HttpError } from '../errors';

export interface RateLimitSettings {
  /** Attempts per client address per window. */
  perIp: number;
  /** Attempts per account (e-mail address) per window. */
  perAccount: number;
  windowSeconds: number;
}

/** Sign-in and sign-up limits: generous for a person, tight for a password-guessing script. */
export const DEFAULT_AUTH_LIMITS: RateLimitSettings = { perIp: 30, perAccount: 10, windowSeconds: 15 * 60 };

export function createRateLimits(settings: RateLimitSettings = DEFAULT_AUTH_LIMITS) {
  const options = { duration: settings.windowSeconds };
  return {
    authIp: new RateLimiterMemory({ ...options, points: settings.perIp, keyPrefix: 'auth-ip' }),
    authAccount: new RateLimiterMemory({ ...options, points: settings.perAccount, keyPrefix: 'auth-account' }),
    // Routes that send mail (invitations, password reset): the same budget, counted apart from sign-in.
    mailIp: new RateLimiterMemory({ ...options, points: settings.perIp, keyPrefix: 'mail-ip' }),
    mailAccount: new RateLimiterMemory({ ...options, points: settings.perAccount, keyPrefix: 'mail-account' }),
  };
}

export type RateLimits = ReturnType<typeof createRateLimits>;

function tooMany(result: unknown): HttpError {
  const seconds = result instanceof RateLimiterRes ? Math.ceil(result.msBeforeNext / 1000) : 60;
  return new HttpError(429, 'rate_limited', `Too many attempts; try again in ${Math.max(1, Math.ceil(seconds / 60))} minute(s)`);
}

export async function consume(limiter: RateLimiterMemory, key: string): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (result) {
    if (result instanceof RateLimiterRes) throw tooMany(result);
    throw result;
  }
}

/** Counts every attempt against the client's address before the route runs. */
export function limitByIp(limiter: RateLimiterMemory): RequestHandler {
  return async (req: Request, _res, next) => {
    await consume(limiter, req.ip ?? 'unknown');
    next();
  };
}
