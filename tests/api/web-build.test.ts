import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pageDataSchema, type PageData } from '@/shared/schemas/auth';
import { BOOT_ELEMENT_ID, CURRENT_COLLECTION_COOKIE, WIDE_LAYOUT_COOKIE } from '@/shared/boot';
import { memberships } from '../../db/schema';
import { buildCollectionWithMembers, insertUser, sessionCookieFor } from '../factories/users';
import { testDb } from './support/database';
import { startTestServer, type TestServer } from './support/server';
import { CHUNKS, ROUTES, writeStandInBuild } from './support/web-build';

const BUNDLE = 'console.log("the bundle");'.repeat(100);
/** The page data the page carries, parsed as the client parses it. */
function dataInPage(html: string): PageData | undefined {
  const match = new RegExp(`<script type="application/json" id="${BOOT_ELEMENT_ID}">(.*?)</script>`, 's').exec(html);
  return match ? pageDataSchema.parse(JSON.parse(match[1])) : undefined;
}

/** The page data the app was drawn from on the server (as the stand-in render module saw it). */
function dataSeenByRender(html: string): unknown {
  const match = /<textarea id="seen">(.*?)<\/textarea>/s.exec(html);
  return match ? JSON.parse(match[1].replace(/&lt;/g, '<')) : undefined;
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
    const chunks = path.join(webRoot, 'client', '_expo', 'static', 'js', 'web');
    await fs.mkdir(chunks, { recursive: true });
    await fs.writeFile(path.join(chunks, 'entry-abc123.js'), BUNDLE);
    // As scripts/web/postbuild.mjs writes them: Brotli and gzip copies beside the file.
    // Quality 1: bytes that compressing on the fly (at its default quality) would not give.
    await fs.writeFile(path.join(chunks, 'entry-abc123.js.br'), zlib.brotliCompressSync(BUNDLE, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 1 } }));
    await fs.writeFile(path.join(chunks, 'entry-abc123.js.gz'), zlib.gzipSync(BUNDLE, { level: 1 }));
    await writeStandInBuild(webRoot);
    server = await startTestServer({ webRoot });
  });
  afterAll(async () => {
    await server.close();
    await fs.rm(webRoot, { recursive: true, force: true });
  });

  it('answers an app route with the page drawn for it, never stored, and a hashed bundle with long caching', async () => {
    const page = await supertest(server.url).get('/plants/4b0c8e9e-1c54-4d55-8a0c-6d1f1c2f3a4b/leads/x');
    expect(page.status).toBe(200);
    expect(page.text).toContain('<div id="root" data-path="/plants/4b0c8e9e-1c54-4d55-8a0c-6d1f1c2f3a4b/leads/x">');
    expect(page.headers['cache-control']).toBe('private, no-store');
    expect(page.headers.vary).toMatch(/cookie/i);
    // The head manager's empty title is dropped, so the document's own is the page's title.
    expect(page.text).not.toContain('<title data-rh="true"></title>');
    expect(page.text).toContain('<title>Sympodia</title>');
    const bundle = await supertest(server.url).get(`${CHUNKS}/entry-abc123.js`);
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
    expect(br.body.equals(await fs.readFile(path.join(webRoot, 'client/_expo/static/js/web/entry-abc123.js.br')))).toBe(true);

    const gz = await getRaw(url, 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(gz.body).toString()).toBe(BUNDLE);
    expect(gz.body.equals(await fs.readFile(path.join(webRoot, 'client/_expo/static/js/web/entry-abc123.js.gz')))).toBe(true);

    const plain = await getRaw(url, 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.toString()).toBe(BUNDLE);
  });

  it("asks for the page's scripts after its first paint, in order, under a policy that allows exactly its inline scripts", async () => {
    const today = await supertest(server.url).get('/');
    // No script element the browser would fetch while the page is being painted.
    expect(today.text).not.toMatch(/<script[^>]*\bsrc=/);
    expect(today.text).not.toMatch(/rel="preload"[^>]*as="script"/);
    const listed = /var s=(\[.*?\]),d=/.exec(today.text)?.[1];
    expect(JSON.parse(listed ?? 'null')).toEqual([...ROUTES.assets.js, `${CHUNKS}/_layout-1.js`, `${CHUNKS}/index-3.js`]);
    const lead = await supertest(server.url).get('/plants/p1/leads/l2');
    expect(JSON.parse(/var s=(\[.*?\]),d=/.exec(lead.text)?.[1] ?? 'null')).toContain(`${CHUNKS}/[leadId]-4.js`);
    // The router is told to take the page over rather than draw it again.
    expect(today.text).toContain('<script>globalThis.__EXPO_ROUTER_HYDRATE__=true;</script>');

    const policy = String(today.headers['content-security-policy']);
    const scriptSrc = /script-src([^;]*)/.exec(policy)?.[1].trim().split(/\s+/) ?? [];
    const inline = [...today.text.matchAll(/<script(?![^>]*type="application\/json")[^>]*>([\s\S]*?)<\/script>/g)].map(
      (m) => `'sha256-${crypto.createHash('sha256').update(m[1]).digest('base64')}'`,
    );
    expect(inline).toHaveLength(2);
    expect(scriptSrc.filter((source) => source.startsWith("'sha256-")).sort()).toEqual([...inline].sort());
    expect(scriptSrc).toEqual(expect.arrayContaining(["'self'", "'wasm-unsafe-eval'"]));
    expect(scriptSrc).not.toContain("'unsafe-inline'");
  });

  it('draws the page from who is signed in and writes the same data into it', async () => {
    const db = testDb();
    const { collectionId, people } = await buildCollectionWithMembers(db, 'Page bench');
    const page = await supertest(server.url).get('/').set('Cookie', people.grower.cookie);
    const data = dataInPage(page.text);
    expect(data?.me?.user.email).toBe(people.grower.email);
    expect(data?.me?.collections.map((c) => c.id)).toContain(collectionId);
    expect(data?.today).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    // When its answers were asked for, so the browser knows their age.
    expect(Math.abs(Date.now() - (data?.answeredAt ?? 0))).toBeLessThan(60_000);
    // The same answer GET /api/session gives, and what the app was drawn from.
    const api = await supertest(server.url).get('/api/session').set('Cookie', people.grower.cookie);
    expect(data?.me).toEqual(api.body.me);
    expect(dataSeenByRender(page.text)).toEqual(data);
    // Nothing is left in the global once the page is drawn.
    expect((globalThis as Record<string, unknown>).__sympodiaPageData).toBeUndefined();
  });

  it('draws the page in the layout the browser last had, the phone layout when it has not said', async () => {
    const db = testDb();
    const { people } = await buildCollectionWithMembers(db, 'Layout bench');
    const wide = dataInPage((await supertest(server.url).get('/').set('Cookie', `${people.grower.cookie}; ${WIDE_LAYOUT_COOKIE}=1`)).text);
    expect(wide?.wide).toBe(true);
    const narrow = dataInPage((await supertest(server.url).get('/').set('Cookie', `${people.grower.cookie}; ${WIDE_LAYOUT_COOKIE}=0`)).text);
    expect(narrow?.wide).toBeUndefined();
    expect(dataInPage((await supertest(server.url).get('/sign-in')).text)?.wide).toBeUndefined();
  });

  it("carries the screen's first API answers, in the browser's current collection", async () => {
    const db = testDb();
    const { collectionId, otherCollectionId, people } = await buildCollectionWithMembers(db, 'Answers bench');
    const today = await supertest(server.url).get('/').set('Cookie', people.grower.cookie);
    const data = dataInPage(today.text);
    expect(data?.collectionId).toBe(collectionId);
    expect(Object.keys(data?.responses ?? {})).toEqual([`/collections/${collectionId}/attention`, `/collections/${collectionId}/cold-nights`]);
    // Exactly what the browser would be told.
    const attention = await supertest(server.url).get(`/api/collections/${collectionId}/attention`).set('Cookie', people.grower.cookie);
    expect(data?.responses?.[`/collections/${collectionId}/attention`]).toEqual(attention.body);
    expect(dataSeenByRender(today.text)).toEqual(data);

    // A second collection of theirs, remembered by the browser, is the one drawn.
    await db.insert(memberships).values({ collectionId: otherCollectionId, userId: people.grower.id, role: 'viewer' });
    const chosen = dataInPage((await supertest(server.url).get('/').set('Cookie', `${people.grower.cookie}; ${CURRENT_COLLECTION_COOKIE}=${otherCollectionId}`)).text);
    expect(chosen?.collectionId).toBe(otherCollectionId);
    expect(Object.keys(chosen?.responses ?? {})[0]).toBe(`/collections/${otherCollectionId}/attention`);

    // Someone else's collection in the cookie is ignored: the first of theirs, as the app picks.
    const foreign = dataInPage((await supertest(server.url).get('/').set('Cookie', `${people.viewer.cookie}; ${CURRENT_COLLECTION_COOKIE}=${otherCollectionId}`)).text);
    expect(foreign?.collectionId).toBe(collectionId);

    // A lead that does not exist: the collection is carried, the refused answers are left to the screen.
    const leadId = '6f1c7a52-3d2e-4a8b-9f10-2b7c4d5e6a70';
    const lead = dataInPage((await supertest(server.url).get(`/plants/0b5e2c1a-8d4f-4e6a-9b3c-1a2b3c4d5e6f/leads/${leadId}`).set('Cookie', people.viewer.cookie)).text);
    expect(Object.keys(lead?.responses ?? {})).toEqual([`/collections/${collectionId}`]);
    // Malformed ids, screens without first answers and signed-out pages carry none.
    expect(dataInPage((await supertest(server.url).get('/plants/x/leads/y').set('Cookie', people.viewer.cookie)).text)?.responses).toEqual({});
    expect(dataInPage((await supertest(server.url).get('/sign-in').set('Cookie', people.viewer.cookie)).text)?.responses).toEqual({});
    expect(dataInPage((await supertest(server.url).get('/')).text)?.responses).toBeUndefined();
  });

  it('draws pages asked for at once each from its own visitor', async () => {
    const db = testDb();
    const visitors = await Promise.all(
      [1, 2, 3, 4, 5].map(async (n) => {
        const user = await insertUser(db, { displayName: `Visitor ${n}` });
        return { name: `Visitor ${n}`, cookie: await sessionCookieFor(db, user.id) };
      }),
    );
    const pages = await Promise.all(visitors.map((v) => supertest(server.url).get('/').set('Cookie', v.cookie)));
    pages.forEach((page, i) => {
      const seen = dataSeenByRender(page.text) as PageData;
      expect(seen.me?.user.displayName).toBe(visitors[i].name);
      expect(dataInPage(page.text)?.me?.user.displayName).toBe(visitors[i].name);
    });
  });

  it('draws an address that starts with two slashes as a path, never as another host', async () => {
    const page = await supertest(server.url).get('//evil.example/x?y=1');
    expect(page.status).toBe(200);
    expect(page.text).toContain('<div id="root" data-path="//evil.example/x">');
    // One that no URL parser takes as an address is still a path, not a server error.
    expect((await supertest(server.url).get('//[')).status).toBeLessThan(500);
  });

  it('writes a name that looks like markup so it cannot end the script element', async () => {
    const db = testDb();
    // `$'` and `$&` would be replacement patterns to String.replace.
    const name = "</script><script>alert(1)</script> <!-- Ann $' $& $$";
    const user = await insertUser(db, { displayName: name });
    const cookie = await sessionCookieFor(db, user.id);
    const page = await supertest(server.url).get('/').set('Cookie', cookie);
    expect(page.text).not.toContain('<script>alert(1)');
    expect(dataInPage(page.text)?.me?.user.displayName).toBe(name);
  });

  it('says nobody is signed in without a cookie, and clears a cookie whose session is gone', async () => {
    const anonymous = await supertest(server.url).get('/sign-in');
    expect(dataInPage(anonymous.text)?.me).toBeNull();
    const stale = await supertest(server.url).get('/').set('Cookie', 'sympodia_session=nosuchsession0000000000000');
    expect(dataInPage(stale.text)?.me).toBeNull();
    const cleared = ((stale.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((c) => c.startsWith('sympodia_session='));
    expect(cleared).toMatch(/^sympodia_session=;/);
  });

  it('answers a missing file with 404, not with the page in its place', async () => {
    for (const missing of ['/canvaskit.wasm', '/_expo/gone-000.js', '/fonts/face.woff2']) {
      const res = await supertest(server.url).get(missing);
      expect(res.status, missing).toBe(404);
      expect(res.text).not.toContain('<div id="root"');
    }
  });
});
