import { eq } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { users } from '../../db/schema';
import { escapeHtml, type Mailer } from '../mail/mailer';

/**
 * Tells an account's owner that sign-in to it is paused after many wrong passwords from many
 * places (rate-limit.ts, `accountLock`), and how to get in at once: a password reset, which ends
 * the pause. Sent once per pause; nothing is sent for an address without an account.
 */
export async function notifySignInPaused(db: Database, mailer: Mailer, email: string): Promise<boolean> {
  const [user] = await db.select({ displayName: users.displayName }).from(users).where(eq(users.email, email)).limit(1);
  if (!user) return false;
  const reset = `${mailer.publicUrl}/forgot-password`;
  await mailer.send({
    to: email,
    subject: 'Sign-in to your Sympodia account is paused',
    text: [
      `Hello ${user.displayName},`,
      '',
      'Many wrong passwords were tried for your Sympodia account from different places, so signing in to it is paused for up to an hour. Nobody has signed in with them.',
      `To sign in now, set a new password here (it ends the pause): ${reset}`,
      '',
      'If you did not try these yourself, someone is guessing; a long password of a few unrelated words keeps it safe.',
    ].join('\n'),
    html: `<p>Hello ${escapeHtml(user.displayName)},</p>
<p>Many wrong passwords were tried for your Sympodia account from different places, so signing in to it is paused for up to an hour. Nobody has signed in with them.</p>
<p>To sign in now, <a href="${escapeHtml(reset)}">set a new password</a>; it ends the pause.</p>
<p>If you did not try these yourself, someone is guessing; a long password of a few unrelated words keeps it safe.</p>`,
  });
  return true;
}
