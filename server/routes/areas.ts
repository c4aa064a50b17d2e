import { Router } from 'express';
import { z } from 'zod';
import { areaInputSchema, areaSchema, updateAreaInputSchema } from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { createArea, deleteArea, listAreas, updateArea } from '../services/areas';
import { pathId, sentFields } from '../services/records-support';
import { parse } from '../validate';

const base = '/collections/:collectionId/areas';

export function areaRoutes({ db }: AppContext): Router {
  const router = Router();

  router.get(base, requireRole(db, 'viewer'), async (_req, res) => {
    res.json(z.array(areaSchema).parse(await listAreas(db, res.locals.membership!.collectionId)));
  });

  router.post(base, requireRole(db, 'grower'), async (req, res) => {
    const input = parse(areaInputSchema, req.body);
    res.status(201).json(areaSchema.parse(await createArea(db, res.locals.membership!.collectionId, input)));
  });

  router.patch(`${base}/:areaId`, requireRole(db, 'grower'), async (req, res) => {
    const areaId = pathId(req.params.areaId, 'That area');
    const input = parse(updateAreaInputSchema, req.body);
    const area = await updateArea(db, res.locals.membership!.collectionId, areaId, input.version, sentFields(input, req.body));
    res.json(areaSchema.parse(area));
  });

  router.delete(`${base}/:areaId`, requireRole(db, 'owner'), async (req, res) => {
    await deleteArea(db, res.locals.membership!.collectionId, pathId(req.params.areaId, 'That area'));
    res.status(204).end();
  });

  return router;
}
