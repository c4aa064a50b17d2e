import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';

export const ROOT = path.join(__dirname, '..', '..', '..');

/** `count` different loopback ports nothing listens on now (the system's choice), for server processes to take. */
export async function freePorts(count: number): Promise<number[]> {
  const probes = await Promise.all(
    Array.from({ length: count }, () => new Promise<net.Server>((resolve, reject) => {
      const probe = net.createServer();
      probe.once('error', reject);
      probe.listen(0, '127.0.0.1', () => resolve(probe));
    })),
  );
  const ports = probes.map((probe) => (probe.address() as net.AddressInfo).port);
  await Promise.all(probes.map((probe) => new Promise((resolve) => probe.close(resolve))));
  return ports;
}

export interface ServerProcess {
  url: string;
  port: number;
  /** The server's own process id (node itself, not a wrapper), so signals reach it. */
  pid: number;
  child: ChildProcess;
  /** Everything the process wrote to stdout and stderr so far (pino JSON lines at LOG_LEVEL). */
  output: () => string;
  /** Resolves with the exit code (or the signal's name) once the process has ended. */
  exited: Promise<number | string | null>;
  /** SIGTERM (graceful shutdown), then SIGKILL if it is still running after `graceMs`. */
  stop: (graceMs?: number) => Promise<void>;
  /** SIGKILL: no shutdown, no flush, as a crashed or OOM-killed process. */
  kill: () => Promise<void>;
}

export interface ServerProcessOptions {
  port: number;
  /** Added to this process's environment (DATABASE_URL, PHOTO_STORE, SMTP_HOST, …). */
  env: Record<string, string | undefined>;
  /** How long to wait for /api/health to answer 200. */
  startTimeoutMs?: number;
}

/**
 * Starts `server/index.ts` as production runs it: its own node process with tsx's loader
 * (node is the direct child, not a tsx wrapper, so SIGKILL kills the server itself), on
 * 127.0.0.1 and the given port. Resolves once /api/health answers 200.
 */
export async function startServerProcess(options: ServerProcessOptions): Promise<ServerProcess> {
  const url = `http://127.0.0.1:${options.port}`;
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: ROOT,
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(options.port), LOG_LEVEL: 'warn', ...options.env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout!.on('data', (chunk: Buffer) => (output += chunk.toString()));
  child.stderr!.on('data', (chunk: Buffer) => (output += chunk.toString()));
  const exited = new Promise<number | string | null>((resolve) => child.on('exit', (code, signal) => resolve(code ?? signal)));
  let ended = false;
  void exited.then(() => (ended = true));

  const deadline = Date.now() + (options.startTimeoutMs ?? 30_000);
  for (;;) {
    if (ended) throw new Error(`server on port ${options.port} exited during start:\n${output}`);
    const ok = await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(2000) }).then(
      (res) => res.status === 200,
      () => false,
    );
    if (ok) break;
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`server on port ${options.port} did not answer /api/health in time:\n${output}`);
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }

  const kill = async () => {
    if (!ended) child.kill('SIGKILL');
    await exited;
  };
  return {
    url,
    port: options.port,
    pid: child.pid!,
    child,
    output: () => output,
    exited,
    kill,
    stop: async (graceMs = 12_000) => {
      if (ended) return;
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
      await exited;
      clearTimeout(timer);
    },
  };
}

/** Signs in through the API and returns the session cookie (`name=value`). */
export async function signIn(url: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}: ${await res.text()}`);
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith('sympodia_session='));
  if (!cookie) throw new Error('sign-in set no session cookie');
  return cookie.split(';')[0];
}
