import path from 'node:path';
import pino from 'pino';
import { createDatabase } from '../db/client';
import { runMigrations } from '../db/migrate';
import { seedDemo } from '../db/seed';
import { createApp } from './app';
import { readEnv } from './env';

const SHUTDOWN_GRACE_MS = 10_000;

async function main() {
  const env = readEnv();
  const logger = pino({ level: env.LOG_LEVEL });

  await runMigrations(env.DATABASE_URL);
  const database = createDatabase(env.DATABASE_URL);
  if (env.SEED_DEMO) await seedDemo(database.db, { log: (line) => logger.info(line) });

  const app = createApp({
    db: database.db,
    logger,
    webRoot: env.WEB_ROOT ? path.resolve(env.WEB_ROOT) : undefined,
    devOrigins: env.DEV_ORIGINS,
    trustProxy: env.TRUST_PROXY || undefined,
  });

  const server = app.listen(env.PORT, env.HOST, () => {
    logger.info(`Sympodia is listening on http://${env.HOST}:${env.PORT}`);
  });

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down: finishing requests in flight');
    setTimeout(() => {
      logger.warn('requests still open after the grace period; closing anyway');
      server.closeAllConnections();
    }, SHUTDOWN_GRACE_MS);
    server.close(async () => {
      await database.close();
      logger.info('stopped');
      process.exit(0);
    });
    server.closeIdleConnections();
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
