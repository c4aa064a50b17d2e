import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { eq, sql } from 'drizzle-orm';
import S3rver from 's3rver';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../db/seed';
import { DEMO_ACCOUNTS, DEMO_COLLECTION_NAME, DEMO_PASSWORD } from '../../db/seed/demo-accounts';
import { collections, digestRuns, leads } from '../../db/schema';
import { startFakeSmtp, type FakeSmtpServer } from '../../server/mail/fake-smtp';
import { digestItems, digestPeriod } from '../../server/services/digest';
import { cameraJpeg } from '../factories/photos';
import { testDatabaseUrl, testDb } from './support/database';
import { freePorts, signIn, startServerProcess, type ServerProcess } from './support/processes';

// Two real server processes (as production runs them) on two loopback ports, sharing one
// PostgreSQL database, one S3-compatible store (s3rver) and one SMTP server (the fake).
const BUCKET = 'sympodia-photos';

let s3: S3rver;
let s3Dir: string;
let smtp: FakeSmtpServer;
let a: ServerProcess;
let b: ServerProcess;
let collectionId: string;

const digestMails = () => smtp.messages.filter((m) => m.text.includes('This week in') && m.headers['list-unsubscribe']);

beforeAll(async () => {
  await seedDemo(testDb(), { log: () => {} });
  const [collection] = await testDb().select({ id: collections.id }).from(collections).where(eq(collections.name, DEMO_COLLECTION_NAME));
  collectionId = collection.id;

  s3Dir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-two-servers-s3-'));
  s3 = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: s3Dir, configureBuckets: [{ name: BUCKET, configs: [] }] });
  const { port: s3Port } = (await s3.run()) as { port: number };
  smtp = await startFakeSmtp(0);

  const env = (port: number) => ({
    NODE_ENV: 'production',
    DATABASE_URL: testDatabaseUrl(),
    LOG_LEVEL: 'info',
    SEED_DEMO: '0',
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    PHOTO_STORE: 's3',
    S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
    S3_BUCKET: BUCKET,
    S3_REGION: 'us-east-1',
    S3_ACCESS_KEY_ID: 'S3RVER',
    S3_SECRET_ACCESS_KEY: 'S3RVER',
    S3_FORCE_PATH_STYLE: '1',
    SMTP_HOST: smtp.host,
    SMTP_PORT: String(smtp.port),
    MAIL_FAKE: undefined,
    // Both processes check for this week's digest a few seconds after they start (not 30 s).
    DIGEST_FIRST_CHECK_SECONDS: '6',
  });
  // Started together, so their first digest checks fall at (nearly) the same moment.
  const ports = await freePorts(2);
  [a, b] = await Promise.all(ports.map((port) => startServerProcess({ port, env: env(port), startTimeoutMs: 40_000 })));
}, 90_000);

afterAll(async () => {
  await Promise.all([a?.stop(), b?.stop()]);
  await smtp?.close();
  await s3?.close();
  if (s3Dir) await fs.rm(s3Dir, { recursive: true, force: true });
});

