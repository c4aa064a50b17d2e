import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import postgres from 'postgres';
import pino from 'pino';
import { createDatabase } from '../../db/client';
import { runMigrations } from '../../db/migrate';
import { seedDemo } from '../../db/seed';
import { createApp } from '../../server/app';
import { localDiskStore } from '../../server/photos/store';
import { startFakeSmtp } from '../../server/mail/fake-smtp';
import { createSmtpMailer } from '../../server/mail/mailer';
import { createRateLimits } from '../../server/middleware/rate-limit';
import { createWeatherClient } from '../../server/weather/client';
import { startFakeWeather } from '../../server/weather/fake-weather';
import { E2E_DATABASE, E2E_PORT, E2E_WEB_ROOT } from './constants';

/**
 * The browser tests' server: the production web build and the real API on one loopback
 * port, over a freshly created and seeded database in the test cluster.
 */
async function main() {
  const adminUrl = process.env.TEST_DATABASE_URL;
  if (!adminUrl) throw new Error('TEST_DATABASE_URL is not set: run the browser tests through npm test');
  const admin = postgres(adminUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe(`drop database if exists ${E2E_DATABASE} with (force)`);
  await admin.unsafe(`create database ${E2E_DATABASE}`);
  await admin.end();

  const url = new URL(adminUrl);
  url.pathname = `/${E2E_DATABASE}`;
  await runMigrations(url.toString());
  const database = createDatabase(url.toString());
  await seedDemo(database.db, { log: () => {} });

  // Mail goes to a fake SMTP server on a free loopback port; the specs read it at /dev/mailbox.
  const mailbox = await startFakeSmtp(0);
  const mailer = createSmtpMailer({ host: mailbox.host, port: mailbox.port, secure: false, from: 'Sympodia <no-reply@sympodia.invalid>', publicUrl: `http://127.0.0.1:${E2E_PORT}` });

  // Night forecasts come from the fake forecast service on a free loopback port (or WEATHER_URL);
  // the specs switch its test modes at /dev/weather.
  const weatherFake = process.env.WEATHER_URL ? undefined : await startFakeWeather();
  const weather = createWeatherClient({ baseUrl: process.env.WEATHER_URL ?? weatherFake!.url, timeoutMs: 2000 });

  // Photos go to a throwaway folder, removed when the server stops.
  const photoDir = fs.mkdtempSync(path.join(os.tmpdir(), 'sympodia-e2e-photos-'));

  const app = createApp({
    db: database.db,
    logger: pino({ level: 'warn' }),
    photoStore: localDiskStore(photoDir),
    mailer,
    mailbox,
    weather,
    weatherFake,
    webRoot: path.resolve(__dirname, '..', '..', E2E_WEB_ROOT),
    // The suite signs in dozens of times from one address; the limits themselves are
    // tested against the API (tests/api/auth.test.ts).
    rateLimits: createRateLimits({ perIp: 10_000, perAccount: 10_000, windowSeconds: 60 }),
  });
  const server = app.listen(E2E_PORT, '127.0.0.1');
  const stop = () =>
    server.close(() => {
      fs.rmSync(photoDir, { recursive: true, force: true });
      void weatherFake?.close();
      void database.close().then(() => process.exit(0));
    });
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
