import { Router } from 'express';
import { careEntrySchema, careInputSchema } from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { addCare, deleteCare } from '../services/care';
import { pathId } from '../services/records-support';
import { parse } from '../validate';

const base = '/collections/:collectionId';

export function careRoutes({ db }: AppContext): Router {
  const router = Router();
  const grower = requireRole(db, 'grower');

  router.post(`${base}/plants/:plantId/care`, grower, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const input = parse(careInputSchema, req.body);
    res.status(201).json(careEntrySchema.parse(await addCare(db, res.locals.membership!, { plantId }, input)));
  });

  router.post(`${base}/areas/:areaId/care`, grower, async (req, res) => {
    const areaId = pathId(req.params.areaId, 'That area');
    const input = parse(careInputSchema, req.body);
    res.status(201).json(careEntrySchema.parse(await addCare(db, res.locals.membership!, { areaId }, input)));
  });

  /** The guard lets growers through; the service keeps them to their own entries. */
  router.delete(`${base}/care/:careId`, grower, async (req, res) => {
    await deleteCare(db, res.locals.membership!, pathId(req.params.careId, 'That care entry'));
    res.status(204).end();
  });

  return router;
}
