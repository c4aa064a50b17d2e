import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memberships, sessions, signUpRequests, users } from '../../db/schema';
import { createRateLimits } from '../../server/middleware/rate-limit';
import { mailTo } from '../factories/mail';
import { buildSignUp, insertUser } from '../factories/users';
import { rowCounts, testDb } from './support/database';
import { browser, signUpThroughMail, signUpTokenIn, startTestServer, type TestServer } from './support/server';

let server: TestServer;

beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('sign-up', () => {
  it('answers 202 and mails a link; the link creates the account, its first collection as owner, and a session', async () => {
    const input = buildSignUp({ email: 'Mixed.Case@Example.TEST ' });
    const person = browser(server.url);
    const requested = await person.post('/api/auth/sign-up', input);
    expect(requested.status).toBe(202);
    expect(requested.body).toEqual({ message: expect.stringMatching(/Check your mail/), email: 'mixed.case@example.test' });
    expect(person.cookie).toBeUndefined();
    const [mail] = await mailTo(server.mail, 'mixed.case@example.test');
    expect(mail.subject).toBe('Finish creating your Sympodia account');
    // Nothing exists for the address until the link is used.
    expect(await testDb().select().from(users).where(eq(users.email, 'mixed.case@example.test'))).toEqual([]);

    const res = await person.post('/api/auth/sign-up/confirm', { token: signUpTokenIn(mail.text) });
    expect(res.status).toBe(201);
    expect(res.body.user.email).toBe('mixed.case@example.test');
    expect(res.body.collections).toHaveLength(1);
    expect(res.body.collections[0].role).toBe('owner');
    expect(res.body.next).toBeNull();

    const [row] = await testDb().select().from(users).where(eq(users.email, 'mixed.case@example.test'));
    expect(row.passwordHash).toMatch(/^\$argon2id\$/);
    expect(row.passwordHash).not.toContain(input.password);
    const owned = await testDb().select().from(memberships).where(eq(memberships.userId, row.id));
    expect(owned).toEqual([expect.objectContaining({ role: 'owner' })]);
    expect(await testDb().select().from(signUpRequests).where(eq(signUpRequests.email, 'mixed.case@example.test'))).toEqual([]);

    const session = await person.get('/api/session');
    expect(session.status).toBe(200);
    expect(session.body.me.user.displayName).toBe(input.displayName);
    // The chosen password signs in.
    expect((await browser(server.url).post('/api/auth/sign-in', { email: input.email, password: input.password })).status).toBe(200);
  });

  it('a link works once, and not after 24 hours; a link for an address that got an account meanwhile is refused (409)', async () => {
    const input = buildSignUp();
    await browser(server.url).post('/api/auth/sign-up', input);
    await browser(server.url).post('/api/auth/sign-up', { ...input, displayName: 'Second try' });
    const [first, second] = await mailTo(server.mail, input.email, 2);
    const confirm = (token: string) => browser(server.url).post('/api/auth/sign-up/confirm', { token });
    expect((await confirm(signUpTokenIn(first.text))).status).toBe(201);
    const again = await confirm(signUpTokenIn(first.text));
    expect([again.status, again.body.error.code]).toEqual([400, 'sign_up_unknown']);
    const other = await confirm(signUpTokenIn(second.text));
    expect([other.status, other.body.error.code]).toEqual([409, 'email_taken']);

    const late = buildSignUp();
    await browser(server.url).post('/api/auth/sign-up', late);
    const [mail] = await mailTo(server.mail, late.email);
    await testDb().update(signUpRequests).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(signUpRequests.email, late.email));
    const expired = await confirm(signUpTokenIn(mail.text));
    expect([expired.status, expired.body.error.code]).toEqual([410, 'sign_up_expired']);
    expect(await testDb().select().from(users).where(eq(users.email, late.email))).toEqual([]);
  });

  it('brings the new account back to the invitation or hand-off page it started from, and nowhere else', async () => {
    const next = `/invite/${'A'.repeat(43)}`;
    const { confirmed } = await signUpThroughMail(server, { ...buildSignUp(), next });
    expect(confirmed.body.next).toBe(next);
    for (const elsewhere of ['https://evil.example/', '//evil.example', '/collection', `/invite/${'A'.repeat(43)}/../../x`]) {
      const res = await browser(server.url).post('/api/auth/sign-up', { ...buildSignUp(), next: elsewhere });
      expect(res.status, elsewhere).toBe(400);
      expect(res.body.error.details[0].field).toBe('next');
    }
  });

  it('sets an HttpOnly, SameSite=Lax session cookie, not Secure over plain http', async () => {
    const { confirmed: res } = await signUpThroughMail(server);
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('sympodia_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
  });

  it('marks the cookie Secure when the request came over HTTPS through a trusted proxy', async () => {
    const proxied = await startTestServer({ trustProxy: 1 });
    try {
      const supertest = (await import('supertest')).default;
      const host = new URL(proxied.url).host;
      const account = { email: buildSignUp().email, password: 'pseudobulb-ladder-77' };
      await insertUser(testDb(), account);
      const ok = await supertest(proxied.url).post('/api/auth/sign-in').set('X-Forwarded-Proto', 'https').set('Origin', `https://${host}`).send(account);
      expect(ok.status).toBe(200);
      const cookie = (ok.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('sympodia_session='))!;
      expect(cookie).toMatch(/; Secure/i);
      // Once the proxy says https, the origin check expects an https Origin too.
      const plainOrigin = await supertest(proxied.url).post('/api/auth/sign-in').set('X-Forwarded-Proto', 'https').set('Origin', `http://${host}`).send(account);
      expect(plainOrigin.status).toBe(403);
    } finally {
      await proxied.close();
    }
  });

  it.each([
    ['a malformed e-mail', { email: 'not-an-address' }, 'email', /valid e-mail/],
    ['a short password', { password: 'short' }, 'password', /at least 10/],
    ['a common password', { password: 'qwertyuiop' }, 'password', /commonly used/],
    ['a missing name', { displayName: undefined }, 'displayName', /name/i],
    ['a number for the e-mail', { email: 12345 }, 'email', /e-mail/i],
    ['an empty name', { displayName: '   ' }, 'displayName', /name/i],
  ])('refuses %s with 400 naming the field, and writes nothing', async (_label, override, field, reason) => {
    const before = await rowCounts();
    const res = await browser(server.url).post('/api/auth/sign-up', { ...buildSignUp(), ...override });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_input');
    const detail = res.body.error.details.find((d: { field: string }) => d.field === field);
    expect(detail?.reason).toMatch(reason);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses a body that is not an object', async () => {
    const before = await rowCounts();
    const res = await browser(server.url).post('/api/auth/sign-up', ['a', 'list']);
    expect(res.status).toBe(400);
    expect(await rowCounts()).toEqual(before);
  });

  it('refuses malformed JSON with 400', async () => {
    const supertest = (await import('supertest')).default;
    const res = await supertest(server.url)
      .post('/api/auth/sign-up')
      .set('Origin', server.url)
      .set('Content-Type', 'application/json')
      .send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('malformed_json');
  });

  it('refuses a body over the size limit with 413 and writes nothing', async () => {
    const before = await rowCounts();
    const res = await browser(server.url).post('/api/auth/sign-up', { ...buildSignUp(), displayName: 'x'.repeat(200_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_large');
    expect(await rowCounts()).toEqual(before);
  });

});

describe('sign-in and sign-out', () => {
  it('signs in with the right password, with a new session id each time', async () => {
    const input = buildSignUp();
    const first = browser(server.url);
    await signUpThroughMail(server, input, first);
    const cookieAfterSignUp = first.cookie;

    const res = await first.post('/api/auth/sign-in', { email: input.email, password: input.password });
    expect(res.status).toBe(200);
    expect(first.cookie).toBeDefined();
    expect(first.cookie).not.toBe(cookieAfterSignUp);
    // The session it replaced no longer works.
    expect((await browser(server.url, cookieAfterSignUp).get('/api/session')).body.me).toBeNull();
    expect((await first.get('/api/session')).body.me).not.toBeNull();
  });

  it('refuses a wrong password and an unknown account with the same 401', async () => {
    const input = buildSignUp();
    await signUpThroughMail(server, input);
    const wrong = await browser(server.url).post('/api/auth/sign-in', { email: input.email, password: 'wrong-password-123' });
    const unknown = await browser(server.url).post('/api/auth/sign-in', { email: 'nobody@example.test', password: 'wrong-password-123' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
  });

  it('sign-out ends the session in the database', async () => {
    const person = browser(server.url);
    await signUpThroughMail(server, buildSignUp(), person);
    const cookie = person.cookie!;
    const sessionId = cookie.split('=')[1];
    expect(await testDb().select().from(sessions).where(eq(sessions.id, sessionId))).toHaveLength(1);
    expect((await person.post('/api/auth/sign-out')).status).toBe(204);
    expect(await testDb().select().from(sessions).where(eq(sessions.id, sessionId))).toHaveLength(0);
    expect((await browser(server.url, cookie).get('/api/session')).body.me).toBeNull();
  });

  it('a session survives a server restart (sessions live in PostgreSQL)', async () => {
    const person = browser(server.url);
    await signUpThroughMail(server, buildSignUp(), person);
    const restarted = await startTestServer();
    try {
      const res = await browser(restarted.url, person.cookie).get('/api/session');
      expect(res.body.me.user).toBeDefined();
    } finally {
      await restarted.close();
    }
  });

  it('a browser without a session is told so with 200 and me: null', async () => {
    const res = await browser(server.url).get('/api/session');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ me: null });
  });

  it('a forged or expired session cookie is cleared', async () => {
    const res = await browser(server.url, 'sympodia_session=forgedvalue').get('/api/session');
    expect(res.body).toEqual({ me: null });
    const cleared = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('sympodia_session='));
    expect(cleared).toMatch(/^sympodia_session=;/);
  });
});

describe('cross-site request defence', () => {
  it('refuses a state-changing request from another origin or without an Origin', async () => {
    const supertest = (await import('supertest')).default;
    const foreign = await supertest(server.url).post('/api/auth/sign-up').set('Origin', 'https://elsewhere.example').send(buildSignUp());
    expect(foreign.status).toBe(403);
    expect(foreign.body.error.code).toBe('origin_refused');
    const missing = await supertest(server.url).post('/api/auth/sign-up').send(buildSignUp());
    expect(missing.status).toBe(403);
  });
});

describe('rate limits', () => {
  it('limits sign-in attempts per account from one address', async () => {
    const limited = await startTestServer({ rateLimits: createRateLimits({ perIp: 1000, perAccount: 3, windowSeconds: 60 }) });
    try {
      const input = buildSignUp();
      await signUpThroughMail(limited, input);
      const statuses: number[] = [];
      for (let i = 0; i < 4; i += 1) {
        statuses.push((await browser(limited.url).post('/api/auth/sign-in', { email: input.email, password: 'not-the-password' })).status);
      }
      expect(statuses).toEqual([401, 401, 401, 429]);
      // Even the right password waits now from this address, which has been guessing (other addresses
      // are not held back: tests/api/security.test.ts).
      const right = await browser(limited.url).post('/api/auth/sign-in', { email: input.email, password: input.password });
      expect(right.status).toBe(429);
      expect(right.body.error.code).toBe('rate_limited');
    } finally {
      await limited.close();
    }
  });

  it('limits sign-in and sign-up attempts per client address', async () => {
    const limited = await startTestServer({ rateLimits: createRateLimits({ perIp: 2, perAccount: 1000, windowSeconds: 60 }) });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 3; i += 1) {
        statuses.push((await browser(limited.url).post('/api/auth/sign-in', { email: `p${i}@example.test`, password: 'whatever-123' })).status);
      }
      expect(statuses).toEqual([401, 401, 429]);
      expect((await browser(limited.url).post('/api/auth/sign-up', buildSignUp())).status).toBe(429);
    } finally {
      await limited.close();
    }
  });
});
