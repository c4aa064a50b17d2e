import { sql } from 'drizzle-orm';
import { Router } from 'express';
import type { AppContext } from '../context';

const HEALTH_QUERY_TIMEOUT_MS = 2000;

export function healthRoutes({ db }: AppContext): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    let timer: ReturnType<typeof setTimeout> | undefined;
    const reachable = await Promise.race([
      db.execute(sql`select 1`).then(
        () => true,
        () => false,
      ),
      new Promise<boolean>((resolve) => {
        timer = setTimeout(() => resolve(false), HEALTH_QUERY_TIMEOUT_MS);
      }),
    ]).finally(() => clearTimeout(timer));
    res.status(reachable ? 200 : 503).json({ status: reachable ? 'ok' : 'degraded', database: reachable ? 'up' : 'down' });
  });
  return router;
}
