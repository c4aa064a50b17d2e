import { Router } from 'express';
import { z } from 'zod';
import { acceptedHandoffSchema, acceptHandoffInputSchema, createHandoffInputSchema, handoffPreviewSchema, handoffSchema } from '@/shared/schemas/handoffs';
import { mailTokenSchema } from '@/shared/schemas/mail';
import type { AppContext } from '../context';
import { requireRole, requireUser } from '../middleware/access';
import { consume, limitByIp } from '../middleware/rate-limit';
import { acceptHandoff, createHandoff, pendingHandoffs, previewHandoff, revokeHandoff } from '../services/handoffs';
import { pathId } from '../services/records-support';
import { parse } from '../validate';

const tokenParamsSchema = z.object({ token: mailTokenSchema });
const base = '/collections/:collectionId';

export function handoffRoutes(ctx: AppContext): Router {
  const { db, mailer, rateLimits, photos, fingerprints } = ctx;
  const router = Router();
  // Recipients' addresses are for the people who can send and withdraw hand-offs.
  const grower = requireRole(db, 'grower');

  router.get(`${base}/handoffs`, grower, async (_req, res) => {
    res.json(z.array(handoffSchema).parse(await pendingHandoffs(db, res.locals.membership!, null)));
  });

  router.get(`${base}/plants/:plantId/handoffs`, grower, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    res.json(z.array(handoffSchema).parse(await pendingHandoffs(db, res.locals.membership!, plantId)));
  });

  router.post(`${base}/plants/:plantId/handoffs`, grower, limitByIp(rateLimits.mailIp), async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const input = parse(createHandoffInputSchema, req.body);
    const user = res.locals.user!;
    await consume(rateLimits.mailAccount, `handoff:${user.id}`);
    const handoff = await createHandoff(
      db,
      mailer,
      { member: res.locals.membership!, plantId, email: input.email, note: input.note, sender: { id: user.id, displayName: user.displayName } },
      new Date(),
      ctx.logger,
    );
    res.status(201).json(handoffSchema.parse(handoff));
  });

  router.delete(`${base}/handoffs/:handoffId`, grower, async (req, res) => {
    const handoffId = pathId(req.params.handoffId, 'That pending hand-off');
    await revokeHandoff(db, res.locals.membership!, handoffId);
    res.status(204).end();
  });

  // Public: the link shows what it offers before sign-in; accepting needs the recipient's account.
  router.get('/handoffs/:token', async (req, res) => {
    const { token } = parse(tokenParamsSchema, req.params, 'params');
    res.json(handoffPreviewSchema.parse(await previewHandoff(db, token)));
  });

  router.post('/handoffs/:token/accept', requireUser, async (req, res) => {
    const { token } = parse(tokenParamsSchema, req.params, 'params');
    const input = parse(acceptHandoffInputSchema, req.body);
    const user = res.locals.user!;
    const { giverCollectionId, ...accepted } = await acceptHandoff(db, photos, token, { id: user.id, email: user.email, displayName: user.displayName }, input);
    // Both collections changed outside a collection path: the engine must not serve a cached answer.
    fingerprints.forget(accepted.collectionId);
    fingerprints.forget(giverCollectionId);
    res.json(acceptedHandoffSchema.parse(accepted));
  });

  return router;
}
