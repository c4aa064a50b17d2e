import type { Database } from '../../db/client';
import { divisionHandoffs } from '../../db/schema';
import { newToken } from '../../server/mail/tokens';

/** A hand-off row written directly, with its token; override the recipient, expiry or state. */
export async function insertHandoff(
  db: Database,
  input: { collectionId: string; plantId: string; sentBy: string; recipientEmail: string },
  overrides: Partial<{ expiresAt: Date; revokedAt: Date | null; note: string | null }> = {},
) {
  const { token, hash } = newToken();
  const [row] = await db
    .insert(divisionHandoffs)
    .values({
      ...input,
      tokenHash: hash,
      note: overrides.note ?? null,
      expiresAt: overrides.expiresAt ?? new Date(Date.now() + 3 * 86_400_000),
      revokedAt: overrides.revokedAt ?? null,
    })
    .returning();
  return { ...row, token };
}
