import { spawn } from 'node:child_process';
import http from 'node:http';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { plants, sessions, signUpRequests, users } from '../../db/schema';
import { createApp } from '../../server/app';
import { readEnv } from '../../server/env';
import { createRateLimits, DEFAULT_AUTH_LIMITS } from '../../server/middleware/rate-limit';
import { mailTo } from '../factories/mail';
import { buildCollectionWithMembers, buildSignUp, insertUser } from '../factories/users';
import { testDatabaseUrl, testDb } from './support/database';
import { freePorts, ROOT, startServerProcess } from './support/processes';
import { registeredRoutes } from './support/routes';
import { browser, signUpThroughMail, startTestServer, type TestServer } from './support/server';
import { writeStandInBuild } from './support/web-build';

/**
 * Access extras beside tests/api/auth.test.ts (which covers HttpOnly, SameSite, Secure behind
 * a proxy, rotation on sign-in and sign-out): cookie scope, signing out everywhere, the rate
 * limits of every route that signs in or sends mail, and the security headers and CSP.
 */

let server: TestServer;
let webRoot: string;

beforeAll(async () => {
  // A stand-in web build, so the headers on the app's own pages are checked too.
  webRoot = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-security-web-'));
  await writeStandInBuild(webRoot);
  server = await startTestServer({ webRoot });
});
afterAll(async () => {
  await server.close();
  await fs.rm(webRoot, { recursive: true, force: true });
});

