import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDatabase } from '../../db/client';
import { browser, startTestServer, type TestServer } from './support/server';

describe('GET /api/health', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startTestServer();
  });
  afterAll(async () => {
    await server.close();
  });

  it('reports a reachable database', async () => {
    const res = await browser(server.url).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', database: 'up' });
  });

  it('reports 503 when the database cannot be reached', async () => {
    // Nothing listens on port 1 of loopback: the pool fails to connect.
    const unreachable = createDatabase('postgres://postgres@127.0.0.1:1/none', { max: 1 });
    const down = await startTestServer({ db: unreachable.db });
    try {
      const res = await browser(down.url).get('/api/health');
      expect(res.status).toBe(503);
      expect(res.body).toEqual({ status: 'degraded', database: 'down' });
      const me = await browser(down.url, 'sympodia_session=abc').get('/api/session');
      expect(me.status).toBe(503);
      expect(me.body.error.code).toBe('database_unavailable');
    } finally {
      await down.close();
      await unreachable.close();
    }
  });

  it('answers an unknown API route with the error body shape and 404', async () => {
    const res = await browser(server.url).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('no_route');
  });

  it('sends security headers', async () => {
    const res = await browser(server.url).get('/api/health');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});
