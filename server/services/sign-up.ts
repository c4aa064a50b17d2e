import { eq, lt } from 'drizzle-orm';
import { generateIdFromEntropySize } from 'lucia';
import type { Database } from '../../db/client';
import { signUpRequests, users } from '../../db/schema';
import { HttpError } from '../errors';
import { escapeHtml, type Mailer } from '../mail/mailer';
import { hashToken, newToken } from '../mail/tokens';
import { createCollectionFor } from './collections';
import { uniqueViolation } from './records-support';

/** How long a sign-up link works. */
export const SIGN_UP_LINK_LIFETIME_MS = 24 * 60 * 60 * 1000;

export interface SignUpRequest {
  email: string;
  displayName: string;
  /** argon2id of the chosen password, made before the answer whatever the address. */
  passwordHash: string;
  next?: string;
}

/**
 * After a sign-up has been answered (the same way for every address): a new address gets a
 * link that creates the account; one that already has an account gets a mail saying so, with
 * the ways in, and nothing is stored. Expired requests are cleared as new ones come in.
 */
export async function requestSignUp(db: Database, mailer: Mailer, request: SignUpRequest, now = new Date()): Promise<'link' | 'taken'> {
  await db.delete(signUpRequests).where(lt(signUpRequests.expiresAt, now));
  const [taken] = await db.select({ displayName: users.displayName }).from(users).where(eq(users.email, request.email)).limit(1);
  if (taken) {
    const signIn = `${mailer.publicUrl}/sign-in`;
    const reset = `${mailer.publicUrl}/forgot-password`;
    await mailer.send({
      to: request.email,
      subject: 'You already have a Sympodia account',
      text: [
        `Hello ${taken.displayName},`,
        '',
        'Someone (we hope you) tried to create a Sympodia account with this address, which already has one. No new account was made.',
        `Sign in here: ${signIn}`,
        `Forgot the password? Set a new one here: ${reset}`,
        '',
        'If it was not you, ignore this mail; nothing about your account has changed.',
      ].join('\n'),
      html: `<p>Hello ${escapeHtml(taken.displayName)},</p>
<p>Someone (we hope you) tried to create a Sympodia account with this address, which already has one. No new account was made.</p>
<p><a href="${escapeHtml(signIn)}">Sign in</a>, or <a href="${escapeHtml(reset)}">set a new password</a> if you forgot it.</p>
<p>If it was not you, ignore this mail; nothing about your account has changed.</p>`,
    });
    return 'taken';
  }
  const { token, hash } = newToken();
  await db.insert(signUpRequests).values({
    tokenHash: hash,
    email: request.email,
    displayName: request.displayName,
    passwordHash: request.passwordHash,
    nextPath: request.next ?? null,
    expiresAt: new Date(now.getTime() + SIGN_UP_LINK_LIFETIME_MS),
  });
  const link = `${mailer.publicUrl}/welcome/${token}`;
  await mailer.send({
    to: request.email,
    subject: 'Finish creating your Sympodia account',
    text: [
      `Hello ${request.displayName},`,
      '',
      'Open this link within 24 hours to finish creating your Sympodia account; it works once:',
      link,
      '',
      'If you did not sign up, ignore this mail; no account is made without the link.',
    ].join('\n'),
    html: `<p>Hello ${escapeHtml(request.displayName)},</p>
<p><a href="${escapeHtml(link)}">Finish creating your Sympodia account</a> within 24 hours; the link works once.</p>
<p>If you did not sign up, ignore this mail; no account is made without the link.</p>`,
  });
  return 'link';
}

/**
 * Uses a sign-up link: in one transaction the request is taken (so a link works once), the
 * account and its first collection are made. An address that got an account in the meantime
 * (another link for it was used first) is refused with 409.
 */
export async function confirmSignUp(db: Database, token: string, now = new Date()) {
  return db.transaction(async (tx) => {
    const [row] = await tx.delete(signUpRequests).where(eq(signUpRequests.tokenHash, hashToken(token))).returning();
    if (!row) throw new HttpError(400, 'sign_up_unknown', 'This sign-up link is not known or has been used; sign up again');
    if (row.expiresAt.getTime() <= now.getTime()) throw new HttpError(410, 'sign_up_expired', 'This sign-up link has expired (they last 24 hours); sign up again');
    const id = generateIdFromEntropySize(10);
    try {
      await tx.insert(users).values({ id, email: row.email, displayName: row.displayName, passwordHash: row.passwordHash });
    } catch (error) {
      if (uniqueViolation(error) !== undefined) throw new HttpError(409, 'email_taken', 'An account with this e-mail already exists; sign in instead');
      throw error;
    }
    await createCollectionFor(tx, id, { name: `${row.displayName}’s collection` });
    return { user: { id, email: row.email, displayName: row.displayName }, next: row.nextPath };
  });
}
