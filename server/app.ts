import path from 'node:path';
import compression from 'compression';
import express, { type Express } from 'express';
import helmet from 'helmet';
import pino, { type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Database } from '../db/client';
import { createAuth } from './auth';
import type { AppContext } from './context';
import { errorHandler, HttpError } from './errors';
import { HeavyJobs } from './heavy-jobs';
import { originCheck } from './middleware/origin';
import { createRateLimits, type RateLimits } from './middleware/rate-limit';
import { engineFingerprint, FingerprintMemo } from './services/engine-data';
import { sessionMiddleware, sessionValidator } from './middleware/session';
import { authRoutes } from './routes/auth';
import { areaRoutes } from './routes/areas';
import { careRoutes } from './routes/care';
import { collectionRoutes } from './routes/collections';
import { engineRoutes } from './routes/engine';
import { healthRoutes } from './routes/health';
import { leadRoutes } from './routes/leads';
import { measurementRoutes } from './routes/measurements';
import { plantRoutes } from './routes/plants';
import { roundRoutes } from './routes/rounds';
import { photoRoutes } from './routes/photos';
import { localDiskStore, type PhotoStore } from './photos/store';
import { digestRoutes, unsubscribeRoutes } from './routes/digest';
import { invitationRoutes } from './routes/invitations';
import { handoffRoutes } from './routes/handoffs';
import { mailboxRoutes } from './routes/mailbox';
import { passwordResetRoutes } from './routes/password-reset';
import { importRoutes } from './routes/imports';
import { exportRoutes } from './routes/export';
import type { FakeSmtpServer } from './mail/fake-smtp';
import type { Mailer } from './mail/mailer';
import { coldNightRoutes, fakeWeatherRoutes } from './routes/cold-nights';
import { NO_WEATHER, type WeatherClient } from './weather/client';
import { serveWebBuild } from './web/serve-build';
import type { FakeWeatherServer } from './weather/fake-weather';

export const JSON_BODY_LIMIT = '100kb';

export interface AppOptions {
  db: Database;
  logger?: Logger;
  rateLimits?: RateLimits;
  /** Folder of the exported web build; when given, the same server serves the app. */
  webRoot?: string;
  /** Extra origins allowed to call the API with cookies (the Expo dev server in development). */
  devOrigins?: string[];
  /**
   * Express's trust-proxy setting for a server behind a TLS-terminating proxy: the number of proxy
   * hops, or the proxies' addresses (TRUST_PROXY in server/env.ts). Never `true`, which takes the
   * left-most X-Forwarded-For entry, written by the client.
   */
  trustProxy?: number | readonly string[];
  /** Where photos are kept; by default the ignored folder .data/photos beside the code. */
  photoStore?: PhotoStore;
  /** Sends the product's mail; without one, routes that mail answer 500 (a set-up mistake). */
  mailer?: Mailer;
  /** The local fake SMTP server; when given, /dev/mailbox lists what it received. */
  mailbox?: FakeSmtpServer;
  /** Night forecasts for cold-night checks; without one, they say "forecast unavailable". */
  weather?: WeatherClient;
  /** The local fake forecast service; when given, /dev/weather switches its test modes. */
  weatherFake?: FakeWeatherServer;
  /** Imports and restores this process runs at once (HEAVY_JOB_SLOTS); more are answered 503 busy. */
  heavyJobSlots?: number;
}

const NO_MAILER: Mailer = {
  publicUrl: 'http://127.0.0.1',
  send: async () => {
    throw new Error('No mailer configured: pass createApp({ mailer })');
  },
};

