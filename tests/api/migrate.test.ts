import { readFileSync } from 'node:fs';
import path from 'node:path';
import postgres from 'postgres';
import { afterAll, describe, expect, it } from 'vitest';
import { runMigrations } from '../../db/migrate';
import { testDatabaseUrl } from './support/database';

const journal = JSON.parse(readFileSync(path.join(__dirname, '..', '..', 'migrations', 'meta', '_journal.json'), 'utf8')) as {
  entries: unknown[];
};

// A database of its own, made empty for this file, so the migrations really run here.
const base = new URL(testDatabaseUrl());
const name = `${base.pathname.slice(1)}_migrate`;
const fresh = new URL(base);
fresh.pathname = `/${name}`;
const admin = postgres(base.toString(), { max: 1, onnotice: () => {} });

afterAll(async () => {
  await admin.unsafe(`drop database if exists "${name}" with (force)`);
  await admin.end();
});

describe('migrations', () => {
  it('two servers starting at once on an empty database both finish, and each migration is applied once', async () => {
    await admin.unsafe(`drop database if exists "${name}" with (force)`);
    await admin.unsafe(`create database "${name}"`);
    await expect(Promise.all([runMigrations(fresh.toString()), runMigrations(fresh.toString())])).resolves.toBeDefined();
    const db = postgres(fresh.toString(), { max: 1, onnotice: () => {} });
    try {
      const [{ n }] = await db<{ n: number }[]>`select count(*)::int as n from drizzle.__drizzle_migrations`;
      expect(n).toBe(journal.entries.length);
      const [{ plants }] = await db<{ plants: string | null }[]>`select to_regclass('public.plants')::text as plants`;
      expect(plants).toBe('plants');
    } finally {
      await db.end();
    }
  });
});
