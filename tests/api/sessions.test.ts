import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memberships, sessions } from '../../db/schema';
import { createAuth, SESSION_LIFETIME } from '../../server/auth';
import { sessionValidator } from '../../server/middleware/session';
import { buildCollectionWithMembers, insertUser } from '../factories/users';
import { testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

/**
 * The session check every API request makes (server/middleware/session.ts): one query for the
 * session, its user and the membership of the collection in the path, with Lucia's rules for
 * expiry and extension. Held to Lucia's own `validateSession` on twin sessions, and over HTTP.
 */

let server: TestServer;
let world: Awaited<ReturnType<typeof buildCollectionWithMembers>>;

beforeAll(async () => {
  server = await startTestServer();
  world = await buildCollectionWithMembers(testDb(), 'Sessions bench');
});
afterAll(async () => {
  await server.close();
});

const DAY = 86_400_000;
const auth = () => createAuth(testDb());

/** A session of `userId` that expires `inMs` from now (negative: already expired). */
async function sessionExpiringIn(userId: string, inMs: number): Promise<string> {
  const session = await auth().createSession(userId, {});
  await testDb().update(sessions).set({ expiresAt: new Date(Date.now() + inMs) }).where(eq(sessions.id, session.id));
  return session.id;
}

async function storedExpiry(sessionId: string): Promise<Date | null> {
  const [row] = await testDb().select({ expiresAt: sessions.expiresAt }).from(sessions).where(eq(sessions.id, sessionId));
  return row?.expiresAt ?? null;
}

const cookieOf = (res: { headers: Record<string, unknown> }) =>
  ((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith('sympodia_session='));

describe('the one-query session check gives what Lucia gives', () => {
  const cases = [
    { name: 'a new session', inMs: SESSION_LIFETIME.milliseconds() - 1000 },
    { name: 'a session past half its life (extended)', inMs: 3 * DAY },
    { name: 'an expired session (deleted)', inMs: -1000 },
  ];
  for (const { name, inMs } of cases) {
    it(name, async () => {
      const userId = world.people.grower.id;
      const ours = await sessionExpiringIn(userId, inMs);
      const lucias = await sessionExpiringIn(userId, inMs);
      const validate = sessionValidator(auth(), testDb());
      const [mine, theirs] = await Promise.all([validate(ours, null), auth().validateSession(lucias)]);
      if (!theirs.session) {
        expect(mine).toBeNull();
        expect(await storedExpiry(lucias)).toBeNull();
        expect(await storedExpiry(ours)).toBeNull();
        return;
      }
      expect(mine).not.toBeNull();
      expect(mine!.user).toEqual(theirs.user);
      expect(mine!.session.fresh).toBe(theirs.session.fresh);
      expect(mine!.session.userId).toBe(theirs.session.userId);
      expect(Object.keys(mine!.session).sort()).toEqual(Object.keys(theirs.session).sort());
      expect(Math.abs(mine!.session.expiresAt.getTime() - theirs.session.expiresAt.getTime())).toBeLessThan(2000);
      // Both wrote the same expiry back (or both left it as it was).
      const [mineStored, theirsStored] = [await storedExpiry(ours), await storedExpiry(lucias)];
      expect(Math.abs(mineStored!.getTime() - theirsStored!.getTime())).toBeLessThan(2000);
      expect(Math.abs(mineStored!.getTime() - mine!.session.expiresAt.getTime())).toBeLessThan(1000);
    });
  }

  it('an unknown id is no session, for Lucia and for us', async () => {
    const validate = sessionValidator(auth(), testDb());
    expect(await validate('no-such-session-id', world.collectionId)).toBeNull();
    expect((await auth().validateSession('no-such-session-id')).session).toBeNull();
  });

  it("brings the user's membership of the collection asked for, and only that one", async () => {
    const validate = sessionValidator(auth(), testDb());
    const owner = await sessionExpiringIn(world.people.owner.id, 20 * DAY);
    expect((await validate(owner, world.collectionId))!.membership).toEqual({ collectionId: world.collectionId, userId: world.people.owner.id, role: 'owner' });
    expect((await validate(owner, world.otherCollectionId))!.membership).toBeNull();
    expect((await validate(owner, null))!.membership).toBeNull();
    const outsider = await sessionExpiringIn(world.people.outsider.id, 20 * DAY);
    expect((await validate(outsider, world.collectionId))!.membership).toBeNull();
    expect((await validate(outsider, world.otherCollectionId))!.membership?.role).toBe('owner');
  });
});

describe('over HTTP', () => {
  it('a session past half its life is extended on a collection route, and its cookie renewed', async () => {
    const id = await sessionExpiringIn(world.people.viewer.id, 2 * DAY);
    const res = await browser(server.url, `sympodia_session=${id}`).get(`/api/collections/${world.collectionId}`);
    expect(res.status).toBe(200);
    expect(cookieOf(res)).toMatch(new RegExp(`^sympodia_session=${id};`));
    const extended = await storedExpiry(id);
    expect(extended!.getTime()).toBeGreaterThan(Date.now() + SESSION_LIFETIME.milliseconds() - 60_000);
  });

  it('a session in its first half is left as it was, with no new cookie', async () => {
    const id = await sessionExpiringIn(world.people.viewer.id, 25 * DAY);
    const before = await storedExpiry(id);
    const res = await browser(server.url, `sympodia_session=${id}`).get(`/api/collections/${world.collectionId}/attention`);
    expect(res.status).toBe(200);
    expect(cookieOf(res)).toBeUndefined();
    expect((await storedExpiry(id))!.getTime()).toBe(before!.getTime());
  });

  it('an expired session is refused (401), deleted, and its cookie cleared', async () => {
    const id = await sessionExpiringIn(world.people.viewer.id, -1000);
    const res = await browser(server.url, `sympodia_session=${id}`).get(`/api/collections/${world.collectionId}`);
    expect(res.status).toBe(401);
    expect(cookieOf(res)).toMatch(/^sympodia_session=;/);
    expect(await storedExpiry(id)).toBeNull();
  });

  it('a membership removed or lowered takes effect on the very next request', async () => {
    const user = await insertUser(testDb());
    await testDb().insert(memberships).values({ collectionId: world.collectionId, userId: user.id, role: 'owner' });
    const person = browser(server.url, `sympodia_session=${await sessionExpiringIn(user.id, 25 * DAY)}`);
    const rename = () => person.patch(`/api/collections/${world.collectionId}`, { name: 'Sessions bench' });
    expect((await rename()).status).toBe(200);
    await testDb().update(memberships).set({ role: 'viewer' }).where(eq(memberships.userId, user.id));
    expect((await rename()).status).toBe(403);
    expect((await person.get(`/api/collections/${world.collectionId}`)).status).toBe(200);
    await testDb().delete(memberships).where(eq(memberships.userId, user.id));
    expect((await person.get(`/api/collections/${world.collectionId}`)).status).toBe(404);
  });

  it('a percent-encoded collection id is read as the router decodes it, and answers as the plain one does', async () => {
    const encoded = world.collectionId.replace(/^./, (c) => `%${c.charCodeAt(0).toString(16)}`);
    expect(encoded).not.toBe(world.collectionId);
    const member = browser(server.url, world.people.viewer.cookie);
    expect((await member.get(`/api/collections/${encoded}`)).status).toBe(200);
    expect((await browser(server.url, world.people.outsider.cookie).get(`/api/collections/${encoded}`)).status).toBe(404);
  });

  it('another collection in the path is judged by the membership of that one', async () => {
    const outsider = browser(server.url, world.people.outsider.cookie);
    expect((await outsider.get(`/api/collections/${world.collectionId}/attention`)).status).toBe(404);
    expect((await outsider.get(`/api/collections/${world.otherCollectionId}/attention`)).status).toBe(200);
  });
});
