import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import supertest from 'supertest';
import { createApp, type AppOptions } from '../../../server/app';
import { startFakeSmtp, type FakeSmtpServer } from '../../../server/mail/fake-smtp';
import { createSmtpMailer } from '../../../server/mail/mailer';
import { createRateLimits } from '../../../server/middleware/rate-limit';
import { testDb } from './database';

/** Limits loose enough that ordinary tests never meet them; rate-limit tests pass their own. */
export const RELAXED_LIMITS = { perIp: 10_000, perAccount: 10_000, windowSeconds: 60 };

export interface TestServer {
  url: string;
  server: Server;
  /** The fake SMTP server on loopback this server's mail goes to. */
  mail: FakeSmtpServer;
  close: () => Promise<void>;
}

/** The real app on a loopback port, so Origin and Host look as they do in a browser. */
export async function startTestServer(options: Partial<AppOptions> = {}): Promise<TestServer> {
  const mail = await startFakeSmtp(0);
  // The mailer needs the app's URL for its links and the app needs the mailer: fill it in after listen.
  const smtp = createSmtpMailer({ host: mail.host, port: mail.port, secure: false, from: 'Sympodia <test@sympodia.invalid>', publicUrl: '' });
  const mailer = { publicUrl: '', send: smtp.send };
  const app = createApp({ db: testDb(), rateLimits: createRateLimits(RELAXED_LIMITS), mailer, mailbox: mail, ...options });
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://127.0.0.1:${port}`;
  mailer.publicUrl = url;
  return {
    url,
    server,
    mail,
    close: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await mail.close();
    },
  };
}

type Method = 'get' | 'post' | 'patch' | 'put' | 'delete';

/**
 * A browser-like client: sends this server's Origin on every request and the session
 * cookie it was given (or picked up from sign-in).
 */
export function browser(url: string, cookie?: string) {
  let sessionCookie = cookie;
  const send = (method: Method, path: string, body?: unknown) => {
    let req = supertest(url)[method](path).set('Origin', url);
    if (sessionCookie) req = req.set('Cookie', sessionCookie);
    if (body !== undefined) req = req.send(body as object);
    return req.then((res) => {
      const set = res.headers['set-cookie'] as unknown as string[] | undefined;
      const session = set?.find((c) => c.startsWith('sympodia_session='));
      if (session) {
        const value = session.split(';')[0];
        sessionCookie = value === 'sympodia_session=' ? undefined : value;
      }
      return res;
    });
  };
  return {
    get: (path: string) => send('get', path),
    post: (path: string, body?: unknown) => send('post', path, body),
    patch: (path: string, body?: unknown) => send('patch', path, body),
    put: (path: string, body?: unknown) => send('put', path, body),
    delete: (path: string) => send('delete', path),
    send,
    get cookie() {
      return sessionCookie;
    },
  };
}
