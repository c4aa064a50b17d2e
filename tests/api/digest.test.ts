import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { collections, digestRuns, digestSubscriptions, memberships, users } from '../../db/schema';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../db/seed/demo-accounts';
import { seedDemo } from '../../db/seed';
import { linksIn } from '../../server/mail/links';
import { createSmtpMailer, type Mailer } from '../../server/mail/mailer';
import { DIGEST_KINDS, digestPeriod, runDigest } from '../../server/services/digest';
import { mailTo } from '../factories/mail';
import { testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

let server: TestServer;
let mailer: Mailer;
let collectionId: string;
const [ownerAccount, growerAccount, viewerAccount] = DEMO_ACCOUNTS;
const NOW = new Date();

async function signedIn(email: string) {
  const client = browser(server.url);
  expect((await client.post('/api/auth/sign-in', { email, password: DEMO_PASSWORD })).status).toBe(200);
  return client;
}

beforeAll(async () => {
  server = await startTestServer();
  expect(await seedDemo(testDb(), { log: () => {} })).toBe(true);
  [{ id: collectionId }] = await testDb().select({ id: collections.id }).from(collections);
  mailer = createSmtpMailer({ host: server.mail.host, port: server.mail.port, secure: false, from: 'Sympodia <digest@sympodia.invalid>', publicUrl: server.url });
});
afterAll(async () => {
  await server.close();
});

describe('weekly digest', () => {
  it('names the period by ISO week', () => {
    expect(digestPeriod(new Date('2026-12-01T10:00:00Z'))).toBe('2026-W49');
    expect(digestPeriod(new Date('2027-01-01T10:00:00Z'))).toBe('2026-W53');
    expect(digestPeriod(new Date('2024-12-30T00:00:00Z'))).toBe('2025-W01');
  });

  it('one of two racing runners sends it, once per member; an opted-out member gets none; the mail matches the attention list', async () => {
    const viewer = await signedIn(viewerAccount.email);
    expect((await viewer.get(`/api/collections/${collectionId}/digest`)).body).toEqual({ optedOut: false });
    expect((await viewer.put(`/api/collections/${collectionId}/digest`, { optedOut: true })).body).toEqual({ optedOut: true });
    expect((await viewer.put(`/api/collections/${collectionId}/digest`, { optedOut: 'yes' })).status).toBe(400);

    const [a, b] = await Promise.all([
      runDigest({ db: testDb(), mailer }, { now: NOW, runner: 'process-a' }),
      runDigest({ db: testDb(), mailer }, { now: NOW, runner: 'process-b' }),
    ]);
    expect([a.claimed, b.claimed].sort()).toEqual([false, true]);
    expect(a.sent + b.sent).toBe(2);
    const [run] = await testDb().select().from(digestRuns).where(eq(digestRuns.period, digestPeriod(NOW)));
    expect(run.sent).toBe(2);
    expect(run.finishedAt).not.toBeNull();
    // A later check in the same week sends nothing.
    expect((await runDigest({ db: testDb(), mailer }, { now: NOW })).claimed).toBe(false);

    const [ownerMail] = await mailTo(server.mail, ownerAccount.email);
    await mailTo(server.mail, growerAccount.email);
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(server.mail.to(ownerAccount.email)).toHaveLength(1);
    expect(server.mail.to(growerAccount.email)).toHaveLength(1);
    expect(server.mail.to(viewerAccount.email)).toHaveLength(0);

    // The engine's own answer, as the Today screen gets it.
    const owner = await signedIn(ownerAccount.email);
    const attention = await owner.get(`/api/collections/${collectionId}/attention?date=${NOW.toISOString().slice(0, 10)}`);
    expect(attention.status).toBe(200);
    const expected = (attention.body.items as Array<{ kind: string; plantTag: string; leadLabel: string; reason: string; story: { chip: { label: string } } }>).filter((i) =>
      DIGEST_KINDS.has(i.kind as never),
    );
    expect(expected.length).toBeGreaterThan(0);
    const listed = ownerMail.text.split('\n').filter((line) => line.startsWith('- '));
    expect(listed).toHaveLength(expected.length);
    for (const item of expected) {
      // The lead's state and reason as Today tells them (the one story per lead).
      expect(listed.some((line) => line.startsWith(`- ${item.plantTag}, lead ${item.leadLabel} (${item.story.chip.label}): ${item.reason}`))).toBe(true);
    }
    expect(ownerMail.html).toContain('<li>');
    expect((ownerMail.html!.match(/<li>/g) ?? []).length).toBe(expected.length);
    expect(ownerMail.text).toContain(`${server.url}/`);
    expect(ownerMail.headers['list-unsubscribe-post']).toBe('List-Unsubscribe=One-Click');
  });

  it('the unsubscribe link works without signing in and stops the next week’s mail', async () => {
    const [growerMail] = server.mail.to(growerAccount.email);
    const link = linksIn(growerMail.text).find((l) => l.includes('/digest/unsubscribe/'))!;
    expect(link).toBeDefined();
    const path = new URL(link).pathname;

    // Following the link only asks; mail scanners that open links change nothing.
    const page = await browser(server.url).get(path);
    expect(page.status).toBe(200);
    expect(page.text).toContain('<form method="post"');
    const [user] = await testDb().select({ id: users.id }).from(users).where(eq(users.email, growerAccount.email));
    const subscription = () =>
      testDb()
        .select({ optedOut: digestSubscriptions.optedOut })
        .from(digestSubscriptions)
        .where(and(eq(digestSubscriptions.collectionId, collectionId), eq(digestSubscriptions.userId, user.id)));
    expect((await subscription())[0].optedOut).toBe(false);

    const done = await browser(server.url).post(path);
    expect(done.status).toBe(200);
    expect(done.text).toContain('Weekly digest stopped');
    expect((await subscription())[0].optedOut).toBe(true);
    expect((await browser(server.url).get('/digest/unsubscribe/not-a-known-key-at-all')).status).toBe(404);

    const nextWeek = new Date(NOW.getTime() + 7 * 86_400_000);
    const result = await runDigest({ db: testDb(), mailer }, { now: nextWeek });
    expect(result.claimed).toBe(true);
    expect(result.sent).toBe(1);
    await mailTo(server.mail, ownerAccount.email, 2);
    expect(server.mail.to(growerAccount.email)).toHaveLength(1);

    // Members stay members; only the mail stopped.
    expect((await testDb().select().from(memberships).where(eq(memberships.userId, user.id))).length).toBe(1);
  });
});
