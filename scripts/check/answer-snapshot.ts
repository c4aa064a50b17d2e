/**
 * Every read answer of the API for the demo collection on a fixed day, as JSON, so that a change
 * meant to keep behaviour (a refactoring) can be checked byte for byte against the answers before
 * it:
 *
 *   bash scripts/check/answer-snapshot.sh before.json   # on the old code
 *   bash scripts/check/answer-snapshot.sh after.json    # on the new
 *   cmp before.json after.json
 *
 * Runs in one process on the test cluster's `sympodia_snapshot` database (made afresh), under a
 * clock fixed by the shell wrapper (libfaketime), with the demo seeded for that day. Ids the seed
 * makes at random (accounts, the collection) and timestamps of when rows were written are replaced
 * by stable placeholders; everything else is as sent.
 */
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import pino from 'pino';
import postgres from 'postgres';
import { createDatabase } from '../../db/client';
import { runMigrations } from '../../db/migrate';
import { seedDemo } from '../../db/seed';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../db/seed/demo-accounts';
import { createApp } from '../../server/app';
import { createRateLimits } from '../../server/middleware/rate-limit';
import { createWeatherClient } from '../../server/weather/client';
import { startFakeWeather } from '../../server/weather/fake-weather';

const DATABASE = 'sympodia_snapshot';
const TIME_KEYS = new Set(['createdAt', 'updatedAt', 'exportedAt', 'answeredAt', 'expiresAt', 'uploadedAt', 'receivedAt', 'fetchedAt']);

async function main() {
  const out = process.argv[2];
  if (!out) throw new Error('usage: answer-snapshot.ts <file.json>');
  const adminUrl = process.env.TEST_DATABASE_URL;
  if (!adminUrl) throw new Error('TEST_DATABASE_URL is not set');
  const admin = postgres(adminUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe(`drop database if exists ${DATABASE} with (force)`);
  await admin.unsafe(`create database ${DATABASE}`);
  await admin.end();
  const url = new URL(adminUrl);
  url.pathname = `/${DATABASE}`;
  await runMigrations(url.toString());
  const database = createDatabase(url.toString());
  const today = new Date().toISOString().slice(0, 10);
  await seedDemo(database.db, { log: () => {}, today });

  const weatherFake = await startFakeWeather();
  const app = createApp({
    db: database.db,
    logger: pino({ level: 'silent' }),
    weather: createWeatherClient({ baseUrl: weatherFake.url, timeoutMs: 2000 }),
    weatherFake,
    rateLimits: createRateLimits({ perIp: 10_000, perAccount: 10_000, windowSeconds: 60 }),
  } as Parameters<typeof createApp>[0]);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const owner = DEMO_ACCOUNTS.find((a) => a.role === 'owner')!;
  const signIn = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base },
    body: JSON.stringify({ email: owner.email, password: DEMO_PASSWORD }),
  });
  const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
  const get = async (path: string) => {
    const res = await fetch(`${base}/api${path}`, { headers: { cookie } });
    const text = await res.text();
    return { status: res.status, body: text.startsWith('{') || text.startsWith('[') ? JSON.parse(text) : text };
  };

  const answers: Record<string, unknown> = {};
  const session = await get('/session');
  answers['/session'] = session;
  const c = session.body.me.collections[0].id as string;
  const at = (p: string) => `/collections/${c}${p}`;
  for (const p of ['', '/members', '/areas', '/rounds', '/attention', `/attention?date=${today}`, '/calendar', '/backtest', '/compare?by=medium', '/compare?by=area', '/lead-stories', '/cold-nights', '/digest', '/export.json']) {
    answers[at(p)] = await get(at(p));
  }
  const plants = await get(at('/plants?pageSize=100'));
  answers[at('/plants?pageSize=100')] = plants;
  for (const plant of plants.body.items as Array<{ id: string; currentLeads: Array<{ id: string }> }>) {
    answers[at(`/plants/${plant.id}`)] = await get(at(`/plants/${plant.id}`));
    answers[at(`/plants/${plant.id}/trend`)] = await get(at(`/plants/${plant.id}/trend`));
    const detail = answers[at(`/plants/${plant.id}`)] as { body: { leads: Array<{ id: string }>; parentPlantId: string | null } };
    for (const lead of detail.body.leads ?? []) {
      answers[at(`/leads/${lead.id}`)] = await get(at(`/leads/${lead.id}`));
      answers[at(`/leads/${lead.id}/forecast`)] = await get(at(`/leads/${lead.id}/forecast`));
    }
  }
  const family = (plants.body.items as Array<{ id: string; parentPlantId: string | null }>).find((p) => p.parentPlantId);
  if (family) answers[at(`/compare?by=family&plantId=${family.parentPlantId}`)] = await get(at(`/compare?by=family&plantId=${family.parentPlantId}`));
  const calendar = answers[at('/calendar')] as { body: { windows: Array<{ firstOpen: { p50: string } }> } };
  const on = calendar.body.windows[0]?.firstOpen.p50;
  if (on) answers[at(`/calendar?on=${on}`)] = await get(at(`/calendar?on=${on}`));

  // Stable placeholders for what the seed makes at random.
  const random = new Map<string, string>([[c, '<collection>']]);
  const members = answers[at('/members')] as { body: { members?: Array<{ userId: string }> } | Array<{ userId: string }> };
  const list = Array.isArray(members.body) ? members.body : (members.body.members ?? []);
  list.forEach((m, i) => random.set(m.userId, `<user-${i}>`));
  random.set(session.body.me.user.id, '<owner>');
  let text = JSON.stringify(answers, (key, value) => (TIME_KEYS.has(key) && typeof value === 'string' ? '<time>' : value), 2);
  for (const [id, name] of random) text = text.split(id).join(name);
  fs.writeFileSync(out, `${text}\n`);
  console.log(`${Object.keys(answers).length} answers written to ${out} (as of ${today})`);
  server.close();
  await weatherFake.close();
  await database.close();
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
