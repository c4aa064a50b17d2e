import { and, eq, gt, isNull } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { passwordResets, users } from '../../db/schema';
import { hashPassword } from '../auth';
import { HttpError } from '../errors';
import type { Mailer } from '../mail/mailer';
import { escapeHtml } from '../mail/mailer';
import { hashToken, newToken } from '../mail/tokens';

export const PASSWORD_RESET_LIFETIME_MS = 60 * 60 * 1000;

/**
 * Mails a reset link when the address belongs to an account, and does nothing otherwise.
 * The caller answers the same either way and does not wait for this to finish, so the
 * response time does not tell whether the address exists.
 */
export async function requestPasswordReset(db: Database, mailer: Mailer, email: string, now = new Date()): Promise<boolean> {
  const [user] = await db.select({ id: users.id, displayName: users.displayName }).from(users).where(eq(users.email, email)).limit(1);
  if (!user) return false;
  const { token, hash } = newToken();
  await db.insert(passwordResets).values({ tokenHash: hash, userId: user.id, expiresAt: new Date(now.getTime() + PASSWORD_RESET_LIFETIME_MS) });
  const link = `${mailer.publicUrl}/reset-password/${token}`;
  await mailer.send({
    to: email,
    subject: 'Set a new Sympodia password',
    text: [
      `Hello ${user.displayName},`,
      '',
      'Someone (we hope you) asked to set a new password for your Sympodia account.',
      'Open this link within one hour to choose it; the link works once:',
      link,
      '',
      'Setting a new password signs you out everywhere else. If you did not ask for this, ignore this mail; your password stays as it is.',
    ].join('\n'),
    html: `<p>Hello ${escapeHtml(user.displayName)},</p>
<p>Someone (we hope you) asked to set a new password for your Sympodia account.</p>
<p><a href="${escapeHtml(link)}">Choose a new password</a> within one hour; the link works once.</p>
<p>Setting a new password signs you out everywhere else. If you did not ask for this, ignore this mail; your password stays as it is.</p>`,
  });
  return true;
}

/**
 * Uses a reset token: marks it used and stores the new password in one transaction, and
 * returns the account's id so the caller can end its sessions. Unknown, used and expired
 * tokens are refused with a reason.
 */
export async function completePasswordReset(db: Database, token: string, password: string, now = new Date()): Promise<string> {
  const passwordHash = await hashPassword(password);
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(passwordResets).where(eq(passwordResets.tokenHash, hashToken(token))).for('update');
    if (!row) throw new HttpError(400, 'reset_unknown', 'This reset link is not known; ask for a new one');
    if (row.usedAt) throw new HttpError(410, 'reset_used', 'This reset link has already been used; ask for a new one');
    if (row.expiresAt.getTime() <= now.getTime()) throw new HttpError(410, 'reset_expired', 'This reset link has expired (they last one hour); ask for a new one');
    await tx.update(passwordResets).set({ usedAt: now }).where(eq(passwordResets.tokenHash, row.tokenHash));
    // Any other open link for this account stops working too.
    await tx
      .update(passwordResets)
      .set({ usedAt: now })
      .where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)));
    await tx.update(users).set({ passwordHash }).where(eq(users.id, row.userId));
    return row.userId;
  });
}
