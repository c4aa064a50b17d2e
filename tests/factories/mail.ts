import type { Role } from '@/shared/schemas/auth';
import type { Database } from '../../db/client';
import { invitations } from '../../db/schema';
import type { FakeSmtpServer, ReceivedMail } from '../../server/mail/fake-smtp';
import { linksIn } from '../../server/mail/links';
import { newToken } from '../../server/mail/tokens';

let counter = 0;

/** An invitation row written directly, with its token; override expiry or state. */
export async function insertInvitation(
  db: Database,
  collectionId: string,
  invitedBy: string,
  overrides: Partial<{ email: string; role: Role; expiresAt: Date; revokedAt: Date | null }> = {},
) {
  counter += 1;
  const { token, hash } = newToken();
  const [row] = await db
    .insert(invitations)
    .values({
      collectionId,
      email: overrides.email ?? `invitee${counter}-${Date.now()}@example.test`,
      role: overrides.role ?? 'grower',
      tokenHash: hash,
      invitedBy,
      expiresAt: overrides.expiresAt ?? new Date(Date.now() + 3 * 86_400_000),
      revokedAt: overrides.revokedAt ?? null,
    })
    .returning();
  return { ...row, token };
}

/** Waits until `count` messages have reached `address` on the fake server (SMTP is asynchronous). */
export async function mailTo(mail: FakeSmtpServer, address: string, count = 1, timeoutMs = 5000): Promise<ReceivedMail[]> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const found = mail.to(address);
    if (found.length >= count) return found;
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
  throw new Error(`expected ${count} mail(s) to ${address}, got ${mail.to(address).length}`);
}

/** The token at the end of the mail's first link under `/prefix/`. */
export function tokenFrom(message: ReceivedMail, prefix: string): string {
  const link = linksIn(message.text).find((l) => new URL(l).pathname.startsWith(`/${prefix}/`));
  if (!link) throw new Error(`no /${prefix}/ link in: ${message.text}`);
  return new URL(link).pathname.split('/')[2];
}
