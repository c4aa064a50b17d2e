import { createHash, randomBytes } from 'node:crypto';

/** A fresh single-use token (32 random bytes, base64url) and the SHA-256 hex kept in the database. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');
