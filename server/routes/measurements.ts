import { Router } from 'express';
import { measurementInputSchema, measurementSchema, sheathMarkInputSchema, updateMeasurementInputSchema } from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { deleteMeasurement, markSheath, recordMeasurement, updateMeasurement } from '../services/measurements';
import { pathId, sentFields } from '../services/records-support';
import { parse } from '../validate';

const base = '/collections/:collectionId';

export function measurementRoutes({ db }: AppContext): Router {
  const router = Router();
  const grower = requireRole(db, 'grower');

  /** 201 for a new entry; 200 with the stored entry when its client key was seen before. */
  router.post(`${base}/leads/:leadId/measurements`, grower, async (req, res) => {
    const leadId = pathId(req.params.leadId, 'That lead');
    const input = parse(measurementInputSchema, req.body);
    const { measurement, created } = await recordMeasurement(db, res.locals.membership!, leadId, input);
    res.status(created ? 201 : 200).json(measurementSchema.parse(measurement));
  });

  router.post(`${base}/leads/:leadId/sheath`, grower, async (req, res) => {
    const leadId = pathId(req.params.leadId, 'That lead');
    const input = parse(sheathMarkInputSchema, req.body);
    const { measurement, created } = await markSheath(db, res.locals.membership!, leadId, input);
    res.status(created ? 201 : 200).json(measurementSchema.parse(measurement));
  });

  router.patch(`${base}/measurements/:measurementId`, grower, async (req, res) => {
    const measurementId = pathId(req.params.measurementId, 'That measurement');
    const input = parse(updateMeasurementInputSchema, req.body);
    const changes = sentFields(input, req.body);
    const measurement = await updateMeasurement(db, res.locals.membership!.collectionId, measurementId, input.version, changes);
    res.json(measurementSchema.parse(measurement));
  });

  /** The guard lets growers through; the service keeps them to their own entries. */
  router.delete(`${base}/measurements/:measurementId`, grower, async (req, res) => {
    await deleteMeasurement(db, res.locals.membership!, pathId(req.params.measurementId, 'That measurement'));
    res.status(204).end();
  });

  return router;
}
