import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { testDatabaseUrl } from './support/database';
import { freePorts } from './support/processes';

const ROOT = path.join(__dirname, '..', '..');
/** Chosen when the test starts, so a second checkout testing at the same time never collides. */
let port = 0;

function waitForHealth(deadline: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const attempt = () =>
      fetch(`http://127.0.0.1:${port}/api/health`)
        .then((res) => (res.ok ? resolve() : retry()))
        .catch(retry);
    const retry = () => (Date.now() > deadline ? reject(new Error('server did not start')) : setTimeout(attempt, 200));
    attempt();
  });
}

describe('graceful shutdown', () => {
  let server: ChildProcess | undefined;
  afterAll(() => {
    server?.kill('SIGKILL');
  });

  it('finishes a request already in flight after SIGTERM, then exits 0', async () => {
    [port] = await freePorts(1);
    server = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), ['server/index.ts'], {
      cwd: ROOT,
      env: { ...process.env, DATABASE_URL: testDatabaseUrl(), PORT: String(port), LOG_LEVEL: 'warn', SEED_DEMO: '0' },
      stdio: 'ignore',
    });
    const exited = new Promise<number | null>((resolve) => server!.on('exit', (code) => resolve(code)));
    await waitForHealth(Date.now() + 20_000);

    // Half a request: headers and part of the body, as a slow phone connection would send it.
    const body = JSON.stringify({ email: 'nobody@example.test', password: 'not-a-real-one' });
    const socket = net.connect(port, '127.0.0.1');
    await new Promise<void>((resolve) => socket.on('connect', () => resolve()));
    let answer = '';
    socket.on('data', (chunk) => (answer += chunk.toString()));
    socket.write(
      `POST /api/auth/sign-in HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\nOrigin: http://127.0.0.1:${port}\r\n` +
        `Content-Type: application/json\r\nContent-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body.slice(0, 10)}`,
    );
    await new Promise((resolve) => setTimeout(resolve, 300));

    server.kill('SIGTERM');
    await new Promise((resolve) => setTimeout(resolve, 300));
    // New connections are refused once shutdown has begun…
    await expect(fetch(`http://127.0.0.1:${port}/api/health`)).rejects.toThrow();
    // …but the request in flight still gets its answer.
    socket.write(body.slice(10));
    await new Promise<void>((resolve) => socket.on('close', () => resolve()));
    expect(answer).toMatch(/^HTTP\/1\.1 401/);

    expect(await exited).toBe(0);
  }, 40_000);
});
