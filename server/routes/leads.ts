import { Router } from 'express';
import { bloomInputSchema, bloomRecordSchema, leadDetailSchema, leadInputSchema, leadSchema, updateLeadInputSchema } from '@/shared/schemas/records';
import type { AppContext } from '../context';
import { requireRole } from '../middleware/access';
import { createLead, deleteLead, leadDetail, updateLead } from '../services/leads';
import { putBloom } from '../services/measurements';
import { pathId, sentFields } from '../services/records-support';
import { parse } from '../validate';
import { withPhotoFilesRemoved } from '../services/photos';

const base = '/collections/:collectionId';

export function leadRoutes({ db, photos }: AppContext): Router {
  const router = Router();
  const grower = requireRole(db, 'grower');

  router.post(`${base}/plants/:plantId/leads`, grower, async (req, res) => {
    const plantId = pathId(req.params.plantId, 'That plant');
    const input = parse(leadInputSchema, req.body);
    res.status(201).json(leadSchema.parse(await createLead(db, res.locals.membership!.collectionId, plantId, input)));
  });

  router.get(`${base}/leads/:leadId`, requireRole(db, 'viewer'), async (req, res) => {
    const leadId = pathId(req.params.leadId, 'That lead');
    res.json(leadDetailSchema.parse(await leadDetail(db, res.locals.membership!.collectionId, leadId)));
  });

  router.patch(`${base}/leads/:leadId`, grower, async (req, res) => {
    const leadId = pathId(req.params.leadId, 'That lead');
    const input = parse(updateLeadInputSchema, req.body);
    const lead = await updateLead(db, res.locals.membership!.collectionId, leadId, input.version, sentFields(input, req.body));
    res.json(leadSchema.parse(lead));
  });

  router.delete(`${base}/leads/:leadId`, requireRole(db, 'owner'), async (req, res) => {
    const { collectionId } = res.locals.membership!;
    const leadId = pathId(req.params.leadId, 'That lead');
    await withPhotoFilesRemoved(db, photos, { collectionId, leadId }, () => deleteLead(db, collectionId, leadId));
    res.status(204).end();
  });

  /** Creates the lead's bloom record (201) or replaces it given the version read (200). */
  router.put(`${base}/leads/:leadId/bloom`, grower, async (req, res) => {
    const leadId = pathId(req.params.leadId, 'That lead');
    const input = parse(bloomInputSchema, req.body);
    const { bloom, created } = await putBloom(db, res.locals.membership!.collectionId, leadId, input);
    res.status(created ? 201 : 200).json(bloomRecordSchema.parse(bloom));
  });

  return router;
}
