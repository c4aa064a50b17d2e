import { isIP } from 'node:net';
import type { RequestHandler } from 'express';
import { HttpError } from '../errors';

/** 127.0.0.0/8, ::1 and the IPv4-mapped form of 127.x (a dual-stack socket's view of IPv4 loopback). */
export function isLoopbackAddress(address: string | undefined): boolean {
  if (!address) return false;
  const v4 = address.startsWith('::ffff:') ? address.slice(7) : address;
  if (isIP(v4) === 4) return v4.startsWith('127.');
  return address === '::1';
}

/** A listening address that only this machine can reach: a loopback address or the name localhost. */
export function isLoopbackHost(host: string): boolean {
  const bare = host.replace(/^\[(.*)\]$/, '$1');
  return bare === 'localhost' || isLoopbackAddress(bare);
}

// A proxy on this machine connects from loopback for clients anywhere; its headers give it away.
const FORWARDING_HEADERS = ['x-forwarded-for', 'forwarded', 'x-real-ip'];

/**
 * For the development fakes (/dev/mailbox, /dev/weather): answers only a client on this machine,
 * judged by the connection's own address (never X-Forwarded-For, which the client writes), and
 * refuses a request that came through a proxy even when the proxy itself is on loopback.
 */
export const loopbackClientsOnly: RequestHandler = (req, _res, next) => {
  const forwarded = FORWARDING_HEADERS.some((name) => req.headers[name] !== undefined);
  if (isLoopbackAddress(req.socket.remoteAddress) && !forwarded) return next();
  next(new HttpError(403, 'loopback_only', 'This development page answers only requests made on the server’s own machine'));
};