/** Builds the HTTP app without listening, so tests can drive it with supertest. */
export function createApp(options: AppOptions): Express {
  const logger = options.logger ?? pino({ level: 'silent' });
  const auth = createAuth(options.db);
  const ctx: AppContext = {
    db: options.db,
    auth,
    validateSession: sessionValidator(auth, options.db),
    logger,
    rateLimits: options.rateLimits ?? createRateLimits(),
    fingerprints: new FingerprintMemo((collectionId) => engineFingerprint(options.db, collectionId)),
    mailer: options.mailer ?? NO_MAILER,
    photos: options.photoStore ?? localDiskStore(path.join(__dirname, '..', '.data', 'photos')),
    weather: options.weather ?? NO_WEATHER,
    heavyJobs: new HeavyJobs(options.heavyJobSlots),
  };
  const devOrigins = options.devOrigins ?? [];

  const app = express();
  app.disable('x-powered-by');
  if (options.trustProxy !== undefined) app.set('trust proxy', typeof options.trustProxy === 'number' ? options.trustProxy : [...options.trustProxy]);

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          // CanvasKit (charts) compiles WebAssembly; nothing else is evaluated.
          scriptSrc: ["'self'", "'wasm-unsafe-eval'"],
          // react-native-web writes its style rules into a <style> element at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'", ...devOrigins],
          workerSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
        },
      },
      crossOriginEmbedderPolicy: false,
    }),
  );
  // The web bundle and JSON compress to about a quarter; phones on slow links feel it.
  app.use(compression());
  app.use(
    pinoHttp({
      logger,
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      // Method, path and status only: headers carry session cookies. The serializers read the
      // request and response themselves (not pino's copies with every header, made per request).
      wrapSerializers: false,
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
        err: pino.stdSerializers.err,
      },
    }),
  );

  const api = express.Router();
  if (devOrigins.length > 0) {
    api.use((req, res, next) => {
      const origin = req.get('origin');
      if (origin && devOrigins.includes(origin)) {
        res.set('Access-Control-Allow-Origin', origin);
        res.set('Access-Control-Allow-Credentials', 'true');
        res.set('Access-Control-Allow-Headers', 'Content-Type');
        res.set('Access-Control-Allow-Methods', 'GET,POST,PUT,PATCH,DELETE');
        res.set('Vary', 'Origin');
        if (req.method === 'OPTIONS') return void res.status(204).end();
      }
      next();
    });
  }
  api.use(express.json({ limit: JSON_BODY_LIMIT }));
  api.use(originCheck(devOrigins));
  api.use(sessionMiddleware(ctx.auth, ctx.validateSession));
  // Any write to a collection makes this process forget its fingerprint, so the next
  // engine answer is checked against the database at once.
  api.use('/collections/:collectionId', (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') res.on('finish', () => ctx.fingerprints.forget(req.params.collectionId as string));
    next();
  });
  api.use(healthRoutes(ctx));
  api.use(authRoutes(ctx));
  api.use(collectionRoutes(ctx));
  api.use(areaRoutes(ctx));
  api.use(plantRoutes(ctx));
  api.use(leadRoutes(ctx));
  api.use(measurementRoutes(ctx));
  api.use(careRoutes(ctx));
  api.use(roundRoutes(ctx));
  api.use(engineRoutes(ctx));
  api.use(photoRoutes(ctx));
  api.use(invitationRoutes(ctx));
  api.use(handoffRoutes(ctx));
  api.use(passwordResetRoutes(ctx));
  api.use(digestRoutes(ctx));
  api.use(importRoutes(ctx));
  api.use(coldNightRoutes(ctx));
  api.use(exportRoutes(ctx));
  api.use((req, _res, next) => next(new HttpError(404, 'no_route', `No API route ${req.method} ${req.path}`)));
  app.use('/api', api);
  app.use(unsubscribeRoutes(ctx));
  if (options.mailbox) app.use(mailboxRoutes(options.mailbox));
  if (options.weatherFake) app.use(fakeWeatherRoutes(options.weatherFake, ctx.weather, devOrigins));

  if (options.webRoot) serveWebBuild(app, options.webRoot, ctx, logger);

  app.use(errorHandler(logger));
  return app;
}
