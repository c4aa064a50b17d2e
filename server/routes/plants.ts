import { Router } from 'express';
import {
  divideInputSchema,
  divideResultSchema,
  plantDetailSchema,
  plantInputSchema,
  plantListQuerySchema,
  plantPageSchema,
  plantSchema,
  updatePlantInputSchema,
} from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { createPlant, deletePlant, dividePlant, listPlants, plantDetail, updatePlant } from '../services/plants';
import { pathId, sentFields } from '../services/records-support';
import { parse } from '../validate';
import { withPhotoFilesRemoved } from '../services/photos';

const base = '/collections/:collectionId/plants';

export function plantRoutes({ db, photos }: AppContext): Router {
  const router = Router();
  const viewer = requireRole(db, 'viewer');
  const grower = requireRole(db, 'grower');

  router.get(base, viewer, async (req, res) => {
    const query = parse(plantListQuerySchema, req.query, 'query');
    res.json(plantPageSchema.parse(await listPlants(db, res.locals.membership!.collectionId, query)));
  });

  router.post(base, grower, async (req, res) => {
    const input = parse(plantInputSchema, req.body);
    const { collectionId, userId } = res.locals.membership!;
    res.status(201).json(plantSchema.parse(await createPlant(db, collectionId, userId, input)));
  });

  router.get(`${base}/:plantId`, viewer, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    res.json(plantDetailSchema.parse(await plantDetail(db, res.locals.membership!.collectionId, plantId)));
  });

  router.patch(`${base}/:plantId`, grower, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const input = parse(updatePlantInputSchema, req.body);
    const plant = await updatePlant(db, res.locals.membership!.collectionId, plantId, input.version, sentFields(input, req.body));
    res.json(plantSchema.parse(plant));
  });

  router.delete(`${base}/:plantId`, requireRole(db, 'owner'), async (req, res) => {
    const { collectionId } = res.locals.membership!;
    const plantId = pathId(req.params.plantId, 'That plant');
    await withPhotoFilesRemoved(db, photos, { collectionId, plantId }, () => deletePlant(db, collectionId, plantId));
    res.status(204).end();
  });

  router.post(`${base}/:plantId/divide`, grower, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const input = parse(divideInputSchema, req.body);
    const { collectionId, userId } = res.locals.membership!;
    res.status(201).json(divideResultSchema.parse(await dividePlant(db, collectionId, userId, plantId, input)));
  });

  return router;
}
