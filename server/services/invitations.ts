import { and, asc, eq, gt, isNull } from 'drizzle-orm';
import type { Logger } from 'pino';
import type { Role } from '@/shared/schemas/auth';
import type { AcceptedInvitation, Invitation, InvitationPreview } from '@/shared/schemas/mail';
import type { Database } from '../../db/client';
import { collections, invitations, memberships, users } from '../../db/schema';
import { HttpError, notFound } from '../errors';
import { escapeHtml, type Mailer } from '../mail/mailer';
import { hashToken, newToken } from '../mail/tokens';

export const INVITATION_LIFETIME_MS = 7 * 24 * 60 * 60 * 1000;

const RANK: Record<Role, number> = { viewer: 1, grower: 2, owner: 3 };

const ROLE_WORDS: Record<Role, string> = {
  viewer: 'a viewer (may read everything and export)',
  grower: 'a grower (may add and edit plants, leads, measurements and care entries)',
  owner: 'an owner (may do everything, including members)',
};

/** Pending invitations of a collection: not accepted, not revoked, not expired. */
export async function pendingInvitations(db: Database, collectionId: string, now = new Date()): Promise<Invitation[]> {
  const rows = await db
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      invitedBy: users.displayName,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
    })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(
      and(
        eq(invitations.collectionId, collectionId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
        gt(invitations.expiresAt, now),
      ),
    )
    .orderBy(asc(invitations.createdAt));
  return rows.map((r) => ({ ...r, expiresAt: r.expiresAt.toISOString(), createdAt: r.createdAt.toISOString() }));
}

/** Stores a new invitation and mails its link. The mail goes out after the row is committed. */
export async function createInvitation(
  db: Database,
  mailer: Mailer,
  input: { collectionId: string; email: string; role: Role; invitedBy: { id: string; displayName: string } },
  now = new Date(),
  logger?: Logger,
): Promise<Invitation> {
  const [collection] = await db.select({ name: collections.name }).from(collections).where(eq(collections.id, input.collectionId));
  if (!collection) throw notFound('That collection');
  const [member] = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.collectionId, input.collectionId), eq(users.email, input.email)))
    .limit(1);
  if (member) throw new HttpError(409, 'already_member', 'This person is already a member of the collection; change their role in the member list');

  const { token, hash } = newToken();
  const expiresAt = new Date(now.getTime() + INVITATION_LIFETIME_MS);
  const [row] = await db
    .insert(invitations)
    .values({ collectionId: input.collectionId, email: input.email, role: input.role, tokenHash: hash, invitedBy: input.invitedBy.id, expiresAt })
    .returning();

  const link = `${mailer.publicUrl}/invite/${token}`;
  const inviter = input.invitedBy.displayName;
  const expires = expiresAt.toISOString().slice(0, 10);
  const mail = {
    to: input.email,
    subject: `${inviter} invites you to ${collection.name} on Sympodia`,
    text: [
      `${inviter} invites you to join the collection "${collection.name}" on Sympodia as ${ROLE_WORDS[input.role]}.`,
      '',
      `Open this link to accept (it works once, until ${expires}):`,
      link,
      '',
      'If you did not expect this, ignore this mail; nothing happens until the link is opened.',
    ].join('\n'),
    html: `<p>${escapeHtml(inviter)} invites you to join the collection <strong>${escapeHtml(collection.name)}</strong> on Sympodia as ${escapeHtml(ROLE_WORDS[input.role])}.</p>
<p><a href="${escapeHtml(link)}">Accept the invitation</a> (it works once, until ${expires}).</p>
<p>If you did not expect this, ignore this mail; nothing happens until the link is opened.</p>`,
  };
  try {
    await mailer.send(mail);
  } catch (error) {
    // An invitation nobody received would sit in the pending list looking sent.
    await db.delete(invitations).where(eq(invitations.id, row.id));
    logger?.error({ err: error }, 'invitation mail failed');
    throw new HttpError(503, 'mail_unavailable', 'The invitation could not be mailed just now; try again in a minute');
  }
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    invitedBy: inviter,
    expiresAt: row.expiresAt.toISOString(),
    createdAt: row.createdAt.toISOString(),
  };
}

export async function revokeInvitation(db: Database, collectionId: string, invitationId: string, now = new Date()): Promise<void> {
  const [row] = await db
    .update(invitations)
    .set({ revokedAt: now })
    .where(and(eq(invitations.id, invitationId), eq(invitations.collectionId, collectionId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .returning({ id: invitations.id });
  if (!row) throw notFound('That pending invitation');
}

type InvitationRow = typeof invitations.$inferSelect;

/** Why a token cannot be used, in words for the person holding the link; null when it can. */
function refusal(row: InvitationRow | undefined, now: Date): HttpError | null {
  if (!row) return new HttpError(404, 'invitation_unknown', 'This invitation link is not known; ask the owner for a new one');
  if (row.acceptedAt) return new HttpError(410, 'invitation_used', 'This invitation has already been accepted; each link works once');
  if (row.revokedAt) return new HttpError(410, 'invitation_revoked', 'The owner withdrew this invitation; ask them for a new one');
  if (row.expiresAt.getTime() <= now.getTime()) return new HttpError(410, 'invitation_expired', 'This invitation has expired; ask the owner for a new one');
  return null;
}

export async function previewInvitation(db: Database, token: string, now = new Date()): Promise<InvitationPreview> {
  const [found] = await db
    .select({ invitation: invitations, collectionName: collections.name, invitedBy: users.displayName })
    .from(invitations)
    .innerJoin(collections, eq(collections.id, invitations.collectionId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashToken(token)))
    .limit(1);
  const refused = refusal(found?.invitation, now);
  if (refused) throw refused;
  return {
    collectionName: found!.collectionName,
    role: found!.invitation.role,
    email: found!.invitation.email,
    invitedBy: found!.invitedBy,
    expiresAt: found!.invitation.expiresAt.toISOString(),
  };
}

/**
 * Accepts an invitation for the signed-in user, in one transaction holding the invitation row.
 * The link is the credential: any signed-in account may accept it. An existing member keeps
 * the higher of their role and the invited one.
 */
export async function acceptInvitation(db: Database, token: string, userId: string, now = new Date()): Promise<AcceptedInvitation> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(invitations).where(eq(invitations.tokenHash, hashToken(token))).for('update');
    const refused = refusal(row, now);
    if (refused) throw refused;
    const [existing] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.collectionId, row.collectionId), eq(memberships.userId, userId)))
      .for('update');
    let role = row.role;
    if (!existing) {
      await tx.insert(memberships).values({ collectionId: row.collectionId, userId, role });
    } else if (RANK[existing.role] >= RANK[role]) {
      role = existing.role;
    } else {
      await tx.update(memberships).set({ role }).where(and(eq(memberships.collectionId, row.collectionId), eq(memberships.userId, userId)));
    }
    await tx.update(invitations).set({ acceptedAt: now, acceptedBy: userId }).where(eq(invitations.id, row.id));
    return { collectionId: row.collectionId, role };
  });
}
