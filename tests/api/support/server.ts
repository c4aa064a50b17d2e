import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import supertest from 'supertest';
import { createApp, type AppOptions } from '../../../server/app';
import { startFakeSmtp, type FakeSmtpServer } from '../../../server/mail/fake-smtp';
import { createSmtpMailer } from '../../../server/mail/mailer';
import { createRateLimits } from '../../../server/middleware/rate-limit';
import { createWeatherClient, type WeatherClient } from '../../../server/weather/client';
import { startFakeWeather, type FakeWeatherServer } from '../../../server/weather/fake-weather';
import { buildSignUp } from '../../factories/users';
import { mailTo } from '../../factories/mail';
import { testDb } from './database';

/** Limits loose enough that ordinary tests never meet them; rate-limit tests pass their own. */
export const RELAXED_LIMITS = { perIp: 10_000, perAccount: 10_000, windowSeconds: 60 };

export interface TestServer {
  url: string;
  server: Server;
  /** The fake SMTP server on loopback this server's mail goes to. */
  mail: FakeSmtpServer;
  /** The fake forecast service on loopback this server's night forecasts come from. */
  weather: FakeWeatherServer;
  /** The server's forecast client (its cache can be cleared between cases). */
  forecasts: WeatherClient;
  close: () => Promise<void>;
}

/** The API tests' forecast time-out: short, so a slow fake costs little; the fake on loopback answers in milliseconds. */
export const TEST_WEATHER_TIMEOUT_MS = 1000;

/** The real app on a loopback port, so Origin and Host look as they do in a browser. */
export async function startTestServer(options: Partial<AppOptions> = {}): Promise<TestServer> {
  const mail = await startFakeSmtp(0);
  // The mailer needs the app's URL for its links and the app needs the mailer: fill it in after listen.
  const smtp = createSmtpMailer({ host: mail.host, port: mail.port, secure: false, from: 'Sympodia <test@sympodia.invalid>', publicUrl: '' });
  const mailer = { publicUrl: '', send: smtp.send };
  const weather = await startFakeWeather();
  const forecasts = createWeatherClient({ baseUrl: weather.url, timeoutMs: TEST_WEATHER_TIMEOUT_MS });
  const app = createApp({ db: testDb(), rateLimits: createRateLimits(RELAXED_LIMITS), mailer, mailbox: mail, weather: forecasts, weatherFake: weather, ...options });
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
    weather,
    forecasts,
    close: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await mail.close();
      await weather.close();
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

/** The sign-up link in a mail: `/welcome/<token>`. */
export function signUpTokenIn(text: string): string {
  const token = /\/welcome\/([A-Za-z0-9_-]{43})/.exec(text)?.[1];
  if (!token) throw new Error(`no sign-up link in: ${text.slice(0, 300)}`);
  return token;
}

/**
 * Signs up as a person does: the sign-up (202), the link from the fake mailbox, and the
 * confirmation (201), after which `person` is signed in as the new account.
 */
export async function signUpThroughMail(server: TestServer, input: { email: string; password: string; displayName: string; next?: string } = buildSignUp(), person = browser(server.url)) {
  const seen = server.mail.to(input.email.trim().toLowerCase()).length;
  const requested = await person.post('/api/auth/sign-up', input);
  if (requested.status !== 202) throw new Error(`sign-up answered ${requested.status}: ${JSON.stringify(requested.body)}`);
  const mails = await mailTo(server.mail, input.email.trim().toLowerCase(), seen + 1);
  const confirmed = await person.post('/api/auth/sign-up/confirm', { token: signUpTokenIn(mails[seen].text) });
  if (confirmed.status !== 201) throw new Error(`sign-up confirmation answered ${confirmed.status}: ${JSON.stringify(confirmed.body)}`);
  return { person, confirmed, input };
}