describe('two server processes on one database, one object store and one SMTP server', () => {
  it('a session made on one works on the other', async () => {
    const grower = DEMO_ACCOUNTS.find((x) => x.role === 'grower')!;
    const cookie = await signIn(a.url, grower.email, DEMO_PASSWORD);
    const onB = await fetch(`${b.url}/api/session`, { headers: { cookie } });
    expect(onB.status).toBe(200);
    expect(((await onB.json()) as { me: { user: { email: string } } | null }).me?.user.email).toBe(grower.email);
    const collectionOnB = await fetch(`${b.url}/api/collections/${collectionId}`, { headers: { cookie } });
    expect(collectionOnB.status).toBe(200);

    // Signing out on B ends the session on A too.
    const out = await fetch(`${b.url}/api/auth/sign-out`, { method: 'POST', headers: { cookie, origin: b.url } });
    expect(out.status).toBe(204);
    const afterOnA = await fetch(`${a.url}/api/session`, { headers: { cookie } });
    expect(((await afterOnA.json()) as { me: unknown }).me).toBeNull();
  });

  it('a photo uploaded through one is served by the other', async () => {
    const grower = DEMO_ACCOUNTS.find((x) => x.role === 'grower')!;
    const cookie = await signIn(a.url, grower.email, DEMO_PASSWORD);
    const [lead] = await testDb().select({ id: leads.id }).from(leads).where(eq(leads.collectionId, collectionId)).limit(1);
    const form = new FormData();
    form.set('leadId', lead.id);
    form.set('photo', new Blob([new Uint8Array(await cameraJpeg())], { type: 'image/jpeg' }), 'new-lead.jpg');
    const uploaded = await fetch(`${a.url}/api/collections/${collectionId}/photos`, { method: 'POST', headers: { cookie, origin: a.url }, body: form });
    expect(uploaded.status).toBe(201);
    const photo = (await uploaded.json()) as { id: string };

    for (const size of ['display', 'thumb']) {
      const fromA = await fetch(`${a.url}/api/collections/${collectionId}/photos/${photo.id}/${size}`, { headers: { cookie } });
      const fromB = await fetch(`${b.url}/api/collections/${collectionId}/photos/${photo.id}/${size}`, { headers: { cookie } });
      expect(fromB.status).toBe(200);
      expect(fromB.headers.get('content-type')).toMatch(/^image\/webp/);
      const bytesB = Buffer.from(await fromB.arrayBuffer());
      expect(bytesB.length).toBeGreaterThan(100);
      expect(bytesB.equals(Buffer.from(await fromA.arrayBuffer()))).toBe(true);
    }
  });

  it('sign-in attempts are counted once across both processes', async () => {
    // DEFAULT_AUTH_LIMITS: 10 wrong passwords per account and address per 15 minutes (both processes see
    // this test's 127.0.0.1). Five on each process use it up.
    const email = DEMO_ACCOUNTS.find((x) => x.role === 'viewer')!.email;
    const attempt = (server: ServerProcess) =>
      fetch(`${server.url}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', origin: server.url },
        body: JSON.stringify({ email, password: 'not-the-password-at-all' }),
      }).then((res) => res.status);
    const statuses: number[] = [];
    for (let i = 0; i < 5; i += 1) statuses.push(await attempt(a), await attempt(b));
    expect(statuses).toEqual(Array(10).fill(401));
    // Each process alone has seen only five; the shared count refuses the next on either.
    expect(await attempt(a)).toBe(429);
    expect(await attempt(b)).toBe(429);
  });

  it('the weekly digest is sent once, not once per process', async () => {
    const today = new Date().toISOString().slice(0, 10);
    // The demo collection has leads to look at, so every member is due one digest.
    expect((await digestItems(testDb(), collectionId, today)).length).toBeGreaterThan(0);
    const period = digestPeriod(new Date());
    const deadline = Date.now() + 40_000;
    const bothChecked = () => [a, b].every((s) => /weekly digest (sent|already claimed)/.test(s.output()));
    for (;;) {
      const [run] = await testDb().select().from(digestRuns).where(eq(digestRuns.period, period));
      if (run?.finishedAt && bothChecked() && digestMails().length >= DEMO_ACCOUNTS.length) break;
      if (Date.now() > deadline) throw new Error(`digest not finished in time: ${JSON.stringify(run)}; mails ${digestMails().length}`);
      await new Promise((resolve) => setTimeout(resolve, 250));
    }
    // Give a late second sender time to show itself before counting.
    await new Promise((resolve) => setTimeout(resolve, 1500));

    const runs = await testDb().select({ n: sql<number>`count(*)::int` }).from(digestRuns);
    expect(runs[0].n).toBe(1);
    const senders = [a, b].filter((s) => s.output().includes('weekly digest sent'));
    const skipped = [a, b].filter((s) => s.output().includes('weekly digest already claimed'));
    expect(senders).toHaveLength(1);
    expect(skipped).toHaveLength(1);
    for (const account of DEMO_ACCOUNTS) {
      expect(digestMails().filter((m) => m.to.includes(account.email))).toHaveLength(1);
    }
    expect(digestMails()).toHaveLength(DEMO_ACCOUNTS.length);
  }, 60_000);
});
