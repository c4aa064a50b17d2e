import { z } from 'zod';
import { databaseUrl } from '../db/url';

const booleanFlag = z
  .enum(['0', '1', 'true', 'false'])
  .optional()
  .transform((value) => value === '1' || value === 'true');

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(1).max(65535).default(8790),
  WEB_ROOT: z.string().optional(),
  DEV_ORIGINS: z
    .string()
    .optional()
    .transform((value) => (value ? value.split(',').map((o) => o.trim()).filter(Boolean) : [])),
  TRUST_PROXY: booleanFlag,
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  SEED_DEMO: booleanFlag,
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
