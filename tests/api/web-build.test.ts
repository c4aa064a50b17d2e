import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestServer, type TestServer } from './support/server';

describe('serving the web build', () => {
  let server: TestServer;
  let webRoot: string;
  beforeAll(async () => {
    webRoot = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-web-'));
    await fs.writeFile(path.join(webRoot, 'index.html'), '<!doctype html><title>Sympodia</title><div id="root"></div>');
    await fs.mkdir(path.join(webRoot, '_expo'));
    await fs.writeFile(path.join(webRoot, '_expo', 'entry-abc123.js'), 'console.log(1)');
    server = await startTestServer({ webRoot });
  });
  afterAll(async () => {
    await server.close();
    await fs.rm(webRoot, { recursive: true, force: true });
  });

  it('answers an app route with the page, and a hashed bundle with long caching', async () => {
    const page = await supertest(server.url).get('/plants/4b0c8e9e-1c54-4d55-8a0c-6d1f1c2f3a4b');
    expect(page.status).toBe(200);
    expect(page.text).toContain('<div id="root">');
    expect(page.headers['cache-control']).toBe('no-cache');
    const bundle = await supertest(server.url).get('/_expo/entry-abc123.js');
    expect(bundle.status).toBe(200);
    expect(bundle.headers['cache-control']).toContain('immutable');
  });

  it('answers a missing file with 404, not with the page in its place', async () => {
    for (const missing of ['/canvaskit.wasm', '/_expo/gone-000.js', '/fonts/face.woff2']) {
      const res = await supertest(server.url).get(missing);
      expect(res.status, missing).toBe(404);
      expect(res.text).not.toContain('<div id="root">');
    }
  });
});
