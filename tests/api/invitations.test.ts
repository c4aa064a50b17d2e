import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { invitations, memberships } from '../../db/schema';
import { hashToken } from '../../server/mail/tokens';
import { insertInvitation, mailTo, tokenFrom } from '../factories/mail';
import { buildCollectionWithMembers, buildSignUp, insertUser, sessionCookieFor } from '../factories/users';
import { rowCounts, testDb } from './support/database';
import { browser, signUpThroughMail, startTestServer, type TestServer } from './support/server';

let server: TestServer;
let fx: Awaited<ReturnType<typeof buildCollectionWithMembers>>;
let owner: ReturnType<typeof browser>;
const base = () => `/api/collections/${fx.collectionId}/invitations`;

beforeAll(async () => {
  server = await startTestServer();
  fx = await buildCollectionWithMembers(testDb(), 'Cattleya bench');
  owner = browser(server.url, fx.people.owner.cookie);
});
afterAll(async () => {
  await server.close();
});

async function roleOf(collectionId: string, userId: string) {
  const [row] = await testDb()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.collectionId, collectionId), eq(memberships.userId, userId)));
  return row?.role ?? null;
}

describe('invitations', () => {
  it('owner invites by e-mail; the invitee signs up through the link and joins with the invited role', async () => {
    const email = 'partner-waters@example.test';
    const res = await owner.post(base(), { email: 'Partner-Waters@Example.test', role: 'grower' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ email, role: 'grower' });

    const [message] = await mailTo(server.mail, email);
    expect(message.subject).toContain('Cattleya bench');
    expect(message.html).toContain('Cattleya bench');
    const token = tokenFrom(message, 'invite');
    expect(new URL(message.text.match(/http\S+\/invite\/\S+/)![0]).origin).toBe(server.url);

    // Only the hash is stored.
    const [stored] = await testDb().select().from(invitations).where(eq(invitations.id, res.body.id));
    expect(stored.tokenHash).toBe(hashToken(token));
    expect(JSON.stringify(stored)).not.toContain(token);
    expect(stored.expiresAt.getTime() - stored.createdAt.getTime()).toBeGreaterThan(6.9 * 86_400_000);

    const anonymous = browser(server.url);
    const preview = await anonymous.get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({ collectionName: 'Cattleya bench', role: 'grower', email });

    const invitee = browser(server.url);
    await signUpThroughMail(server, buildSignUp({ email }), invitee);
    const accepted = await invitee.post(`/api/invitations/${token}/accept`);
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
    expect(accepted.body).toEqual({ collectionId: fx.collectionId, role: 'grower' });

    const session = await invitee.get('/api/session');
    expect(session.body.me.collections).toContainEqual({ id: fx.collectionId, name: 'Cattleya bench', role: 'grower' });
    expect((await invitee.get(`/api/collections/${fx.collectionId}/plants`)).status).toBe(200);

    // The link works once.
    const before = await rowCounts();
    const again = await browser(server.url, fx.people.outsider.cookie).post(`/api/invitations/${token}/accept`);
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('invitation_used');
    expect(await rowCounts()).toEqual(before);
    expect(await roleOf(fx.collectionId, fx.people.outsider.id)).toBeNull();
    expect((await anonymous.get(`/api/invitations/${token}`)).status).toBe(410);
  });

  it('refuses an expired link and changes nothing', async () => {
    const invitation = await insertInvitation(testDb(), fx.collectionId, fx.people.owner.id, { expiresAt: new Date(Date.now() - 1000) });
    const before = await rowCounts();
    const res = await browser(server.url, fx.people.outsider.cookie).post(`/api/invitations/${invitation.token}/accept`);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('invitation_expired');
    expect((await browser(server.url).get(`/api/invitations/${invitation.token}`)).body.error.code).toBe('invitation_expired');
    expect(await rowCounts()).toEqual(before);
    expect(await roleOf(fx.collectionId, fx.people.outsider.id)).toBeNull();
  });

  it('owner sees pending invitations, revokes one after which its link is refused', async () => {
    const created = await owner.post(base(), { email: 'mentor@example.test', role: 'viewer' });
    expect(created.status).toBe(201);
    const token = tokenFrom((await mailTo(server.mail, 'mentor@example.test'))[0], 'invite');
    const expired = await insertInvitation(testDb(), fx.collectionId, fx.people.owner.id, { expiresAt: new Date(Date.now() - 1000) });

    const pending = await owner.get(base());
    expect(pending.status).toBe(200);
    const emails = pending.body.map((i: { email: string }) => i.email);
    expect(emails).toContain('mentor@example.test');
    expect(emails).not.toContain(expired.email);
    expect(emails).not.toContain('partner-waters@example.test');

    expect((await owner.delete(`${base()}/${created.body.id}`)).status).toBe(204);
    expect((await owner.get(base())).body.map((i: { email: string }) => i.email)).not.toContain('mentor@example.test');
    expect((await owner.delete(`${base()}/${created.body.id}`)).status).toBe(404);

    const before = await rowCounts();
    const res = await browser(server.url, fx.people.outsider.cookie).post(`/api/invitations/${token}/accept`);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('invitation_revoked');
    expect(await rowCounts()).toEqual(before);
  });

  it('viewer and grower cannot invite, list or revoke; nothing is stored or mailed', async () => {
    const invitation = await insertInvitation(testDb(), fx.collectionId, fx.people.owner.id);
    const before = await rowCounts();
    for (const role of ['viewer', 'grower'] as const) {
      const client = browser(server.url, fx.people[role].cookie);
      const res = await client.post(base(), { email: `from-${role}@example.test`, role: 'viewer' });
      expect(res.status).toBe(403);
      expect((await client.get(base())).status).toBe(403);
      expect((await client.delete(`${base()}/${invitation.id}`)).status).toBe(403);
    }
    expect(await rowCounts()).toEqual(before);
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(server.mail.to('from-viewer@example.test')).toHaveLength(0);
    expect(server.mail.to('from-grower@example.test')).toHaveLength(0);
  });

  it('an existing member keeps the higher role; a lower one is raised', async () => {
    const grower = await insertInvitation(testDb(), fx.collectionId, fx.people.owner.id, { role: 'viewer' });
    const res = await browser(server.url, fx.people.grower.cookie).post(`/api/invitations/${grower.token}/accept`);
    expect(res.status).toBe(200);
    expect(res.body.role).toBe('grower');
    expect(await roleOf(fx.collectionId, fx.people.grower.id)).toBe('grower');

    const raise = await insertInvitation(testDb(), fx.collectionId, fx.people.owner.id, { role: 'owner' });
    expect((await browser(server.url, fx.people.viewer.cookie).post(`/api/invitations/${raise.token}/accept`)).body.role).toBe('owner');
    expect(await roleOf(fx.collectionId, fx.people.viewer.id)).toBe('owner');
  });

  it('refuses bad input with the field and reason, and a malformed or unknown token cleanly', async () => {
    const res = await owner.post(base(), { email: 'not an address', role: 'gardener' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.map((d: { field: string }) => d.field).sort()).toEqual(['email', 'role']);
    const user = await insertUser(testDb());
    const client = browser(server.url, await sessionCookieFor(testDb(), user.id));
    expect((await client.post('/api/invitations/short/accept')).status).toBe(400);
    const unknown = await client.post(`/api/invitations/${'A'.repeat(43)}/accept`);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.code).toBe('invitation_unknown');
    expect((await browser(server.url).post(`/api/invitations/${'A'.repeat(43)}/accept`)).status).toBe(401);
    expect((await owner.post(base(), { email: fx.people.grower.email, role: 'viewer' })).status).toBe(409);
  });
});

describe('invitation mail failure', () => {
  it('answers 503 and keeps no invitation when the mail cannot be sent', async () => {
    const down = await startTestServer({ mailer: { publicUrl: 'http://127.0.0.1', send: async () => Promise.reject(new Error('connection refused')) } });
    try {
      const before = await rowCounts();
      const res = await browser(down.url, fx.people.owner.cookie).post(`/api/collections/${fx.collectionId}/invitations`, { email: 'unreachable@example.test', role: 'viewer' });
      expect(res.status).toBe(503);
      expect(res.body.error.code).toBe('mail_unavailable');
      expect(await rowCounts()).toEqual(before);
    } finally {
      await down.close();
    }
  });
});
