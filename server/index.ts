import path from 'node:path';
import pino from 'pino';
import { createDatabase } from '../db/client';
import { runMigrations } from '../db/migrate';
import { seedDemo } from '../db/seed';
import { createApp } from './app';
import { readEnv } from './env';
import { mailFromEnv } from './mail/from-env';
import { createRateLimits, DEFAULT_AUTH_LIMITS } from './middleware/rate-limit';
import { photoStoreFromEnv } from './photos/from-env';
import { DIGEST_CHECK_INTERVAL_MS, startDigestScheduler } from './services/digest';
import { startColdNightScheduler } from './services/cold-night-alerts';
import { weatherFromEnv } from './weather/from-env';

const SHUTDOWN_GRACE_MS = 10_000;

async function main() {
  const env = readEnv();
  const logger = pino({ level: env.LOG_LEVEL });

  await runMigrations(env.DATABASE_URL);
  const database = createDatabase(env.DATABASE_URL);
  if (env.SEED_DEMO) await seedDemo(database.db, { log: (line) => logger.info(line) });

  const mail = await mailFromEnv(env, logger);
  const forecast = await weatherFromEnv(env, logger);
  const app = createApp({
    db: database.db,
    rateLimits: createRateLimits(DEFAULT_AUTH_LIMITS, { sql: database.client }),
    logger,
    mailer: mail.mailer,
    mailbox: mail.fake,
    weather: forecast.weather,
    weatherFake: forecast.fake,
    photoStore: photoStoreFromEnv(env),
    webRoot: env.WEB_ROOT ? path.resolve(env.WEB_ROOT) : undefined,
    devOrigins: env.DEV_ORIGINS,
    trustProxy: env.TRUST_PROXY,
  });

  const server = app.listen(env.PORT, env.HOST, () => {
    logger.info(`Sympodia is listening on http://${env.HOST}:${env.PORT}`);
  });

  const stopDigest = startDigestScheduler(
    { db: database.db, mailer: mail.mailer, logger, weather: forecast.weather },
    DIGEST_CHECK_INTERVAL_MS,
    env.DIGEST_FIRST_CHECK_SECONDS * 1000,
  );
  const stopColdNights = startColdNightScheduler({ db: database.db, mailer: mail.mailer, logger, weather: forecast.weather });

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down: finishing requests in flight');
    setTimeout(() => {
      logger.warn('requests still open after the grace period; closing anyway');
      server.closeAllConnections();
    }, SHUTDOWN_GRACE_MS);
    stopDigest();
    stopColdNights();
    server.close(async () => {
      await mail.fake?.close();
      await forecast.fake?.close();
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
