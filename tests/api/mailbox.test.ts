import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { createApp } from '../../server/app';
import { readEnv } from '../../server/env';
import { buildCollectionWithMembers } from '../factories/users';
import { mailTo } from '../factories/mail';
import { testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server.close();
});

describe('dev mailbox', () => {
  it('lists received mail with its links clickable and names escaped', async () => {
    const fx = await buildCollectionWithMembers(testDb(), '<b>Bench</b> & "shelf"');
    const res = await browser(server.url, fx.people.owner.cookie).post(`/api/collections/${fx.collectionId}/invitations`, {
      email: 'mailbox-reader@example.test',
      role: 'viewer',
    });
    expect(res.status).toBe(201);
    await mailTo(server.mail, 'mailbox-reader@example.test');

    const page = await supertest(server.url).get('/dev/mailbox');
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toContain('text/html');
    expect(page.text).toContain('&lt;b&gt;Bench&lt;/b&gt; &amp; &quot;shelf&quot;');
    expect(page.text).not.toContain('<b>Bench</b>');
    expect(page.text).toMatch(new RegExp(`<a href="${server.url}/invite/[A-Za-z0-9_-]{43}">`));
    expect(page.headers['content-security-policy']).toContain("style-src 'self' 'unsafe-inline'");

    const json = await supertest(server.url).get('/dev/mailbox.json');
    expect(json.body.messages[0].to).toEqual(['mailbox-reader@example.test']);
  });

  it('is not mounted without the fake mail server', async () => {
    const app = createApp({ db: testDb() });
    expect((await supertest(app).get('/dev/mailbox')).status).toBe(404);
  });

  it('refuses the fake mailbox together with a real SMTP server, and production with no mail set-up', () => {
    const base = { DATABASE_URL: 'postgres://x@127.0.0.1/x' } as unknown as NodeJS.ProcessEnv;
    expect(() => readEnv({ ...base, MAIL_FAKE: '1', SMTP_HOST: 'smtp.example.org' })).toThrow(/MAIL_FAKE/);
    expect(() => readEnv({ ...base, NODE_ENV: 'production' })).toThrow(/SMTP_HOST/);
    expect(readEnv({ ...base, NODE_ENV: 'production', MAIL_FAKE: '1' }).MAIL_FAKE).toBe(true);
    expect(readEnv({ ...base, NODE_ENV: 'production', SMTP_HOST: 'smtp.example.org', SMTP_PORT: '465', SMTP_SECURE: '1' })).toMatchObject({
      SMTP_HOST: 'smtp.example.org',
      SMTP_PORT: 465,
      SMTP_SECURE: true,
      MAIL_FAKE: false,
    });
  });

  it('refuses either fake on an address other machines can reach, naming the setting to change', () => {
    const base = { DATABASE_URL: 'postgres://x@127.0.0.1/x' } as unknown as NodeJS.ProcessEnv;
    const real = { SMTP_HOST: 'smtp.example.org', WEATHER_URL: 'https://api.open-meteo.com' };
    expect(() => readEnv({ ...base, NODE_ENV: 'production', MAIL_FAKE: '1', HOST: '0.0.0.0' })).toThrow(/HOST=0\.0\.0\.0 .*fake mailbox.*SMTP_HOST.*HOST=127\.0\.0\.1/);
    expect(() => readEnv({ ...base, HOST: '192.0.2.10', WEATHER_URL: real.WEATHER_URL })).toThrow(/fake mailbox/);
    expect(() => readEnv({ ...base, HOST: '::', SMTP_HOST: real.SMTP_HOST })).toThrow(/fake forecast/);
    expect(() => readEnv({ ...base, NODE_ENV: 'production', SMTP_HOST: real.SMTP_HOST, WEATHER_FAKE: '1', HOST: '0.0.0.0' })).toThrow(/WEATHER_FAKE/);
    expect(readEnv({ ...base, NODE_ENV: 'production', ...real, HOST: '0.0.0.0' }).HOST).toBe('0.0.0.0');
    expect(readEnv({ ...base, NODE_ENV: 'production', SMTP_HOST: real.SMTP_HOST, HOST: '0.0.0.0' }).HOST).toBe('0.0.0.0');
    for (const host of ['127.0.0.1', '127.0.0.2', 'localhost', '::1', '[::1]']) {
      expect(readEnv({ ...base, NODE_ENV: 'production', MAIL_FAKE: '1', WEATHER_FAKE: '1', HOST: host }).HOST).toBe(host);
    }
  });
});
