import http from 'node:http';
import { gzipSync } from 'node:zlib';
import { sql } from 'drizzle-orm';
import fc from 'fast-check';
import { testDb } from './database';

// ── A raw HTTP client: the exact path and bytes given, no URL normalisation ─────────────

export interface RawResponse {
  status: number;
  headers: http.IncomingHttpHeaders;
  text: string;
  json: unknown;
}

const agent = new http.Agent({ keepAlive: true, maxSockets: 4 });

/**
 * Sends a request exactly as given. supertest and fetch resolve `..` and `%2e%2e` in paths
 * before sending; a hostile client does not, so neither does this.
 */
export function rawRequest(
  baseUrl: string,
  request: { method: string; path: string; headers?: Record<string, string>; body?: string | Buffer },
): Promise<RawResponse> {
  const { hostname, port } = new URL(baseUrl);
  return new Promise((resolve, reject) => {
    const body = request.body === undefined ? undefined : Buffer.isBuffer(request.body) ? request.body : Buffer.from(request.body, 'utf8');
    const req = http.request(
      {
        host: hostname,
        port: Number(port),
        method: request.method,
        path: request.path,
        agent,
        headers: { ...(body ? { 'Content-Length': String(body.length) } : {}), ...request.headers },
      },
      (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => {
          const text = Buffer.concat(chunks).toString('utf8');
          let json: unknown;
          try {
            json = text ? JSON.parse(text) : undefined;
          } catch {
            json = undefined;
          }
          resolve({ status: res.statusCode ?? 0, headers: res.headers, text, json });
        });
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    if (body) req.write(body);
    req.end();
  });
}

export function closeRawAgent(): void {
  agent.destroy();
}

// ── The database's state: row count and checksum of every table ────────────────────────

/**
 * Tables left out of the comparison: a rate-limit store kept in PostgreSQL counts every
 * attempt, refused or not, by design.
 */
const UNCOMPARED = /rate_?limit/i;

/**
 * `count` and md5 of every row's text, in a fixed order, per table of the public schema.
 * Rows are ordered by their whole text, which orders by the primary key's value wherever
 * two rows differ in it and is the same for every table without knowing its key.
 */
export async function databaseState(db: ReturnType<typeof testDb> = testDb()): Promise<Record<string, string>> {
  const tables = await db.execute<{ tablename: string }>(
    sql`select tablename from pg_tables where schemaname = 'public' order by tablename`,
  );
  const names = tables.map((t) => t.tablename).filter((name) => !UNCOMPARED.test(name));
  if (names.length === 0) return {};
  const query = names
    .map(
      (name) =>
        `select '${name}' as name, count(*)::text || ':' || md5(coalesce(string_agg(t::text, E'\\n' order by t::text), '')) as state from "${name}" t`,
    )
    .join(' union all ');
  const rows = await db.execute<{ name: string; state: string }>(sql.raw(query));
  return Object.fromEntries(rows.map((r) => [r.name, r.state]));
}

// ── Hostile values ──────────────────────────────────────────────────────────────────────

export const SQL_FRAGMENTS = [
  "' OR '1'='1",
  "'; DROP TABLE plants; --",
  '1; select pg_sleep(5)',
  "' UNION SELECT password_hash FROM users --",
  '$1',
  '\\x00',
  "E'\\\\'",
  '%',
  '_',
];

export const HTML_FRAGMENTS = [
  '<script>alert(1)</script>',
  '"><img src=x onerror=alert(1)>',
  '<svg/onload=alert(1)>',
  'javascript:alert(1)',
  '{{constructor.constructor("alert(1)")()}}',
  '</textarea><iframe src=//evil.example>',
];

/** Text the database or a careless check may trip on: NUL, lone surrogates, direction marks… */
export const UNICODE_EDGES = [
  'a\u0000b',
  '\u0000',
  '\ud800',
  'x\udfffy',
  '\u202eevil\u202c',
  '\u200f\u200e',
  '\ufeffbom',
  '🌸🪴👩🏽‍🌾',
  'e\u0301\u0301\u0301',
  '\u2028\u2029',
  'Z̸̡̛͓̗a̷̖̎l̶̢͊g̸͉̃o̵͚̍',
  '\uffff\ufffe',
  '\u00a0',
];

/** Numbers at the edges, and strings that a lax parser reads as numbers. */
export const EDGE_NUMBERS: unknown[] = [1e308, -1e308, Number.MAX_SAFE_INTEGER + 1, -(Number.MAX_SAFE_INTEGER + 1), 2 ** 31, -(2 ** 31) - 1, -0, 0.1 + 0.2, 5e-324, 1.5];
export const NUMBER_LIKE_STRINGS = ['NaN', 'Infinity', '-Infinity', '1e308', '1e1000', '-0', '0x10', '1_000', '١٢٣', ' 42 ', '42abc', ''];
export const IMPOSSIBLE_DATES = ['2026-02-30', '2025-02-29', '2026-13-01', '2026-00-10', '2026-04-31', '0000-00-00', '99999-01-01', '2026-1-1', '2026-02-3O', '2999-01-01', '2026-02-28T25:00:00Z', '2026-02-28 ; drop table plants'];

export const hugeString = (n: number) => 'ꝏ'.repeat(n);

/** Anything a hostile client could put in a JSON value. */
export function anyHostileValue(): fc.Arbitrary<unknown> {
  const leaf = fc.oneof(
    fc.constantFrom(...SQL_FRAGMENTS, ...HTML_FRAGMENTS, ...UNICODE_EDGES, ...NUMBER_LIKE_STRINGS, ...IMPOSSIBLE_DATES),
    fc.constantFrom(...EDGE_NUMBERS),
    fc.constantFrom(true, false, null, '', hugeString(3000)),
    fc.string({ unit: 'binary', maxLength: 40 }),
    fc.integer(),
    fc.double(),
  );
  return fc.oneof(
    { weight: 4, arbitrary: leaf },
    { weight: 1, arbitrary: fc.array(leaf, { maxLength: 4 }) },
    { weight: 1, arbitrary: fc.dictionary(fc.string({ maxLength: 8 }), leaf, { maxKeys: 3 }) },
    { weight: 1, arbitrary: fc.integer({ min: 50, max: 1000 }).map(deepNesting) },
  );
}

/** `[[[…]]]` or `{"a":{"a":…}}` nested `depth` levels. */
export function deepNesting(depth: number): unknown {
  let value: unknown = 'bottom';
  for (let i = 0; i < depth; i += 1) value = i % 2 === 0 ? [value] : { a: value };
  return value;
}

/** A value of a different JSON type from `valid`, never null (many fields are nullable). */
export function wrongType(valid: unknown): fc.Arbitrary<unknown> {
  const strings = fc.constantFrom<unknown>(...SQL_FRAGMENTS, ...HTML_FRAGMENTS, ...UNICODE_EDGES, ...NUMBER_LIKE_STRINGS);
  const numbers = fc.constantFrom<unknown>(...EDGE_NUMBERS.filter((n) => Number.isFinite(n)), 0, 1);
  const booleans = fc.constantFrom<unknown>(true, false);
  const arrays = fc.constantFrom<unknown>([], [valid], [[[]]], [{ __proto__: null }]);
  const objects = fc.constantFrom<unknown>({}, { value: valid }, { $gt: '' }, deepNesting(200));
  const choices: fc.Arbitrary<unknown>[] = [];
  if (typeof valid !== 'string') choices.push(strings);
  if (typeof valid !== 'number') choices.push(numbers);
  if (typeof valid !== 'boolean') choices.push(booleans);
  if (!Array.isArray(valid)) choices.push(arrays);
  if (Array.isArray(valid) || typeof valid !== 'object' || valid === null) choices.push(objects);
  return fc.oneof(...choices);
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const DATE = /^\d{4}-\d{2}-\d{2}$/;

/**
 * Values the field whose valid value is `valid` must refuse (inferred from that value's
 * shape): impossible dates for a date, non-ids for an id, out-of-range numbers for a number,
 * NUL, lone surrogates and overlong text for any text.
 */
export function mustRefuse(key: string, valid: unknown): fc.Arbitrary<unknown> {
  const badText = ['a\u0000b', '\u0000', 'bench\ud800', '\udc00', hugeString(4100)];
  if (typeof valid === 'number') {
    return fc.constantFrom<unknown>(1e308, -1e308, Number.MAX_SAFE_INTEGER + 1, -(Number.MAX_SAFE_INTEGER + 1), 2 ** 31, 1e15, ...NUMBER_LIKE_STRINGS);
  }
  if (typeof valid === 'boolean') return fc.constantFrom<unknown>('true', 'false', 1, 0, 'yes', []);
  if (Array.isArray(valid)) return fc.constantFrom<unknown>('[]', deepNesting(100), [[[]]], [SQL_FRAGMENTS[1]], { 0: valid[0] });
  if (typeof valid === 'string') {
    if (DATE.test(valid)) return fc.constantFrom<unknown>(...IMPOSSIBLE_DATES, ...badText);
    if (UUID.test(valid)) return fc.constantFrom<unknown>('not-a-uuid', '../../etc/passwd', SQL_FRAGMENTS[0], valid.toUpperCase() + 'x', valid.replace(/-/g, ''), '00000000-0000-0000-0000-00000000000g', ...badText);
    if (valid.includes('@')) return fc.constantFrom<unknown>('a@b', `${'x'.repeat(300)}@example.test`, 'some one@example.test', `<script>@example.test`, "x'--@example.test\u0000", ...badText);
    if (key === 'password' || key === 'token') return fc.constantFrom<unknown>('short', 'x'.repeat(5000), ...badText);
    return fc.constantFrom<unknown>(...badText);
  }
  return fc.constantFrom<unknown>(...badText);
}

/** Keys that pollute `Object.prototype` if a server merges input carelessly. */
export const POLLUTING_KEYS = ['__proto__', 'constructor', 'prototype'];

/** A JSON text with own `__proto__` keys (JSON.stringify of a literal would drop them). */
export function withPollutingKeys(body: Record<string, unknown>, keys: string[]): string {
  const text = JSON.stringify(body);
  const extra = keys.map((k) => `${JSON.stringify(k)}:{"polluted":true,"isAdmin":true,"role":"owner"}`).join(',');
  if (!extra) return text;
  return text === '{}' ? `{${extra}}` : `${text.slice(0, -1)},${extra}}`;
}

// ── Whole requests ──────────────────────────────────────────────────────────────────────

export type HostileKind = 'poisoned-body' | 'refused-value' | 'generic-body' | 'raw-body' | 'path-param' | 'query' | 'multipart';

export interface HostileRequest {
  kind: HostileKind;
  method: string;
  path: string;
  headers: Record<string, string>;
  body?: string | Buffer;
  /** For refused values: the field the answer must name. */
  field?: string;
  /** A short description for failure messages. */
  label: string;
}

const gzipOfJson = gzipSync(Buffer.from(JSON.stringify({ name: 'Windowsill', email: 'x@example.test' })));

/**
 * JSON bodies that are not JSON, or not what express.json will take, and ones whose
 * Content-Encoding they do not keep (not compressed at all, or cut short).
 */
export const RAW_BODIES: { contentType: string; body: string | Buffer; encoding?: string }[] = [
  { contentType: 'application/json', encoding: 'gzip', body: Buffer.from('{"name":"not gzip at all"}') },
  { contentType: 'application/json', encoding: 'gzip', body: gzipOfJson.subarray(0, gzipOfJson.length - 9) },
  { contentType: 'application/json', encoding: 'br', body: Buffer.from('not brotli either, just text') },
  { contentType: 'application/json', encoding: 'deflate', body: Buffer.from([0x78, 0x9c, 0xff, 0xff, 0x00, 0x01, 0x02]) },

  { contentType: 'application/json', body: '{"name": ' },
  { contentType: 'application/json', body: '{"__proto__": {"polluted": true}' },
  { contentType: 'application/json', body: "{'single': 'quotes'}" },
  { contentType: 'application/json', body: '{"a":1,}' },
  { contentType: 'application/json', body: 'NaN' },
  { contentType: 'application/json', body: '\u0000' },
  { contentType: 'application/json', body: Buffer.from([0xff, 0xfe, 0x00, 0x7b, 0xc3, 0x28]) },
  { contentType: 'application/json', body: '['.repeat(20_000) },
  { contentType: 'application/json; charset=utf-32', body: '{}' },
  { contentType: 'application/json', body: JSON.stringify({ filler: 'x'.repeat(120_000) }) },
];

/**
 * CSV bodies whose Content-Encoding they do not keep, for the routes that read CSV (express.json
 * passes them by, so a route that reads no body would act on one).
 */
export const UNDECODABLE_CSV: { contentType: string; body: Buffer; encoding: string }[] = [
  { contentType: 'text/csv', encoding: 'gzip', body: Buffer.from('tag,genus\nA-1,C.\n') },
  { contentType: 'text/csv', encoding: 'br', body: Buffer.from([0x1b, 0xff, 0xff, 0xff, 0x00]) },
];

/** Top-level JSON values a route expecting an object must refuse. */
export function genericBody(): fc.Arbitrary<string> {
  return fc.oneof(
    fc.constantFrom('[]', '"a string"', '42', 'true', 'null', '[{"name":"x"}]', '['.repeat(5000) + ']'.repeat(5000), `[${'{"a":'.repeat(5000)}1${'}'.repeat(5000)}]`),
    anyHostileValue().filter((v) => typeof v !== 'object' || v === null || Array.isArray(v)).map((v) => JSON.stringify(v) ?? 'null'),
  );
}

/** Path parameter values: not ids, huge, encoded slashes, dot segments, NUL, SQL, unicode. */
export const HOSTILE_PARAMS = [
  'not-a-uuid',
  '..',
  '%2e%2e',
  '..%2F..%2Fetc%2Fpasswd',
  '%2F',
  'a%2Fb',
  '%00',
  '%C0%AE%C0%AE',
  '%E2%80%AE',
  '%F0%9F%8C%B8',
  '%ED%A0%80',
  encodeURIComponent(SQL_FRAGMENTS[0]),
  encodeURIComponent(SQL_FRAGMENTS[1]),
  encodeURIComponent(HTML_FRAGMENTS[0]),
  '00000000-0000-0000-0000-000000000000',
  'FFFFFFFF-FFFF-FFFF-FFFF-FFFFFFFFFFFF',
  '123e4567-e89b-12d3-a456-42661417400',
  '1e308',
  '-0',
  'NaN',
  '__proto__',
  'constructor',
  'x'.repeat(4000),
  '%'.repeat(3),
  '%zz',
];

/** Query strings: arrays, repeated keys, nested brackets, pollution, huge values. */
export const HOSTILE_QUERIES = [
  'page=1&page=2',
  'page[]=1',
  'page[$gt]=0',
  'a[b][c]=1',
  '__proto__[polluted]=1',
  'constructor[prototype][polluted]=1',
  'pageSize=1e308',
  'pageSize=-0',
  'pageSize=NaN',
  'page=9007199254740993',
  'q=' + encodeURIComponent(SQL_FRAGMENTS[0]),
  'q=' + encodeURIComponent(SQL_FRAGMENTS[1]),
  'q=%00',
  'q=%ED%A0%80',
  'q=' + 'x'.repeat(5000),
  'sort=__proto__',
  'order=desc;drop',
  'leadId=not-a-uuid',
  'leadId[]=1&leadId[]=2',
  'plantId=' + encodeURIComponent(HTML_FRAGMENTS[0]),
  'by[]=medium',
  'by=__proto__',
  'from=2026-02-30&to=2026-13-01',
  'season=1e308',
  'days=-1',
  '%zz=%zz',
  '&&&==',
  'a=' + '%'.repeat(3),
];
