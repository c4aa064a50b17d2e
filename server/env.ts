import { isIP } from 'node:net';
import { z } from 'zod';
import { databaseUrl } from '../db/url';
import { isLoopbackHost } from './middleware/loopback';

const booleanFlag = z
  .enum(['0', '1', 'true', 'false'])
  .optional()
  .transform((value) => value === '1' || value === 'true');

// proxy-addr's names for address ranges, which Express's `trust proxy` also takes.
const PROXY_RANGE_NAMES = new Set(['loopback', 'linklocal', 'uniquelocal']);

function isProxyAddress(entry: string): boolean {
  if (PROXY_RANGE_NAMES.has(entry)) return true;
  const [address, bits, ...rest] = entry.split('/');
  const family = isIP(address);
  if (family === 0 || rest.length > 0) return false;
  if (bits === undefined) return true;
  return /^\d{1,3}$/.test(bits) && Number(bits) <= (family === 4 ? 32 : 128);
}

/**
 * Who may say where a request came from (X-Forwarded-For, X-Forwarded-Proto): a number of proxy
 * hops in front of the server (TRUST_PROXY=1: one proxy, so the client is the address that proxy
 * saw, the right-most entry), or the proxies' own addresses and ranges. Never "every hop": the
 * left-most entries are whatever the client wrote.
 */
const trustProxySchema = z
  .string()
  .optional()
  .transform((value, ctx): number | string[] | undefined => {
    const text = value?.trim() ?? '';
    if (text === '' || text === '0' || text === 'false') return undefined;
    if (/^\d+$/.test(text)) {
      const hops = Number(text);
      if (hops <= 10) return hops;
      ctx.addIssue({ code: 'custom', message: `TRUST_PROXY=${text}: give the number of proxies in front of the server (1 to 10)` });
      return z.NEVER;
    }
    if (text === 'true') {
      ctx.addIssue({
        code: 'custom',
        message: 'TRUST_PROXY=true would believe every X-Forwarded-For entry, which the client writes; give the number of proxies (TRUST_PROXY=1 for one) or their addresses',
      });
      return z.NEVER;
    }
    const entries = text.split(',').map((e) => e.trim()).filter(Boolean);
    const wrong = entries.filter((e) => !isProxyAddress(e));
    if (wrong.length > 0) {
      ctx.addIssue({ code: 'custom', message: `TRUST_PROXY: ${wrong.join(', ')} is not an address, a range (10.0.0.0/8) or one of loopback, linklocal, uniquelocal` });
      return z.NEVER;
    }
    return entries;
  });

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(1).max(65535).default(8790),
  WEB_ROOT: z.string().optional(),
  DEV_ORIGINS: z
    .string()
    .optional()
    .transform((value) => (value ? value.split(',').map((o) => o.trim()).filter(Boolean) : [])),
  TRUST_PROXY: trustProxySchema,
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  SEED_DEMO: booleanFlag,
  /** Run the local fake SMTP server and /dev/mailbox (start, dev and e2e); never with SMTP_HOST. */
  MAIL_FAKE: booleanFlag,
  /** The fake SMTP server's port; 0 takes a free one. */
  MAIL_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  SMTP_HOST: z.string().min(1).optional(),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(587),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: booleanFlag,
  MAIL_FROM: z.string().default('Sympodia <no-reply@sympodia.invalid>'),
  /** Base of the links in mail, e.g. https://orchids.example.org; defaults to http://HOST:PORT. */
  PUBLIC_URL: z.url().optional(),
  /** Where photos are kept: a folder on this machine, or an S3-compatible object store. */
  PHOTO_STORE: z.enum(['local', 's3']).default('local'),
  /** The folder for PHOTO_STORE=local; defaults to .data/photos in the project. */
  PHOTO_DIR: z.string().optional(),
  S3_ENDPOINT: z.url().optional(),
  S3_REGION: z.string().default('us-east-1'),
  S3_BUCKET: z.string().min(3).optional(),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  S3_FORCE_PATH_STYLE: booleanFlag,
  /** Seconds from start to this process's first weekly-digest check (then hourly); default 30. */
  DIGEST_FIRST_CHECK_SECONDS: z.coerce.number().min(0).max(86_400).default(30),
  /** Base URL of an Open-Meteo-shaped forecast API for cold nights, e.g. https://api.open-meteo.com. */
  WEATHER_URL: z.url().optional(),
  /** Run the local fake forecast service (start, dev and e2e); never with WEATHER_URL. */
  WEATHER_FAKE: booleanFlag,
  /** The fake forecast service's port; 0 takes a free one. */
  WEATHER_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  /** How long a forecast request may take before the lists say "forecast unavailable". */
  WEATHER_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(3000),
}).superRefine((env, issues) => {
  if (env.PHOTO_STORE === 's3' && !env.S3_BUCKET) {
    issues.addIssue({ code: 'custom', path: ['S3_BUCKET'], message: 'PHOTO_STORE=s3 needs S3_BUCKET (and usually S3_ENDPOINT and keys)' });
  }
  if (env.MAIL_FAKE && env.SMTP_HOST) {
    issues.addIssue({ code: 'custom', path: ['MAIL_FAKE'], message: 'MAIL_FAKE=1 and SMTP_HOST cannot both be set: choose the fake mailbox or a real SMTP server' });
  }
  if (env.WEATHER_FAKE && env.WEATHER_URL) {
    issues.addIssue({ code: 'custom', path: ['WEATHER_FAKE'], message: 'WEATHER_FAKE=1 and WEATHER_URL cannot both be set: choose the fake forecast or a real service' });
  }
  if (env.NODE_ENV === 'production' && !env.MAIL_FAKE && !env.SMTP_HOST) {
    issues.addIssue({ code: 'custom', path: ['SMTP_HOST'], message: 'Set SMTP_HOST (and PUBLIC_URL) to send mail, or MAIL_FAKE=1 for the local fake mailbox' });
  }
  // The fake mailbox shows every reset, invitation and hand-off link: it must not be reachable
  // from another machine, whatever the request claims. mailFromEnv and weatherFromEnv use the
  // fakes by default in development, so that counts too.
  if (!isLoopbackHost(env.HOST)) {
    if (env.MAIL_FAKE || (!env.SMTP_HOST && env.NODE_ENV !== 'production')) {
      issues.addIssue({
        code: 'custom',
        path: ['HOST'],
        message: `HOST=${env.HOST} listens beyond this machine while the fake mailbox is on (MAIL_FAKE=1, or development without SMTP_HOST): set SMTP_HOST (with PUBLIC_URL) for real mail, or HOST=127.0.0.1`,
      });
    }
    if (env.WEATHER_FAKE || (!env.WEATHER_URL && env.NODE_ENV !== 'production')) {
      issues.addIssue({
        code: 'custom',
        path: ['HOST'],
        message: `HOST=${env.HOST} listens beyond this machine while the fake forecast is on (WEATHER_FAKE=1, or development without WEATHER_URL): set WEATHER_URL, leave WEATHER_FAKE unset in production, or HOST=127.0.0.1`,
      });
    }
  }
});

export type ServerEnv = z.infer<typeof envSchema> & { DATABASE_URL: string };

export function readEnv(source: NodeJS.ProcessEnv = process.env): ServerEnv {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Invalid server environment: ${problems}`);
  }
  return { ...parsed.data, DATABASE_URL: databaseUrl() };
}