const sessionCookieOf = (res: { headers: Record<string, unknown> }) =>
  ((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith('sympodia_session='));

async function sessionRows(userId: string) {
  return testDb().select({ id: sessions.id }).from(sessions).where(eq(sessions.userId, userId));
}

describe('session cookie', () => {
  it('is scoped to the whole site (Path=/), HttpOnly, SameSite=Lax, and lives as long as the session', async () => {
    const { confirmed: res } = await signUpThroughMail(server);
    const cookie = sessionCookieOf(res)!;
    expect(cookie).toMatch(/; Path=\/(;|$)/);
    expect(cookie).toMatch(/; HttpOnly/i);
    expect(cookie).toMatch(/; SameSite=Lax/i);
    const maxAge = Number(/Max-Age=(\d+)/i.exec(cookie)?.[1]);
    expect(maxAge).toBeGreaterThan(24 * 60 * 60);
    expect(cookie).not.toMatch(/Domain=/i);
  });

  it('is cleared (expired, same Path) on sign-out', async () => {
    const person = browser(server.url);
    await signUpThroughMail(server, buildSignUp(), person);
    const res = await person.post('/api/auth/sign-out');
    const cleared = sessionCookieOf(res)!;
    expect(cleared).toMatch(/^sympodia_session=;/);
    expect(cleared).toMatch(/; Path=\//);
    expect(cleared).toMatch(/Max-Age=0|Expires=Thu, 01 Jan 1970/i);
  });

  it('sign-in replaces a session id the browser already carried (no fixation), and the old id stops working', async () => {
    const input = buildSignUp();
    const first = browser(server.url);
    await signUpThroughMail(server, input, first);
    const planted = first.cookie!;
    const res = await browser(server.url, planted).post('/api/auth/sign-in', { email: input.email, password: input.password });
    expect(res.status).toBe(200);
    const issued = sessionCookieOf(res)!.split(';')[0];
    expect(issued).not.toBe(planted);
    expect((await browser(server.url, planted).get('/api/session')).body.me).toBeNull();
    expect((await browser(server.url, issued).get('/api/session')).body.me).not.toBeNull();
  });
});

describe('sign out everywhere', () => {
  it("ends every session of the account, on every device, and no one else's", async () => {
    const input = buildSignUp();
    const phone = browser(server.url);
    await signUpThroughMail(server, input, phone);
    const laptop = browser(server.url);
    await laptop.post('/api/auth/sign-in', { email: input.email, password: input.password });
    const userId = (await phone.get('/api/session')).body.me.user.id as string;
    expect(await sessionRows(userId)).toHaveLength(2);

    const someoneElse = browser(server.url);
    await signUpThroughMail(server, buildSignUp(), someoneElse);

    const res = await laptop.post('/api/auth/sign-out-everywhere');
    expect(res.status).toBe(204);
    expect(sessionCookieOf(res)).toMatch(/^sympodia_session=;/);
    expect(await sessionRows(userId)).toHaveLength(0);
    expect((await phone.get('/api/session')).body.me).toBeNull();
    expect((await laptop.get('/api/session')).body.me).toBeNull();
    expect((await someoneElse.get('/api/session')).body.me).not.toBeNull();
    // The account itself still works: signing in again gives a fresh session.
    expect((await browser(server.url).post('/api/auth/sign-in', { email: input.email, password: input.password })).status).toBe(200);
  });

  it('needs a signed-in browser (401) and a same-origin request (403)', async () => {
    const anonymous = await browser(server.url).post('/api/auth/sign-out-everywhere');
    expect(anonymous.status).toBe(401);
    const input = buildSignUp();
    const person = browser(server.url);
    await signUpThroughMail(server, input, person);
    const userId = (await person.get('/api/session')).body.me.user.id as string;
    const crossSite = await supertest(server.url).post('/api/auth/sign-out-everywhere').set('Cookie', person.cookie!).set('Origin', 'https://elsewhere.example');
    expect(crossSite.status).toBe(403);
    expect(await sessionRows(userId)).toHaveLength(1);
  });
});

describe('rate limits', () => {
  const SMALL = { perIp: 2, perAccount: 2, windowSeconds: 60 };

  async function withLimits<T>(limits: typeof SMALL, run: (s: TestServer) => Promise<T>): Promise<T> {
    const limited = await startTestServer({ rateLimits: createRateLimits(limits) });
    try {
      return await run(limited);
    } finally {
      await limited.close();
    }
  }

  const expectTooMany = (res: { status: number; headers: Record<string, unknown>; body: { error: { code: string; message: string } } }) => {
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('rate_limited');
    expect(res.body.error.message).toMatch(/^Too many .*; try again in \d+ minute/);
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
  };

  it('sign-up: per client address, and per address it mails', async () => {
    await withLimits(SMALL, async (s) => {
      for (let i = 0; i < 2; i += 1) {
        const input = buildSignUp();
        expect((await browser(s.url).post('/api/auth/sign-up', input)).status).toBe(202);
        await mailTo(s.mail, input.email);
      }
      expectTooMany(await browser(s.url).post('/api/auth/sign-up', buildSignUp()));
    });
    await withLimits({ ...SMALL, perIp: 1000 }, async (s) => {
      const input = buildSignUp();
      for (let i = 0; i < 2; i += 1) expect((await browser(s.url).post('/api/auth/sign-up', input)).status).toBe(202);
      await mailTo(s.mail, input.email, 2);
      expectTooMany(await browser(s.url).post('/api/auth/sign-up', input));
    });
  });

  it('password reset request: per account and per client address', async () => {
    await withLimits({ ...SMALL, perIp: 1000 }, async (s) => {
      const input = buildSignUp();
      await insertUser(testDb(), input);
      for (let i = 0; i < 2; i += 1) expect((await browser(s.url).post('/api/auth/password-reset', { email: input.email })).status).toBe(202);
      expectTooMany(await browser(s.url).post('/api/auth/password-reset', { email: input.email }));
      // Another address is counted apart.
      expect((await browser(s.url).post('/api/auth/password-reset', { email: 'other@example.test' })).status).toBe(202);
    });
    await withLimits({ ...SMALL, perAccount: 1000 }, async (s) => {
      for (let i = 0; i < 2; i += 1) expect((await browser(s.url).post('/api/auth/password-reset', { email: `r${i}@example.test` })).status).toBe(202);
      expectTooMany(await browser(s.url).post('/api/auth/password-reset', { email: 'r9@example.test' }));
    });
  });

  it('password reset completion: per client address', async () => {
    await withLimits(SMALL, async (s) => {
      const body = { token: 'C'.repeat(43), password: 'pseudobulb-ladder-77' };
      for (let i = 0; i < 2; i += 1) expect((await browser(s.url).post('/api/auth/password-reset/complete', body)).status).toBe(400);
      expectTooMany(await browser(s.url).post('/api/auth/password-reset/complete', body));
    });
  });

  it('invitation send: per inviting account', async () => {
    await withLimits({ ...SMALL, perIp: 1000 }, async (s) => {
      const world = await buildCollectionWithMembers(testDb());
      const owner = browser(s.url, world.people.owner.cookie);
      const at = `/api/collections/${world.collectionId}/invitations`;
      for (let i = 0; i < 2; i += 1) expect((await owner.post(at, { email: `partner${i}@example.test`, role: 'grower' })).status).toBe(201);
      expectTooMany(await owner.post(at, { email: 'partner9@example.test', role: 'grower' }));
    });
  });

  it('invitation send: per client address', async () => {
    await withLimits({ ...SMALL, perAccount: 1000 }, async (s) => {
      const world = await buildCollectionWithMembers(testDb());
      const owner = browser(s.url, world.people.owner.cookie);
      const at = `/api/collections/${world.collectionId}/invitations`;
      for (let i = 0; i < 2; i += 1) expect((await owner.post(at, { email: `friend${i}@example.test`, role: 'viewer' })).status).toBe(201);
      expectTooMany(await owner.post(at, { email: 'friend9@example.test', role: 'viewer' }));
    });
  });
});

describe('security headers', () => {
  const paths = ['/api/health', '/api/collections/not-a-uuid', '/', '/plants'];

  it.each(paths)('%s carries HSTS, nosniff, a Referrer-Policy, frame-ancestors none, and no X-Powered-By', async (p) => {
    const res = await supertest(server.url).get(p);
    expect(res.headers['strict-transport-security']).toMatch(/max-age=\d{7,}/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['referrer-policy']).toMatch(/^(no-referrer|same-origin|strict-origin(-when-cross-origin)?)$/);
    expect(res.headers['content-security-policy']).toMatch(/frame-ancestors 'none'/);
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('has a strict Content-Security-Policy: no eval, no inline script, no wildcard sources', async () => {
    const res = await supertest(server.url).get('/');
    const header = res.headers['content-security-policy'] as string;
    const directives = new Map(
      header
        .split(';')
        .map((d) => d.trim().split(/\s+/))
        .filter((parts) => parts[0])
        .map(([name, ...sources]) => [name, sources] as const),
    );
    expect(directives.get('default-src')).toEqual(["'self'"]);
    const scripts = directives.get('script-src')!;
    expect(scripts).toContain("'self'");
    expect(scripts).not.toContain("'unsafe-eval'");
    expect(scripts).not.toContain("'unsafe-inline'");
    expect(scripts).not.toContain('data:');
    expect(directives.get('object-src')).toEqual(["'none'"]);
    expect(directives.get('base-uri')).toEqual(["'self'"]);
    expect(directives.get('frame-ancestors')).toEqual(["'none'"]);
    for (const [name, sources] of directives) {
      for (const source of sources) {
        expect(source, `${name} ${source}`).not.toMatch(/\*/);
        expect(source, `${name} ${source}`).not.toMatch(/^(https?|wss?):$/);
      }
    }
  });
});

/**
 * Starts server/index.ts with `env` and resolves with how it ended: its exit code and output, or
 * 'listening' (then stopped) when it came up and answered /api/health.
 */
async function startOutcome(env: Record<string, string>): Promise<{ outcome: number | 'listening'; output: string }> {
  const [port] = await freePorts(1);
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: testDatabaseUrl(), LOG_LEVEL: 'warn', SEED_DEMO: '0', PORT: String(port), ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout.on('data', (c: Buffer) => (output += c.toString()));
  child.stderr.on('data', (c: Buffer) => (output += c.toString()));
  const exited = new Promise<number>((resolve) => child.on('exit', (code) => resolve(code ?? -1)));
  const listening = (async () => {
    for (let i = 0; i < 150; i += 1) {
      const up = await fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(1000) }).then((r) => r.ok, () => false);
      if (up) return 'listening' as const;
      await new Promise((resolve) => setTimeout(resolve, 200));
    }
    return 'listening' as const;
  })();
  const outcome = await Promise.race([exited, listening]);
  if (outcome === 'listening') {
    child.kill('SIGKILL');
    await exited;
  }
  return { outcome, output };
}

describe('development fakes', () => {
  let seenFromElsewhere: TestServer;

  beforeAll(async () => {
    // A server whose every connection is labelled as coming from another machine (203.0.113.7, a
    // documentation address): the requests still travel over loopback, but the socket's remote
    // address, which the loopback check reads, is what a LAN or Internet client would have.
    seenFromElsewhere = await startTestServer();
    seenFromElsewhere.server.prependListener('connection', (socket) => {
      Object.defineProperty(socket, 'remoteAddress', { value: '203.0.113.7', configurable: true });
    });
  });
  afterAll(async () => {
    await seenFromElsewhere.close();
  });

  // Every development route the app can mount, read from the router (both fakes given).
  const devRoutes = registeredRoutes(createApp({ db: testDb(), mailbox: {} as never, weatherFake: {} as never })).filter((r) => r.split(' ')[1].startsWith('/dev/'));

  it('finds the development routes', () => {
    expect(devRoutes).toEqual(expect.arrayContaining(['GET /dev/mailbox', 'GET /dev/mailbox.json', 'GET /dev/weather', 'POST /dev/weather']));
  });

  it.each(devRoutes)('%s answers 403 to a client on another machine', async (route) => {
    const [method, at] = route.split(' ');
    const res = await supertest(seenFromElsewhere.url)[method.toLowerCase() as 'get' | 'post'](at).set('Origin', seenFromElsewhere.url).send(method === 'POST' ? { mode: 'error' } : undefined);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('loopback_only');
    expect(res.text).not.toContain('/reset-password/');
  });

  it('the mailbox holds no reset link for a client on another machine, while this machine reads it', async () => {
    const input = buildSignUp();
    await signUpThroughMail(server, input);
    await browser(seenFromElsewhere.url).post('/api/auth/password-reset', { email: input.email });
    const remote = await supertest(seenFromElsewhere.url).get('/dev/mailbox.json');
    expect(remote.status).toBe(403);
    expect(JSON.stringify(remote.body)).not.toContain('reset-password');
    // On this machine the same kind of server shows its mail (the mailbox itself still works).
    expect((await supertest(server.url).get('/dev/mailbox.json')).status).toBe(200);
  });

  it.each(['X-Forwarded-For', 'Forwarded', 'X-Real-IP'])('refuses a loopback request that came through a proxy (%s)', async (header) => {
    const value = header === 'Forwarded' ? 'for=198.51.100.4' : '198.51.100.4';
    for (const route of devRoutes) {
      const [method, at] = route.split(' ');
      const res = await supertest(server.url)[method.toLowerCase() as 'get' | 'post'](at).set('Origin', server.url).set(header, value).send(method === 'POST' ? { mode: 'error' } : undefined);
      expect(res.status, route).toBe(403);
    }
    expect((await supertest(server.url).get('/dev/weather')).body.mode).not.toBe('error');
  });

  it('the fake forecast switch refuses a cross-origin or origin-less POST and keeps its mode', async () => {
    const before = (await supertest(server.url).get('/dev/weather')).body.mode;
    const foreign = await supertest(server.url).post('/dev/weather').set('Origin', 'https://elsewhere.example').send({ mode: 'error' });
    expect(foreign.status).toBe(403);
    expect(foreign.body.error.code).toBe('origin_refused');
    const bare = await supertest(server.url).post('/dev/weather').send({ mode: 'error' });
    expect(bare.status).toBe(403);
    expect((await supertest(server.url).get('/dev/weather')).body.mode).toBe(before);
    // With this server's own Origin it switches.
    const own = await supertest(server.url).post('/dev/weather').set('Origin', server.url).send({ mode: 'slow' });
    expect(own.status).toBe(200);
    expect(own.body.mode).toBe('slow');
    await supertest(server.url).post('/dev/weather').set('Origin', server.url).send({ mode: 'normal' });
  });

  it('the server refuses to start with the fake mailbox on a non-loopback address, naming the setting to change', async () => {
    const { outcome, output } = await startOutcome({ NODE_ENV: 'production', MAIL_FAKE: '1', HOST: '0.0.0.0' });
    expect(outcome).toBe(1);
    expect(output).toMatch(/HOST=0\.0\.0\.0/);
    expect(output).toMatch(/SMTP_HOST/);
    expect(output).toMatch(/HOST=127\.0\.0\.1/);
  }, 60_000);

  it('the server refuses to start with the fake forecast on a non-loopback address', async () => {
    const { outcome, output } = await startOutcome({ NODE_ENV: 'production', SMTP_HOST: '127.0.0.1', WEATHER_FAKE: '1', HOST: '0.0.0.0' });
    expect(outcome).toBe(1);
    expect(output).toMatch(/WEATHER_FAKE|WEATHER_URL/);
  }, 60_000);
});

describe('client addresses behind a proxy', () => {
  const base = { DATABASE_URL: 'postgres://x@127.0.0.1/x' } as unknown as NodeJS.ProcessEnv;

  it('TRUST_PROXY takes a hop count or the proxies\' addresses, and refuses "trust everyone"', () => {
    expect(readEnv({ ...base, TRUST_PROXY: '1' }).TRUST_PROXY).toBe(1);
    expect(readEnv({ ...base, TRUST_PROXY: '2' }).TRUST_PROXY).toBe(2);
    expect(readEnv({ ...base, TRUST_PROXY: '0' }).TRUST_PROXY).toBeUndefined();
    expect(readEnv(base).TRUST_PROXY).toBeUndefined();
    expect(readEnv({ ...base, TRUST_PROXY: '10.0.0.5, 10.1.0.0/16,loopback,fd00::/8' }).TRUST_PROXY).toEqual(['10.0.0.5', '10.1.0.0/16', 'loopback', 'fd00::/8']);
    expect(() => readEnv({ ...base, TRUST_PROXY: 'true' })).toThrow(/TRUST_PROXY=true .*TRUST_PROXY=1/);
    expect(() => readEnv({ ...base, TRUST_PROXY: '10.0.0.0/33' })).toThrow(/TRUST_PROXY/);
    expect(() => readEnv({ ...base, TRUST_PROXY: 'proxy.example.net' })).toThrow(/TRUST_PROXY/);
  });

  // Each case has its own client address: the counts live in PostgreSQL and outlast the process.
  it.each([
    ['1', '198.51.100.7'],
    ['loopback', '198.51.100.17'],
  ])('with TRUST_PROXY=%s a forged left-most X-Forwarded-For changes nothing: the sign-in limit per address holds', async (setting, client) => {
    // A production server process, as deployed behind one proxy on this machine; the proxy appends
    // the address it saw (`client`), the client forges whatever it likes before it.
    const [port] = await freePorts(1);
    const proc = await startServerProcess({
      port,
      env: { NODE_ENV: 'production', DATABASE_URL: testDatabaseUrl(), MAIL_FAKE: '1', SEED_DEMO: '0', TRUST_PROXY: setting, DIGEST_FIRST_CHECK_SECONDS: '86400' },
    });
    try {
      const attempt = (forwardedFor: string, i: number) =>
        fetch(`${proc.url}/api/auth/sign-in`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', origin: proc.url, 'x-forwarded-for': forwardedFor },
          body: JSON.stringify({ email: `guess-${setting}-${i}@example.test`, password: 'not-the-password-123' }),
        }).then((res) => res.status);
      const statuses: number[] = [];
      for (let i = 0; i < DEFAULT_AUTH_LIMITS.perIp + 5; i += 1) statuses.push(await attempt(`203.0.113.${i % 250}, ${client}`, i));
      expect(statuses.slice(0, DEFAULT_AUTH_LIMITS.perIp)).toEqual(Array(DEFAULT_AUTH_LIMITS.perIp).fill(401));
      expect(statuses.slice(DEFAULT_AUTH_LIMITS.perIp)).toEqual(Array(5).fill(429));
      // The address the proxy saw is what counts: another client behind it is not held back.
      expect(await attempt(`203.0.113.1, ${client}1`, 999)).toBe(401);
    } finally {
      await proc.stop();
    }
  }, 90_000);
});

describe('sign-in throttling (OWASP ASVS 4.0.3 V2.2.1): the guesser is slowed, the owner is not locked out', () => {
  const PASSWORD = 'pseudobulb-ladder-77';

  /** A server behind one proxy hop, so each request comes from the address X-Forwarded-For ends with. */
  async function behindProxy<T>(limits: Parameters<typeof createRateLimits>[0], run: (s: TestServer) => Promise<T>): Promise<T> {
    const s = await startTestServer({ rateLimits: createRateLimits(limits), trustProxy: 1 });
    try {
      return await run(s);
    } finally {
      await s.close();
    }
  }
  const signIn = (s: TestServer, from: string, email: string, password: string) =>
    supertest(s.url).post('/api/auth/sign-in').set('Origin', s.url).set('X-Forwarded-For', from).send({ email, password });
  const account = async () => {
    const input = buildSignUp({ password: PASSWORD });
    await insertUser(testDb(), input);
    return input.email;
  };

  it('after the account-and-address limit the guessing address waits, even with the right password, while the owner signs in from elsewhere', async () => {
    await behindProxy({ perIp: 100, perAccount: 3, windowSeconds: 60 }, async (s) => {
      const email = await account();
      const guesser = '198.51.100.20';
      const statuses: number[] = [];
      for (let i = 0; i < 4; i += 1) statuses.push((await signIn(s, guesser, email, `wrong-guess-${i}-123`)).status);
      expect(statuses).toEqual([401, 401, 401, 429]);
      const held = await signIn(s, guesser, email, PASSWORD);
      expect(held.status).toBe(429);
      expect(held.body.error.message).toMatch(/wrong passwords for this account from here; try again in \d+ minute/);
      expect(Number(held.headers['retry-after'])).toBeGreaterThan(0);
      // The owner, at an address that has not been failing, is not refused.
      expect((await signIn(s, '203.0.113.50', email, PASSWORD)).status).toBe(200);
      // …nor after a typo of their own.
      expect((await signIn(s, '203.0.113.51', email, 'a-typo-of-mine-1')).status).toBe(401);
      expect((await signIn(s, '203.0.113.51', email, PASSWORD)).status).toBe(200);
    });
  });

  it('guesses sent in parallel cannot slip past the limit', async () => {
    await behindProxy({ perIp: 100, perAccount: 3, windowSeconds: 60 }, async (s) => {
      const email = await account();
      const statuses = await Promise.all(Array.from({ length: 10 }, (_, i) => signIn(s, '198.51.100.21', email, `parallel-guess-${i}-1`).then((r) => r.status)));
      expect(statuses.filter((x) => x === 401)).toHaveLength(3);
      expect(statuses.filter((x) => x === 429)).toHaveLength(7);
    });
  });

  it('an address failing at many accounts waits after the per-address limit; its successful sign-ins are not counted', async () => {
    await behindProxy({ perIp: 3, perAccount: 100, windowSeconds: 60 }, async (s) => {
      const at = '198.51.100.22';
      const mine = await account();
      const statuses = [
        (await signIn(s, at, 'someone-1@example.test', 'guess-number-1')).status,
        (await signIn(s, at, 'someone-2@example.test', 'guess-number-2')).status,
        (await signIn(s, at, mine, PASSWORD)).status,
        (await signIn(s, at, 'someone-3@example.test', 'guess-number-3')).status,
        (await signIn(s, at, 'someone-4@example.test', 'guess-number-4')).status,
      ];
      expect(statuses).toEqual([401, 401, 200, 401, 429]);
      expect((await signIn(s, '198.51.100.23', mine, PASSWORD)).status).toBe(200);
    });
  });

  it('an account guessed at from many addresses pauses only past the much higher bound, mails its owner once, and a password reset ends the pause', async () => {
    await behindProxy({ perIp: 100, perAccount: 100, windowSeconds: 60, accountLock: { failures: 6, windowSeconds: 60 } }, async (s) => {
      const email = await account();
      for (let i = 0; i < 6; i += 1) expect((await signIn(s, `198.51.100.${100 + i}`, email, `spread-guess-${i}-1`)).status).toBe(401);
      const paused = await signIn(s, '203.0.113.60', email, PASSWORD);
      expect(paused.status).toBe(429);
      expect(paused.body.error.message).toMatch(/paused .* reset your password/);
      expect((await signIn(s, '198.51.100.120', email, 'spread-guess-more')).status).toBe(429);
      const [notice] = await mailTo(s.mail, email);
      expect(notice.subject).toBe('Sign-in to your Sympodia account is paused');
      expect(notice.text).toContain(`${s.url}/forgot-password`);
      await new Promise((resolve) => setTimeout(resolve, 300));
      expect(s.mail.to(email)).toHaveLength(1);

      // The owner resets the password through the mailed link; the pause ends.
      expect((await supertest(s.url).post('/api/auth/password-reset').set('Origin', s.url).set('X-Forwarded-For', '203.0.113.60').send({ email })).status).toBe(202);
      const [, reset] = await mailTo(s.mail, email, 2);
      const token = /\/reset-password\/([A-Za-z0-9_-]{43})/.exec(reset.text)![1];
      const done = await supertest(s.url).post('/api/auth/password-reset/complete').set('Origin', s.url).set('X-Forwarded-For', '203.0.113.60').send({ token, password: 'a-new-long-password-9' });
      expect(done.status).toBe(200);
      expect((await signIn(s, '203.0.113.61', email, 'a-new-long-password-9')).status).toBe(200);
    });
  });

  it('with the production limits, ten wrong passwords from one address do not lock the owner out', async () => {
    await behindProxy(DEFAULT_AUTH_LIMITS, async (s) => {
      const email = await account();
      for (let i = 0; i < DEFAULT_AUTH_LIMITS.perAccount; i += 1) expect((await signIn(s, '198.51.100.30', email, `ten-wrong-${i}-ok`)).status).toBe(401);
      expect((await signIn(s, '198.51.100.30', email, 'one-more-wrong-1')).status).toBe(429);
      expect((await signIn(s, '203.0.113.70', email, PASSWORD)).status).toBe(200);
    });
  });
});

describe('account enumeration (OWASP ASVS 4.0.3 V2.1.12)', () => {
  it('sign-up answers a taken address exactly as a new one, makes nothing, and mails that address instead', async () => {
    const taken = buildSignUp();
    await insertUser(testDb(), taken);
    const fresh = buildSignUp();
    const before = await testDb().select({ id: users.id }).from(users);
    const answers: supertest.Response[] = [];
    for (const input of [taken, fresh]) answers.push(await browser(server.url).post('/api/auth/sign-up', { ...input, password: 'another-long-password-2' }));
    const shape = (res: supertest.Response, email: string) => ({ status: res.status, body: JSON.parse(JSON.stringify(res.body).split(email).join('<address>')), cookie: sessionCookieOf(res) });
    expect(shape(answers[0], taken.email)).toEqual(shape(answers[1], fresh.email));
    expect(answers[0].status).toBe(202);

    const [toTaken] = await mailTo(server.mail, taken.email);
    expect(toTaken.subject).toBe('You already have a Sympodia account');
    expect(toTaken.text).not.toMatch(/\/welcome\//);
    expect(toTaken.text).toContain(`${server.url}/forgot-password`);
    const [toFresh] = await mailTo(server.mail, fresh.email);
    expect(toFresh.text).toMatch(/\/welcome\/[A-Za-z0-9_-]{43}/);
    expect(await testDb().select({ id: users.id }).from(users)).toHaveLength(before.length);
    expect(await testDb().select().from(signUpRequests).where(eq(signUpRequests.email, taken.email))).toEqual([]);
    // The taken account's password is unchanged.
    expect((await browser(server.url).post('/api/auth/sign-in', { email: taken.email, password: taken.password })).status).toBe(200);
  });

  it('sign-in checks a password hash for an unknown address too, so it takes about as long as for a known one', async () => {
    const known = buildSignUp();
    await insertUser(testDb(), known);
    const time = async (email: string) => {
      const started = performance.now();
      const res = await browser(server.url).post('/api/auth/sign-in', { email, password: 'not-the-password-1' });
      expect(res.status).toBe(401);
      return performance.now() - started;
    };
    await time(known.email);
    await time('warm-up@example.test');
    const knownTimes: number[] = [];
    const unknownTimes: number[] = [];
    for (let i = 0; i < 9; i += 1) {
      knownTimes.push(await time(known.email));
      unknownTimes.push(await time(`nobody-${i}@example.test`));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    // Without the dummy check an unknown address answers in a small fraction of the time (the
    // argon2id check is nearly all of it); with it the two are alike. A loose bound for a busy machine.
    expect(median(unknownTimes) / median(knownTimes)).toBeGreaterThan(0.5);
  });
});

describe('heavy jobs (restores and imports) per process', () => {
  const document = (name: string) =>
    JSON.stringify({
      format: 'sympodia-export',
      version: 1,
      exportedAt: new Date().toISOString(),
      collection: { name, seasonStartMonth: 3, units: 'mm', latitude: null, longitude: null },
      areas: [{ id: 'a', name: 'East bench', indoors: false, position: 0, notes: null }],
      plants: [{ id: 'p', tag: 'H-1', genus: 'C.', epithet: 'Quiet Meadow', areaId: 'a' }],
      leads: [],
      measurements: [],
      bloomRecords: [],
      careEntries: [],
      photos: [],
    });
  const boundary = 'sympodia-heavy-boundary';
  const multipart = (json: string) =>
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="document"; filename="backup.json"\r\nContent-Type: application/json\r\n\r\n${json}\r\n--${boundary}--\r\n`);

  it('past the slots, a restore or an import is answered 503 busy with Retry-After at once; a freed slot takes the next', async () => {
    const s = await startTestServer({ heavyJobSlots: 1 });
    try {
      const world = await buildCollectionWithMembers(testDb(), 'Heavy bench');
      const owner = browser(s.url, world.people.owner.cookie);
      const second = (await owner.post('/api/collections', { name: 'Second empty' })).body.id as string;
      const restorePath = (id: string) => `/api/collections/${id}/restore`;

      // A restore whose upload is still arriving holds the one slot.
      const body = multipart(document('Slow upload'));
      const { hostname, port } = new URL(s.url);
      let answered: { status: number; text: string } | undefined;
      const slow = http.request({
        host: hostname,
        port: Number(port),
        method: 'POST',
        path: restorePath(world.collectionId),
        headers: { Origin: s.url, Cookie: world.people.owner.cookie, 'Content-Type': `multipart/form-data; boundary=${boundary}`, 'Content-Length': String(body.length) },
      });
      const slowAnswer = new Promise<void>((resolve, reject) => {
        slow.on('response', (res) => {
          let text = '';
          res.on('data', (c: Buffer) => (text += c.toString()));
          res.on('end', () => {
            answered = { status: res.statusCode ?? 0, text };
            resolve();
          });
        });
        slow.on('error', reject);
      });
      slow.write(body.subarray(0, 40));
      await new Promise((resolve) => setTimeout(resolve, 200));
      expect(answered).toBeUndefined();

      const busy = await supertest(s.url)
        .post(restorePath(second))
        .set('Origin', s.url)
        .set('Cookie', world.people.owner.cookie)
        .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
        .send(multipart(document('Second')));
      expect(busy.status).toBe(503);
      expect(busy.body.error).toEqual({ code: 'busy', message: 'The server is busy with other imports and restores; try again in a minute' });
      expect(busy.headers['retry-after']).toBe('60');
      const importBusy = await supertest(s.url)
        .post(`/api/collections/${second}/imports/check`)
        .set('Origin', s.url)
        .set('Cookie', world.people.owner.cookie)
        .set('Content-Type', 'text/csv')
        .send('Plant Tag,Genus,Grex / Species,Lead\nH-2,C.,Quiet Meadow,L-1\n');
      expect([importBusy.status, importBusy.body.error.code]).toEqual([503, 'busy']);
      // Everything else still answers.
      expect((await supertest(s.url).get('/api/health')).status).toBe(200);
      expect((await owner.get(`/api/collections/${second}`)).status).toBe(200);
      expect(await testDb().select().from(plants).where(eq(plants.collectionId, second))).toEqual([]);

      slow.end(body.subarray(40));
      await slowAnswer;
      expect(answered!.status, answered!.text).toBe(201);
      const next = await supertest(s.url)
        .post(restorePath(second))
        .set('Origin', s.url)
        .set('Cookie', world.people.owner.cookie)
        .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
        .send(multipart(document('Second')));
      expect(next.status, JSON.stringify(next.body)).toBe(201);
    } finally {
      await s.close();
    }
  });
});
