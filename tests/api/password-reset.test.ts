import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { passwordResets } from '../../db/schema';
import { hashToken } from '../../server/mail/tokens';
import { mailTo, tokenFrom } from '../factories/mail';
import { buildSignUp, insertUser } from '../factories/users';
import { createRateLimits } from '../../server/middleware/rate-limit';
import { rowCounts, testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

const NEW_PASSWORD = 'sheath-and-spike-2027';

describe('password reset', () => {
  it('answers the same for an unknown address and mails nothing to it', async () => {
    const account = buildSignUp();
    await insertUser(testDb(), account);
    const known = await browser(server.url).post('/api/auth/password-reset', { email: account.email });
    const unknown = await browser(server.url).post('/api/auth/password-reset', { email: 'nobody-here@example.test' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    // The known address's mail arrives; by then the unknown one has had its chance and got none.
    await mailTo(server.mail, account.email);
    await new Promise((resolve) => setTimeout(resolve, 300));
    expect(server.mail.to('nobody-here@example.test')).toHaveLength(0);
  });

  it('a reset ends every old session, signs in fresh, and the new password works; the link works once', async () => {
    const account = buildSignUp();
    const laptop = browser(server.url);
    await insertUser(testDb(), account);
    expect((await laptop.post('/api/auth/sign-in', { email: account.email, password: account.password })).status).toBe(200);
    const phone = browser(server.url);
    expect((await phone.post('/api/auth/sign-in', { email: account.email, password: account.password })).status).toBe(200);
    const oldCookie = phone.cookie!;

    expect((await browser(server.url).post('/api/auth/password-reset', { email: account.email })).status).toBe(202);
    const [message] = await mailTo(server.mail, account.email);
    const token = tokenFrom(message, 'reset-password');
    const [stored] = await testDb().select().from(passwordResets).where(eq(passwordResets.tokenHash, hashToken(token)));
    expect(stored.expiresAt.getTime() - stored.createdAt.getTime()).toBeLessThanOrEqual(60 * 60 * 1000 + 1000);

    const resetter = browser(server.url);
    const res = await resetter.post('/api/auth/password-reset/complete', { token, password: NEW_PASSWORD });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.user.email).toBe(account.email);
    expect((await resetter.get('/api/session')).body.me.user.email).toBe(account.email);

    expect((await browser(server.url, oldCookie).get('/api/session')).body.me).toBeNull();
    expect((await laptop.get('/api/session')).body.me).toBeNull();
    expect((await browser(server.url, oldCookie).post('/api/collections', { name: 'After reset' })).status).toBe(401);

    expect((await browser(server.url).post('/api/auth/sign-in', { email: account.email, password: account.password })).status).toBe(401);
    expect((await browser(server.url).post('/api/auth/sign-in', { email: account.email, password: NEW_PASSWORD })).status).toBe(200);

    const before = await rowCounts();
    const again = await browser(server.url).post('/api/auth/password-reset/complete', { token, password: 'another-long-password-9' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('reset_used');
    expect(await rowCounts()).toEqual(before);
    expect((await browser(server.url).post('/api/auth/sign-in', { email: account.email, password: NEW_PASSWORD })).status).toBe(200);
  });

  it('refuses an expired link, a short or common password and an unknown token with a reason', async () => {
    const account = buildSignUp();
    await insertUser(testDb(), account);
    expect((await browser(server.url).post('/api/auth/password-reset', { email: account.email })).status).toBe(202);
    const token = tokenFrom((await mailTo(server.mail, account.email))[0], 'reset-password');

    const short = await browser(server.url).post('/api/auth/password-reset/complete', { token, password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.details[0].field).toBe('password');
    const common = await browser(server.url).post('/api/auth/password-reset/complete', { token, password: 'password1234' });
    expect(common.status).toBe(400);
    expect(common.body.error.details[0].field).toBe('password');

    await testDb().update(passwordResets).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(passwordResets.tokenHash, hashToken(token)));
    const expired = await browser(server.url).post('/api/auth/password-reset/complete', { token, password: NEW_PASSWORD });
    expect(expired.status).toBe(410);
    expect(expired.body.error.code).toBe('reset_expired');
    expect((await browser(server.url).post('/api/auth/sign-in', { email: account.email, password: account.password })).status).toBe(200);

    const unknown = await browser(server.url).post('/api/auth/password-reset/complete', { token: 'B'.repeat(43), password: NEW_PASSWORD });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.code).toBe('reset_unknown');
    expect((await browser(server.url).post('/api/auth/password-reset', { email: 'not-an-address' })).status).toBe(400);
  });
});

describe('reset and invitation rate limits', () => {
  it('refuses a third reset request for one address within the window with 429', async () => {
    const limited = await startTestServer({ rateLimits: createRateLimits({ perIp: 100, perAccount: 2, windowSeconds: 60 }) });
    try {
      const statuses = [];
      for (let i = 0; i < 3; i += 1) statuses.push((await browser(limited.url).post('/api/auth/password-reset', { email: 'often@example.test' })).status);
      expect(statuses).toEqual([202, 202, 429]);
      // Another address still has its own budget.
      expect((await browser(limited.url).post('/api/auth/password-reset', { email: 'seldom@example.test' })).status).toBe(202);
    } finally {
      await limited.close();
    }
  });
});
