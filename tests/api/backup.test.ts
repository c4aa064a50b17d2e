import { execFile } from 'node:child_process';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDatabase } from '../../db/client';
import { coldNightAlerts, memberships } from '../../db/schema';
import { localDiskStore } from '../../server/photos/store';
import { insertHandoff } from '../factories/handoffs';
import { insertInvitation } from '../factories/mail';
import { insertPhoto } from '../factories/photos';
import { buildBloomInput, buildRecords, daysAgo } from '../factories/records';
import { buildCollectionWithMembers, insertUser, sessionCookieFor } from '../factories/users';
import { testDatabaseUrl, testDb } from './support/database';
import { databaseState } from './support/hostile';
import { browser, startTestServer, type TestServer } from './support/server';

/**
 * The documented backup (scripts/backup.sh, pg_dump custom format) and restore
 * (scripts/restore.sh into a fresh database), end to end: every table comes back with the
 * same rows, and the real app signs in and reads against the restored database.
 */
const run = promisify(execFile);
const ROOT = path.join(__dirname, '..', '..');
const PASSWORD = 'pseudobulb-ladder-77';
const restoredName = `${new URL(testDatabaseUrl()).pathname.slice(1)}_restored_${process.pid}`;
const restoredUrl = (() => {
  const u = new URL(testDatabaseUrl());
  u.pathname = `/${restoredName}`;
  return u.toString();
})();

let workDir: string;
let server: TestServer;
let seeded: { email: string; collectionId: string; plantTag: string; photoId: string };

async function admin<T>(work: (sql: postgres.Sql) => Promise<T>): Promise<T> {
  const u = new URL(testDatabaseUrl());
  u.pathname = '/postgres';
  const sql = postgres(u.toString(), { max: 1, onnotice: () => {} });
  try {
    return await work(sql);
  } finally {
    await sql.end();
  }
}

const script = (name: string, args: string[]) =>
  run('bash', [path.join(ROOT, 'scripts', name), ...args], { cwd: ROOT, env: { ...process.env, DATABASE_URL: testDatabaseUrl() }, timeout: 60_000 });

beforeAll(async () => {
  workDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-backup-'));
  await admin((sql) => sql.unsafe(`drop database if exists ${restoredName} with (force)`));
  const photoStore = localDiskStore(path.join(workDir, 'photos'));
  server = await startTestServer({ photoStore });

  // A collection with every kind of record, owned by an account with a real password.
  const world = await buildCollectionWithMembers(testDb(), 'Backed-up bench');
  const user = await insertUser(testDb(), { password: PASSWORD, displayName: 'Restorer' });
  await testDb().insert(memberships).values({ collectionId: world.collectionId, userId: user.id, role: 'owner' });
  const records = await buildRecords(testDb(), world.collectionId, world.people.grower.id);
  const photo = await insertPhoto(testDb(), photoStore, { collectionId: world.collectionId, userId: world.people.grower.id, role: 'grower' }, records.lead.id);
  await insertInvitation(testDb(), world.collectionId, user.id);
  await insertHandoff(testDb(), { collectionId: world.collectionId, plantId: records.plant.id, sentBy: user.id, recipientEmail: 'friend@example.test' });
  await testDb().insert(coldNightAlerts).values({ collectionId: world.collectionId, night: daysAgo(2), claimedBy: 'backup-test', sent: 1 });
  const owner = browser(server.url, await sessionCookieFor(testDb(), user.id));
  const at = (p: string) => `/api/collections/${world.collectionId}${p}`;
  expect((await owner.put(at(`/leads/${records.lead.id}/bloom`), buildBloomInput())).status).toBe(201);
  expect((await owner.post(at(`/leads/${records.lead.id}/sheath`), { date: daysAgo(0), sheath: 'budded', heightMm: 55 })).status).toBe(201);
  expect((await owner.get(at('/digest'))).status).toBe(200);
  expect((await owner.put(at('/digest'), { optedOut: true })).status).toBe(200);
  seeded = { email: user.email, collectionId: world.collectionId, plantTag: records.plant.tag, photoId: photo.id };
}, 60_000);

