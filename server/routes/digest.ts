import { Router } from 'express';
import { z } from 'zod';
import { digestSettingSchema } from '@/shared/schemas/mail';
import type { AppContext } from '../context';
import { escapeHtml } from '../mail/mailer';
import { requireRole } from '../middleware/access';
import { collectionNameForKey, setDigestOptOut, subscriptionFor, unsubscribeByKey } from '../services/digest';
import { parse } from '../validate';

/** The member's own digest setting for a collection (API, any member). */
export function digestRoutes(ctx: AppContext): Router {
  const { db } = ctx;
  const router = Router();
  const viewer = requireRole(db, 'viewer');

  router.get('/collections/:collectionId/digest', viewer, async (_req, res) => {
    const { collectionId, userId } = res.locals.membership!;
    const { optedOut } = await subscriptionFor(db, collectionId, userId);
    res.json(digestSettingSchema.parse({ optedOut }));
  });

  router.put('/collections/:collectionId/digest', viewer, async (req, res) => {
    const { optedOut } = parse(digestSettingSchema, req.body);
    const { collectionId, userId } = res.locals.membership!;
    await setDigestOptOut(db, collectionId, userId, optedOut);
    res.json(digestSettingSchema.parse({ optedOut }));
  });

  return router;
}

const keySchema = z.string().regex(/^[A-Za-z0-9_-]{16,64}$/);

function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)} · Sympodia</title>
<style>body{font-family:system-ui,sans-serif;max-width:32rem;margin:2rem auto;padding:0 1rem;color:#1c2a22;line-height:1.5}
button{font-size:1rem;padding:.75rem 1.25rem;border-radius:8px;border:1px solid #1d5b8f;background:#1d5b8f;color:#fff;min-height:48px}
a{color:#1d5b8f}</style></head><body><h1>${escapeHtml(title)}</h1>${body}</body></html>`;
}

/**
 * The digest's unsubscribe link, outside /api and without sign-in: the key in the link can only
 * switch the digest off. GET shows a confirm page (mail scanners follow links; they must not
 * unsubscribe anyone); POST switches it off, and also serves RFC 8058 one-click requests.
 */
export function unsubscribeRoutes(ctx: AppContext): Router {
  const { db } = ctx;
  const router = Router();

  router.get('/digest/unsubscribe/:key', async (req, res) => {
    res.set('Cache-Control', 'no-store');
    const key = keySchema.safeParse(req.params.key);
    const name = key.success ? await collectionNameForKey(db, key.data) : null;
    if (!name) {
      res.status(404).type('html').send(page('Link not recognised', '<p>This unsubscribe link is not known. You can switch the weekly digest off on the Collection screen in Sympodia.</p>'));
      return;
    }
    res.type('html').send(
      page(
        'Stop the weekly digest?',
        `<p>You will no longer get the weekly mail for <strong>${escapeHtml(name)}</strong>, nor its same-day cold-night warnings. You can switch both back on from the Collection screen.</p>
<form method="post" action="/digest/unsubscribe/${escapeHtml(key.data!)}"><button type="submit">Stop the weekly digest</button></form>`,
      ),
    );
  });

  router.post('/digest/unsubscribe/:key', async (req, res) => {
    res.set('Cache-Control', 'no-store');
    const key = keySchema.safeParse(req.params.key);
    const done = key.success ? await unsubscribeByKey(db, key.data) : null;
    if (!done) {
      res.status(404).type('html').send(page('Link not recognised', '<p>This unsubscribe link is not known.</p>'));
      return;
    }
    res.type('html').send(page('Weekly digest stopped', `<p>You will no longer get the weekly mail for <strong>${escapeHtml(done.collectionName)}</strong>, nor its same-day cold-night warnings.</p>`));
  });

  return router;
}
