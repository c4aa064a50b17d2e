import fs from 'node:fs/promises';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionSchema } from '@/shared/schemas/auth';
import { BOOT_ELEMENT_ID, CURRENT_COLLECTION_COOKIE } from '@/shared/boot';
import { memberships } from '../../db/schema';
import { buildCollectionWithMembers, insertUser, sessionCookieFor } from '../factories/users';
import { testDb } from './support/database';
import { startTestServer, type TestServer } from './support/server';

const BUNDLE = 'console.log("the bundle");'.repeat(100);

/** The session JSON the page carries, parsed as the client parses it. */
function sessionInPage(html: string) {
  const match = new RegExp(`<script type="application/json" id="${BOOT_ELEMENT_ID}">(.*?)</script>`, 's').exec(html);
  return match ? sessionSchema.parse(JSON.parse(match[1])) : undefined;
}

/** Status, headers and the body's bytes exactly as sent (HTTP clients would decode them). */
function getRaw(url: string, acceptEncoding: string): Promise<{ headers: http.IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    http
      .get(url, { headers: { 'Accept-Encoding': acceptEncoding } }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (chunk: Buffer) => chunks.push(chunk));
        res.on('end', () => resolve({ headers: res.headers, body: Buffer.concat(chunks) }));
      })
      .on('error', reject);
  });
}