afterAll(async () => {
  await server?.close();
  await admin((sql) => sql.unsafe(`drop database if exists ${restoredName} with (force)`));
  await fs.rm(workDir, { recursive: true, force: true });
});

describe('backup and restore', () => {
  it('restores every table into a fresh database, and the app signs in against it', async () => {
    const file = path.join(workDir, 'nested', 'sympodia.dump');
    const backup = await script('backup.sh', [file]);
    expect(backup.stdout).toContain(file);
    const header = (await fs.readFile(file)).subarray(0, 5).toString('latin1');
    expect(header).toBe('PGDMP'); // pg_dump's custom format

    const restore = await script('restore.sh', [file, restoredName]);
    expect(restore.stdout).toContain(`created database ${restoredName}`);

    const restored = createDatabase(restoredUrl, { max: 2 });
    try {
      const source = await databaseState(testDb());
      const copy = await databaseState(restored.db);
      // Every kind of record made it into the backup in the first place.
      for (const table of ['users', 'collections', 'memberships', 'areas', 'plants', 'leads', 'measurements', 'bloom_records', 'care_entries', 'photos', 'invitations', 'division_handoffs', 'cold_night_alerts', 'digest_subscriptions', 'sessions']) {
        expect(Number(source[table]?.split(':')[0]), table).toBeGreaterThan(0);
      }
      expect(Object.keys(copy).sort()).toEqual(Object.keys(source).sort());
      expect(copy).toEqual(source);

      // The real app, pointed at the restored database.
      const app = await startTestServer({ db: restored.db, photoStore: localDiskStore(path.join(workDir, 'photos')) });
      try {
        const person = browser(app.url);
        const signIn = await person.post('/api/auth/sign-in', { email: seeded.email, password: PASSWORD });
        expect(signIn.status, JSON.stringify(signIn.body)).toBe(200);
        expect(signIn.body.collections.map((c: { id: string }) => c.id)).toContain(seeded.collectionId);
        const plants = await person.get(`/api/collections/${seeded.collectionId}/plants`);
        expect(plants.body.items.map((p: { tag: string }) => p.tag)).toContain(seeded.plantTag);
        const thumb = await person.get(`/api/collections/${seeded.collectionId}/photos/${seeded.photoId}/thumb`);
        expect(thumb.status).toBe(200);
        expect(thumb.headers['content-type']).toMatch(/image\/webp/);
      } finally {
        await app.close();
      }
    } finally {
      await restored.close();
    }
  }, 120_000);

  it('refuses to restore over a database that holds tables, unless told to with --force', async () => {
    const file = path.join(workDir, 'second.dump');
    await script('backup.sh', [file]);
    const restored = createDatabase(restoredUrl, { max: 1 });
    try {
      const before = await databaseState(restored.db);
      const refused = await script('restore.sh', [file, restoredName]).then(
        () => null,
        (error: { code: number; stderr: string }) => error,
      );
      expect(refused?.code).toBe(3);
      expect(refused?.stderr).toMatch(/refusing to overwrite/);
      expect(await databaseState(restored.db)).toEqual(before);

      const forced = await script('restore.sh', [file, restoredName, '--force']);
      expect(forced.stdout).toMatch(/replacing the contents/);
      expect(await databaseState(restored.db)).toEqual(await databaseState(testDb()));
    } finally {
      await restored.close();
    }
  }, 120_000);

  it('refuses a file that is not a backup, before touching any database', async () => {
    const junk = path.join(workDir, 'not-a-backup.dump');
    await fs.writeFile(junk, 'just some text');
    const name = `${restoredName}_never`;
    const refused = await script('restore.sh', [junk, name]).then(
      () => null,
      (error: { code: number; stderr: string }) => error,
    );
    expect(refused?.code).toBe(2);
    expect(refused?.stderr).toMatch(/not a pg_dump custom-format backup/);
    const exists = await admin((sql) => sql`select 1 from pg_database where datname = ${name}`);
    expect(exists).toHaveLength(0);
  });
});
