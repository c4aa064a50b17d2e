import { Router } from 'express';
import { z } from 'zod';
import { acceptedInvitationSchema, createInvitationInputSchema, invitationPreviewSchema, invitationSchema, mailTokenSchema } from '@/shared/schemas/mail';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { requireRole, requireUser } from '../middleware/access';
import { consume, limitByIp } from '../middleware/rate-limit';
import { acceptInvitation, createInvitation, pendingInvitations, previewInvitation, revokeInvitation } from '../services/invitations';
import { parse } from '../validate';

const tokenParamsSchema = z.object({ token: mailTokenSchema });

export function invitationRoutes(ctx: AppContext): Router {
  const { db, mailer, rateLimits } = ctx;
  const router = Router();
  const owner = requireRole(db, 'owner');

  router.get('/collections/:collectionId/invitations', owner, async (_req, res) => {
    res.json(z.array(invitationSchema).parse(await pendingInvitations(db, res.locals.membership!.collectionId)));
  });

  router.post('/collections/:collectionId/invitations', owner, limitByIp(rateLimits.mailIp), async (req, res) => {
    const input = parse(createInvitationInputSchema, req.body);
    const user = res.locals.user!;
    await consume(rateLimits.mailAccount, `invite:${user.id}`);
    const invitation = await createInvitation(db, mailer, {
      collectionId: res.locals.membership!.collectionId,
      email: input.email,
      role: input.role,
      invitedBy: { id: user.id, displayName: user.displayName },
    }, new Date(), ctx.logger);
    res.status(201).json(invitationSchema.parse(invitation));
  });

  router.delete('/collections/:collectionId/invitations/:invitationId', owner, async (req, res) => {
    const id = z.uuid().safeParse(req.params.invitationId);
    if (!id.success) throw notFound('That pending invitation');
    await revokeInvitation(db, res.locals.membership!.collectionId, id.data);
    res.status(204).end();
  });

  // Public: the link is the credential, so the page can show what it offers before sign-in.
  router.get('/invitations/:token', async (req, res) => {
    const { token } = parse(tokenParamsSchema, req.params, 'params');
    res.json(invitationPreviewSchema.parse(await previewInvitation(db, token)));
  });

  router.post('/invitations/:token/accept', requireUser, async (req, res) => {
    const { token } = parse(tokenParamsSchema, req.params, 'params');
    const accepted = await acceptInvitation(db, token, res.locals.user!.id);
    res.json(acceptedInvitationSchema.parse(accepted));
  });

  return router;
}