describe('serving the web build', () => {
  let server: TestServer;
  let webRoot: string;
  beforeAll(async () => {
    webRoot = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-web-'));
    await fs.writeFile(path.join(webRoot, 'index.html'), '<!doctype html><html><head><title>Sympodia</title></head><body><div id="root"></div></body></html>');
    const chunks = path.join(webRoot, '_expo', 'static', 'js', 'web');
    await fs.mkdir(chunks, { recursive: true });
    await fs.writeFile(path.join(chunks, 'entry-abc123.js'), BUNDLE);
    // As scripts/web/postbuild.mjs writes them: Brotli and gzip copies beside the file.
    // Quality 1: bytes that compressing on the fly (at its default quality) would not give.
    await fs.writeFile(path.join(chunks, 'entry-abc123.js.br'), zlib.brotliCompressSync(BUNDLE, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 1 } }));
    await fs.writeFile(path.join(chunks, 'entry-abc123.js.gz'), zlib.gzipSync(BUNDLE, { level: 1 }));
    await fs.mkdir(path.join(webRoot, 'assets', 'assets', 'fonts'), { recursive: true });
    await fs.writeFile(path.join(webRoot, 'assets', 'assets', 'fonts', 'Face_400.latin.abc.woff2'), 'wOF2');
    await fs.writeFile(
      path.join(webRoot, 'route-chunks.json'),
      JSON.stringify({
        '_layout.tsx': '/_expo/static/js/web/_layout-1.js',
        '(app)/_layout.tsx': '/_expo/static/js/web/_layout-2.js',
        '(app)/(tabs)/index.tsx': '/_expo/static/js/web/index-3.js',
        '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx': '/_expo/static/js/web/[leadId]-4.js',
      }),
    );
    server = await startTestServer({ webRoot });
  });
  afterAll(async () => {
    await server.close();
    await fs.rm(webRoot, { recursive: true, force: true });
  });

  it('answers an app route with the page, never stored, and a hashed bundle with long caching', async () => {
    const page = await supertest(server.url).get('/plants/4b0c8e9e-1c54-4d55-8a0c-6d1f1c2f3a4b');
    expect(page.status).toBe(200);
    expect(page.text).toContain('<div id="root">');
    expect(page.headers['cache-control']).toBe('private, no-store');
    expect(page.headers.vary).toMatch(/cookie/i);
    const bundle = await supertest(server.url).get('/_expo/static/js/web/entry-abc123.js');
    expect(bundle.status).toBe(200);
    expect(bundle.headers['cache-control']).toContain('immutable');
  });

  it('sends the Brotli copy to a browser that takes it, gzip to one that takes only gzip, and the file itself otherwise', async () => {
    const url = `${server.url}/_expo/static/js/web/entry-abc123.js`;
    const br = await getRaw(url, 'gzip, deflate, br, zstd');
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.headers['content-type']).toMatch(/javascript/);
    expect(br.headers['cache-control']).toContain('immutable');
    expect(zlib.brotliDecompressSync(br.body).toString()).toBe(BUNDLE);
    // The copy written at build time, not one compressed for this request.
    expect(br.body.equals(await fs.readFile(path.join(webRoot, '_expo/static/js/web/entry-abc123.js.br')))).toBe(true);

    const gz = await getRaw(url, 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(gz.body).toString()).toBe(BUNDLE);
    expect(gz.body.equals(await fs.readFile(path.join(webRoot, '_expo/static/js/web/entry-abc123.js.gz')))).toBe(true);

    const plain = await getRaw(url, 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.toString()).toBe(BUNDLE);
  });

  it("names the chunks of the page's route as preloads, layouts first, and the fonts", async () => {
    const today = await supertest(server.url).get('/');
    const preloads = [...today.text.matchAll(/<link rel="preload" as="script" fetchpriority="low" href="([^"]+)">/g)].map((m) => m[1]);
    expect(preloads).toEqual(['/_expo/static/js/web/_layout-1.js', '/_expo/static/js/web/_layout-2.js', '/_expo/static/js/web/index-3.js']);
    // The app's fonts too, in the CORS mode the browser fetches fonts with.
    expect(today.text).toContain('<link rel="preload" as="font" type="font/woff2" crossorigin fetchpriority="low" href="/assets/assets/fonts/Face_400.latin.abc.woff2">');
    const lead = await supertest(server.url).get('/plants/p1/leads/l2');
    // As the router's loader writes it: a percent-escaped name would be a different URL to the browser.
    expect(lead.text).toContain('href="/_expo/static/js/web/[leadId]-4.js"');
  });

  it('tells the page who is signed in, so the first screen does not ask again', async () => {
    const db = testDb();
    const { collectionId, people } = await buildCollectionWithMembers(db, 'Page bench');
    const page = await supertest(server.url).get('/').set('Cookie', people.grower.cookie);
    const session = sessionInPage(page.text);
    expect(session?.me?.user.email).toBe(people.grower.email);
    expect(session?.me?.collections.map((c) => c.id)).toContain(collectionId);
    // The same answer GET /api/session gives.
    const api = await supertest(server.url).get('/api/session').set('Cookie', people.grower.cookie);
    expect(session).toEqual(api.body);
  });

  it("starts the screen's first API requests with the page, in the browser's current collection", async () => {
    const db = testDb();
    const { collectionId, otherCollectionId, people } = await buildCollectionWithMembers(db, 'Preload bench');
    const fetches = (html: string) => [...html.matchAll(/<link rel="preload" as="fetch" crossorigin="use-credentials" href="([^"]+)">/g)].map((m) => m[1]);

    const today = await supertest(server.url).get('/').set('Cookie', people.grower.cookie);
    expect(fetches(today.text)).toEqual([`/api/collections/${collectionId}/attention`, `/api/collections/${collectionId}/cold-nights`]);

    // A second collection of theirs, remembered by the browser, is the one preloaded.
    await db.insert(memberships).values({ collectionId: otherCollectionId, userId: people.grower.id, role: 'viewer' });
    const chosen = await supertest(server.url).get('/').set('Cookie', `${people.grower.cookie}; ${CURRENT_COLLECTION_COOKIE}=${otherCollectionId}`);
    expect(fetches(chosen.text)[0]).toBe(`/api/collections/${otherCollectionId}/attention`);

    // Someone else's collection in the cookie is ignored: the first of theirs, as the app picks.
    const foreign = await supertest(server.url).get('/').set('Cookie', `${people.viewer.cookie}; ${CURRENT_COLLECTION_COOKIE}=${otherCollectionId}`);
    expect(fetches(foreign.text)[0]).toBe(`/api/collections/${collectionId}/attention`);

    const leadId = '6f1c7a52-3d2e-4a8b-9f10-2b7c4d5e6a70';
    const lead = await supertest(server.url).get(`/plants/0b5e2c1a-8d4f-4e6a-9b3c-1a2b3c4d5e6f/leads/${leadId}`).set('Cookie', people.viewer.cookie);
    expect(fetches(lead.text)).toEqual([
      `/api/collections/${collectionId}`,
      `/api/collections/${collectionId}/leads/${leadId}`,
      `/api/collections/${collectionId}/leads/${leadId}/forecast`,
    ]);
    // Malformed ids and signed-out pages start nothing.
    expect(fetches((await supertest(server.url).get('/plants/x/leads/y').set('Cookie', people.viewer.cookie)).text)).toEqual([]);
    expect(fetches((await supertest(server.url).get('/')).text)).toEqual([]);
  });

  it('writes a name that looks like markup so it cannot end the script element', async () => {
    const db = testDb();
    // `$'` and `$&` would be replacement patterns to String.replace.
    const name = "</script><script>alert(1)</script> <!-- Ann $' $& $$";
    const user = await insertUser(db, { displayName: name });
    const cookie = await sessionCookieFor(db, user.id);
    const page = await supertest(server.url).get('/').set('Cookie', cookie);
    expect(page.text).not.toContain('<script>alert(1)');
    expect(page.text.match(/<\/script>/g)).toHaveLength(1);
    expect(sessionInPage(page.text)?.me?.user.displayName).toBe(name);
  });

  it('says nobody is signed in without a cookie, and clears a cookie whose session is gone', async () => {
    const anonymous = await supertest(server.url).get('/sign-in');
    expect(sessionInPage(anonymous.text)).toEqual({ me: null });
    const stale = await supertest(server.url).get('/').set('Cookie', 'sympodia_session=nosuchsession0000000000000');
    expect(sessionInPage(stale.text)).toEqual({ me: null });
    const cleared = ((stale.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((c) => c.startsWith('sympodia_session='));
    expect(cleared).toMatch(/^sympodia_session=;/);
  });

  it('answers a missing file with 404, not with the page in its place', async () => {
    for (const missing of ['/canvaskit.wasm', '/_expo/gone-000.js', '/fonts/face.woff2']) {
      const res = await supertest(server.url).get(missing);
      expect(res.status, missing).toBe(404);
      expect(res.text).not.toContain('<div id="root">');
    }
  });
});
