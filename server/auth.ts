import { DrizzlePostgreSQLAdapter } from '@lucia-auth/adapter-drizzle';
import { randomBytes } from 'node:crypto';
import { hash, verify } from '@node-rs/argon2';
import { Lucia, TimeSpan } from 'lucia';
import type { Database } from '../db/client';
import { sessions, users } from '../db/schema';

/** argon2id with OWASP's first recommended setting: 19 MiB, 2 passes, 1 lane. */
const ARGON2_OPTIONS = { memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 } as const;

export const SESSION_LIFETIME = new TimeSpan(30, 'd');

/** The user fields a signed-in request carries (Lucia's user attributes). */
export const userAttributes = (attributes: { email: string; displayName: string }) => ({
  email: attributes.email,
  displayName: attributes.displayName,
});

export function createAuth(db: Database) {
  const adapter = new DrizzlePostgreSQLAdapter(db, sessions, users);
  return new Lucia(adapter, {
    sessionExpiresIn: SESSION_LIFETIME,
    sessionCookie: {
      name: 'sympodia_session',
      // Secure is decided per request (see setSessionCookie) so plain http on loopback works.
      attributes: { secure: false, sameSite: 'lax' },
    },
    getUserAttributes: userAttributes,
  });
}

export type Auth = ReturnType<typeof createAuth>;

declare module 'lucia' {
  interface Register {
    Lucia: Auth;
    DatabaseUserAttributes: { email: string; displayName: string };
  }
}

export const hashPassword = (password: string) => hash(password, ARGON2_OPTIONS);

let dummyHash: Promise<string> | undefined;
/**
 * The hash of a random password nobody knows, made once per process with the same settings:
 * sign-in checks an unknown address's password against it, so it takes as long as a known one.
 */
export const dummyPasswordHash = () => (dummyHash ??= hashPassword(randomBytes(24).toString('base64url')));

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}
