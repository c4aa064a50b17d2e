import { eq } from 'drizzle-orm';
import { Router } from 'express';
import { z } from 'zod';
import {
  collectionSchema,
  createCollectionInputSchema,
  memberSchema,
  updateCollectionInputSchema,
  updateMemberInputSchema,
} from '@/shared/schemas/collections';
import { collections } from '../../db/schema';
import type { AppContext } from '../context';
import { requireRole, requireUser } from '../middleware/access';
import { changeMembership, createCollectionFor, getCollection, listMembers } from '../services/collections';
import { parse } from '../validate';
import { withPhotoFilesRemoved } from '../services/photos';

const memberParamsSchema = z.object({ userId: z.string().min(1).max(64) });

export function collectionRoutes(ctx: AppContext): Router {
  const { db } = ctx;
  const router = Router();
  const viewer = requireRole(db, 'viewer');
  const owner = requireRole(db, 'owner');

  router.post('/collections', requireUser, async (req, res) => {
    const input = parse(createCollectionInputSchema, req.body);
    const id = await db.transaction((tx) => createCollectionFor(tx, res.locals.user!.id, input));
    res.status(201).json(collectionSchema.parse(await getCollection(db, id, 'owner')));
  });

  router.get('/collections/:collectionId', viewer, async (req, res) => {
    const { collectionId, role } = res.locals.membership!;
    res.json(collectionSchema.parse(await getCollection(db, collectionId, role)));
  });

  router.patch('/collections/:collectionId', owner, async (req, res) => {
    const input = parse(updateCollectionInputSchema, req.body);
    const { collectionId } = res.locals.membership!;
    await db.update(collections).set(input).where(eq(collections.id, collectionId));
    res.json(collectionSchema.parse(await getCollection(db, collectionId, 'owner')));
  });

  router.delete('/collections/:collectionId', owner, async (_req, res) => {
    const { collectionId } = res.locals.membership!;
    await withPhotoFilesRemoved(db, ctx.photos, { collectionId }, () => db.delete(collections).where(eq(collections.id, collectionId)));
    res.status(204).end();
  });

  router.get('/collections/:collectionId/members', viewer, async (_req, res) => {
    res.json(z.array(memberSchema).parse(await listMembers(db, res.locals.membership!.collectionId)));
  });

  router.patch('/collections/:collectionId/members/:userId', owner, async (req, res) => {
    const { userId } = parse(memberParamsSchema, req.params, 'params');
    const { role } = parse(updateMemberInputSchema, req.body);
    await changeMembership(db, res.locals.membership!.collectionId, userId, { role });
    res.json(z.array(memberSchema).parse(await listMembers(db, res.locals.membership!.collectionId)));
  });

  router.delete('/collections/:collectionId/members/:userId', owner, async (req, res) => {
    const { userId } = parse(memberParamsSchema, req.params, 'params');
    await changeMembership(db, res.locals.membership!.collectionId, userId, 'remove');
    res.status(204).end();
  });

  return router;
}
