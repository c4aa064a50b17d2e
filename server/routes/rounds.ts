import { Router } from 'express';
import { roundsOrderInputSchema, roundsSchema } from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { getRounds, saveRoundsOrder } from '../services/rounds';
import { parse } from '../validate';

const base = '/collections/:collectionId/rounds';

export function roundRoutes({ db }: AppContext): Router {
  const router = Router();

  router.get(base, requireRole(db, 'viewer'), async (_req, res) => {
    res.json(roundsSchema.parse(await getRounds(db, res.locals.membership!.collectionId)));
  });

  /** Answers with the walk in its new order. */
  router.put(`${base}/order`, requireRole(db, 'grower'), async (req, res) => {
    const { plantIds } = parse(roundsOrderInputSchema, req.body);
    const { collectionId } = res.locals.membership!;
    await saveRoundsOrder(db, collectionId, plantIds);
    res.json(roundsSchema.parse(await getRounds(db, collectionId)));
  });

  return router;
}
