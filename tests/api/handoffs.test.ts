import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { and, eq, inArray } from 'drizzle-orm';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bloomRecords, careEntries, collections, divisionHandoffs, leads, measurements, memberships, plants } from '../../db/schema';
import { processPhoto } from '../../server/photos/process';
import { localDiskStore, type PhotoStore } from '../../server/photos/store';
import { addPhoto } from '../../server/services/photos';
import { insertHandoff } from '../factories/handoffs';
import { mailTo, tokenFrom } from '../factories/mail';
import { cameraJpeg } from '../factories/photos';
import { daysAgo, insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { insertUser, sessionCookieFor } from '../factories/users';
import { rowCounts, testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { browser, startTestServer, type TestServer } from './support/server';

let server: TestServer;
let photoDir: string;
let store: PhotoStore;
beforeAll(async () => {
  photoDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-handoff-photos-'));
  store = localDiskStore(photoDir);
  server = await startTestServer({ photoStore: store });
});
afterAll(async () => {
  await server.close();
  await fs.rm(photoDir, { recursive: true, force: true });
});

const today = () => new Date().toISOString().slice(0, 10);

/** Files under the photo folder, so a test can tell what the store holds. */
async function storedFiles(root = photoDir): Promise<string[]> {
  const entries = await fs.readdir(root, { recursive: true, withFileTypes: true }).catch(() => []);
  return entries.filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name));
}

async function photoOn(leadId: string, collectionId: string, userId: string, takenOn: string, photoStore = store) {
  const processed = await processPhoto(await cameraJpeg({ width: 240, height: 160, orientation: 1 }), today());
  return (await addPhoto(testDb(), photoStore, { collectionId, userId, role: 'grower' }, { leadId, takenOn, caption: null }, processed, 1000, today())).photo;
}

/** A signed-in person with a collection of their own (owner), outside the giver's collection. */
async function person(displayName: string) {
  const db = testDb();
  const user = await insertUser(db, { displayName });
  const [own] = await db.insert(collections).values({ name: `${displayName}'s bench` }).returning();
  await db.insert(memberships).values({ collectionId: own.id, userId: user.id, role: 'owner' });
  const cookie = await sessionCookieFor(db, user.id);
  return { ...user, displayName, collectionId: own.id, cookie, client: browser(server.url, cookie) };
}

/**
 * A three-plant lineage in the giver's collection: a grandparent divided 700 days ago into the
 * parent, the parent divided 60 days ago into the division that is handed over. Each ancestor
 * also has records from after the division that must stay behind.
 */
async function lineageWorld(options: { photoStore?: PhotoStore } = {}) {
  const w = await collectionWorld(server);
  const db = testDb();
  const grandparent = await insertPlant(db, w.collectionId, { tag: 'SOB-1', genus: 'Den.', epithet: 'Copper Ladder' });
  const parent = await insertPlant(db, w.collectionId, {
    tag: 'SOB-1a', genus: 'Den.', epithet: 'Copper Ladder', parentPlantId: grandparent.id, dividedOn: daysAgo(700),
  });
  const division = await insertPlant(db, w.collectionId, {
    tag: 'SOB-1a1', genus: 'Den.', epithet: 'Copper Ladder', parentPlantId: parent.id, dividedOn: daysAgo(60), medium: 'bark',
  });

  // The grandparent: one lead from before its division (comes along), one from after (stays).
  const oldLead = await insertLead(db, grandparent, { season: 2024, label: '2024-A', firstSeen: daysAgo(800), status: 'mature' });
  await insertMeasurement(db, oldLead, { measuredOn: daysAgo(790), heightMm: 20 });
  await insertMeasurement(db, oldLead, { measuredOn: daysAgo(750), heightMm: 160 });
  const lateGrandparentLead = await insertLead(db, grandparent, { season: 2025, label: '2025-G', firstSeen: daysAgo(650) });

  // The parent's last season: grown and bloomed before the division; one measurement after it.
  const parentLead = await insertLead(db, parent, { season: 2025, label: '2025-A', firstSeen: daysAgo(400), status: 'mature' });
  const heights = [8, 14, 25, 42, 66, 95, 124, 148, 164, 173, 178, 180, 181];
  for (const [i, heightMm] of heights.entries()) await insertMeasurement(db, parentLead, { measuredOn: daysAgo(390 - i * 20), heightMm });
  const afterDivision = await insertMeasurement(db, parentLead, { measuredOn: daysAgo(30), heightMm: 182, note: 'after the division' });
  await db.insert(bloomRecords).values({
    collectionId: w.collectionId, leadId: parentLead.id, budsSeenOn: daysAgo(200), firstOpenOn: daysAgo(180), lastFadedOn: daysAgo(40), flowerCount: 6, spikeCount: 1,
  });
  const parentNewLead = await insertLead(db, parent, { season: 2026, label: '2026-P', firstSeen: daysAgo(20) });

  // The division's own lead (moved to it at division time) with its measurements.
  const ownLead = await insertLead(db, division, { season: 2026, label: '2026-A', firstSeen: daysAgo(50) });
  for (const [d, heightMm] of [[45, 6], [35, 12], [20, 22]] as const) await insertMeasurement(db, ownLead, { measuredOn: daysAgo(d), heightMm });

  const photoStore = options.photoStore ?? store;
  const photos = {
    parentBefore: await photoOn(parentLead.id, w.collectionId, w.people.grower.id, daysAgo(190), photoStore),
    parentAfter: await photoOn(parentLead.id, w.collectionId, w.people.grower.id, daysAgo(10), photoStore),
    division: await photoOn(ownLead.id, w.collectionId, w.people.grower.id, daysAgo(5), photoStore),
  };
  return { w, grandparent, parent, division, oldLead, lateGrandparentLead, parentLead, parentNewLead, afterDivision, ownLead, photos };
}

async function send(w: Awaited<ReturnType<typeof collectionWorld>>, plantId: string, email: string, note?: string) {
  const res = await w.grower.post(w.at(`/plants/${plantId}/handoffs`), { email, note });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const [message] = await mailTo(server.mail, email.toLowerCase());
  return { handoff: res.body, token: tokenFrom(message, 'handoff'), message };
}

describe('sending a division', () => {
  it('mails a single link with what comes along, lists it as pending, and lets a viewer do none of it', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Marguerite Vane');
    const { handoff, token, message } = await send(w, division.id, recipient.email.toUpperCase(), 'Keep it bright');
    expect(handoff).toMatchObject({ plantId: division.id, plantTag: 'SOB-1a1', recipientEmail: recipient.email, note: 'Keep it bright', canRevoke: true });
    const lifetimeDays = (Date.parse(handoff.expiresAt) - Date.parse(handoff.createdAt)) / 86_400_000;
    expect(lifetimeDays).toBeCloseTo(14, 2);
    expect(message.text).toContain(`/handoff/${token}`);
    expect(message.text).toMatch(/parent plant's history|ancestor plants' history/);
    expect(message.text).toContain('Keep it bright');

    // Only the SHA-256 of the token is stored.
    const [row] = await testDb().select().from(divisionHandoffs).where(eq(divisionHandoffs.id, handoff.id));
    expect(row.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(row.tokenHash).not.toContain(token);

    const forPlant = await w.owner.get(w.at(`/plants/${division.id}/handoffs`));
    expect(forPlant.body.map((h: { id: string }) => h.id)).toEqual([handoff.id]);
    expect(forPlant.body[0].canRevoke).toBe(true);
    const all = await w.grower.get(w.at('/handoffs'));
    expect(all.body.map((h: { id: string }) => h.id)).toEqual([handoff.id]);

    expectRefused(await w.viewer.post(w.at(`/plants/${division.id}/handoffs`), { email: 'someone@example.test' }), 403);
    expectRefused(await w.viewer.get(w.at('/handoffs')), 403);
    expectRefused(await w.grower.post(w.at(`/plants/${division.id}/handoffs`), { email: 'not an address' }), 400, 'email');
  });

  it('previews plant, giver, division date and the counts of what comes along', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Ines Halloway');
    const { token } = await send(w, division.id, recipient.email);
    const res = await browser(server.url).get(`/api/handoffs/${token}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({
      plantName: 'Den. Copper Ladder',
      plantTag: 'SOB-1a1',
      givenBy: 'grower of Test bench',
      recipientEmail: recipient.email,
      note: null,
      dividedOn: daysAgo(60),
      expiresAt: expect.any(String),
      contents: {
        historyPlants: 2,
        historyLeads: 2, // the grandparent's 2024-A and the parent's 2025-A
        historyMeasurements: 15, // 2 + 13: the parent's measurement from after the division stays
        historyBlooms: 1,
        ownLeads: 1,
        ownMeasurements: 3,
        ownBlooms: 0,
        photos: 2, // the parent's photo from before the division and the division's own
      },
    });
  });
});

describe('accepting a division', () => {
  it('copies the history up to the division date and not after, and the engine forecasts from it', async () => {
    const world = await lineageWorld();
    const { w, division, parentLead, oldLead } = world;
    const recipient = await person('Theo Brandt');
    // The recipient already has a plant with the same tag: the copy is suffixed, and says so.
    await insertPlant(testDb(), recipient.collectionId, { tag: 'SOB-1a1' });
    const { token } = await send(w, division.id, recipient.email);

    const res = await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ collectionId: recipient.collectionId, tag: 'SOB-1a1-2', tagChangedFrom: 'SOB-1a1' });
    const at = (p: string) => `/api/collections/${recipient.collectionId}${p}`;

    const copied = (await recipient.client.get(at(`/plants/${res.body.plantId}`))).body;
    expect(copied).toMatchObject({
      tag: 'SOB-1a1-2', genus: 'Den.', epithet: 'Copper Ladder', medium: 'bark', dividedOn: daysAgo(60),
      historyOnly: false, receivedFrom: 'grower of Test bench', givenAwayOn: null,
    });
    expect(copied.leads.map((l: { label: string }) => l.label)).toEqual(['2026-A']);

    const parentCopy = (await recipient.client.get(at(`/plants/${copied.parentPlantId}`))).body;
    expect(parentCopy).toMatchObject({ tag: 'SOB-1a-history', historyOnly: true, receivedFrom: 'grower of Test bench', dividedOn: daysAgo(700) });
    expect(parentCopy.leads.map((l: { label: string }) => l.label)).toEqual(['2025-A']); // 2026-P came after the division
    const grandparentCopy = (await recipient.client.get(at(`/plants/${parentCopy.parentPlantId}`))).body;
    expect(grandparentCopy).toMatchObject({ tag: 'SOB-1-history', historyOnly: true, parentPlantId: null });
    expect(grandparentCopy.leads.map((l: { label: string }) => l.label)).toEqual(['2024-A']); // 2025-G came after its division

    const copiedParentLead = (await recipient.client.get(at(`/leads/${parentCopy.leads[0].id}`))).body;
    const dates = copiedParentLead.measurements.map((m: { date: string }) => m.date);
    expect(dates).toHaveLength(13);
    expect(dates.every((d: string) => d <= daysAgo(60))).toBe(true);
    expect(copiedParentLead.measurements.map((m: { note: string | null }) => m.note)).not.toContain('after the division');
    // Bloom dates after the division date are dropped; earlier ones come along.
    expect(copiedParentLead.bloom).toMatchObject({ budsSeenOn: daysAgo(200), firstOpenOn: daysAgo(180), lastFadedOn: null, flowerCount: 6 });
    const copiedOldLead = (await recipient.client.get(at(`/leads/${grandparentCopy.leads[0].id}`))).body;
    expect(copiedOldLead.measurements.map((m: { heightMm: number }) => m.heightMm)).toEqual([20, 160]);

    // The giver's rows are untouched apart from the note on the division.
    const stillThere = await testDb().select().from(measurements).where(eq(measurements.leadId, parentLead.id));
    expect(stillThere).toHaveLength(14);
    expect((await testDb().select().from(leads).where(eq(leads.id, oldLead.id)))[0].plantId).toBe(world.grandparent.id);

    // The division's forecast in the recipient's collection compares with the copied 2025 season.
    const ownLeadId = copied.leads[0].id;
    const forecast = await recipient.client.get(at(`/leads/${ownLeadId}/forecast`));
    expect(forecast.status, JSON.stringify(forecast.body)).toBe(200);
    expect(forecast.body.priorYears.verdict).not.toBe('no_history');
    expect(forecast.body.priorYears.lastSeason).toMatchObject({ leadId: copiedParentLead.id, season: 2025 });
    expect(forecast.body.priorYears.lastSeason.finalHeightMm).toBeGreaterThan(150);
  });

  it('marks the giver\'s plant, drops it from attention and Rounds, and makes the link single use', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Oona Pell');
    const { token } = await send(w, division.id, recipient.email);

    const before = await w.viewer.get(w.at('/attention'));
    expect(before.body.items.some((i: { target: { plantId: string } }) => i.target.plantId === division.id)).toBe(true);
    const roundsBefore = await w.viewer.get(w.at('/rounds'));
    expect(roundsBefore.body.stops.map((s: { plant: { id: string } }) => s.plant.id)).toContain(division.id);

    const res = await recipient.client.post(`/api/handoffs/${token}/accept`, { newCollectionName: 'Windowsill' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const [made] = await testDb().select().from(memberships).where(eq(memberships.collectionId, res.body.collectionId));
    expect(made).toMatchObject({ userId: recipient.id, role: 'owner' });
    expect(res.body.tagChangedFrom).toBeNull();

    const giverPlant = (await w.viewer.get(w.at(`/plants/${division.id}`))).body;
    expect(giverPlant.givenAwayOn).toBe(today());
    expect(giverPlant.givenTo).toContain(recipient.email);
    expect(giverPlant.givenTo).toContain('Oona Pell');

    const after = await w.viewer.get(w.at('/attention'));
    expect(after.body.items.some((i: { target: { plantId: string } }) => i.target.plantId === division.id)).toBe(false);
    const roundsAfter = await w.viewer.get(w.at('/rounds'));
    expect(roundsAfter.body.stops.map((s: { plant: { id: string } }) => s.plant.id)).not.toContain(division.id);

    // In the recipient's collection the division needs attention; its history copies never do.
    const theirs = await recipient.client.get(`/api/collections/${res.body.collectionId}/attention`);
    const targets = new Set(theirs.body.items.map((i: { target: { plantId: string } }) => i.target.plantId));
    expect([...targets]).toEqual([res.body.plantId]);
    const theirRounds = await recipient.client.get(`/api/collections/${res.body.collectionId}/rounds`);
    expect(theirRounds.body.stops.map((s: { plant: { id: string } }) => s.plant.id)).toEqual([res.body.plantId]);

    const again = await recipient.client.post(`/api/handoffs/${token}/accept`, { newCollectionName: 'Again' });
    expectRefused(again, 410);
    expect(again.body.error.code).toBe('handoff_used');
    expectRefused(await browser(server.url).get(`/api/handoffs/${token}`), 410);
    // A given-away plant cannot be sent again.
    expectRefused(await w.grower.post(w.at(`/plants/${division.id}/handoffs`), { email: 'next@example.test' }), 409);
  });

  it('withdraws the other links for the same plant once one is accepted, saying where it went', async () => {
    const { w, division } = await lineageWorld();
    const first = await person('Hal Verity');
    const second = await person('Juno Marr');
    const { token: firstToken } = await send(w, division.id, first.email);
    const { token: secondToken } = await send(w, division.id, second.email);
    expect((await first.client.post(`/api/handoffs/${firstToken}/accept`, { collectionId: first.collectionId })).status).toBe(200);
    const preview = await browser(server.url).get(`/api/handoffs/${secondToken}`);
    expectRefused(preview, 410);
    expect(preview.body.error).toMatchObject({ code: 'handoff_given_away', message: expect.stringContaining('Hal Verity') });
    const accept = await second.client.post(`/api/handoffs/${secondToken}/accept`, { collectionId: second.collectionId });
    expectRefused(accept, 410);
    expect(accept.body.error.code).toBe('handoff_given_away');
    expect((await w.grower.get(w.at('/handoffs'))).body).toEqual([]);
  });

  it('refuses a third person with 403 and changes nothing', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Rafe Corliss');
    const stranger = await person('Someone Else');
    const { token } = await send(w, division.id, recipient.email);
    const counts = await rowCounts();
    const files = await storedFiles();

    const res = await stranger.client.post(`/api/handoffs/${token}/accept`, { collectionId: stranger.collectionId });
    expectRefused(res, 403);
    expect(res.body.error.code).toBe('handoff_other_recipient');
    expect(res.body.error.message).toMatch(/another e-mail address/);
    // A member of the giver's collection is a third person too.
    expectRefused(await w.owner.post(`/api/handoffs/${token}/accept`, { newCollectionName: 'Mine now' }), 403);
    expectRefused(await browser(server.url).post(`/api/handoffs/${token}/accept`, { newCollectionName: 'Anon' }), 401);

    expect(await rowCounts()).toEqual(counts);
    expect(await storedFiles()).toEqual(files);
    const [row] = await testDb().select().from(divisionHandoffs).where(eq(divisionHandoffs.plantId, division.id));
    expect(row.acceptedAt).toBeNull();
    expect((await w.viewer.get(w.at(`/plants/${division.id}`))).body.givenAwayOn).toBeNull();

    // The recipient can still accept afterwards.
    const ok = await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
  });

  it('accepts only into a collection where the recipient is owner or grower', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Lior Feld');
    await testDb().insert(memberships).values({ collectionId: w.collectionId, userId: recipient.id, role: 'viewer' });
    const { token } = await send(w, division.id, recipient.email);
    const elsewhere = await person('Not Theirs');
    expectRefused(await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: w.collectionId }), 403);
    expectRefused(await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: elsewhere.collectionId }), 400, 'collectionId');
    expectRefused(await recipient.client.post(`/api/handoffs/${token}/accept`, {}), 400, 'collectionId');
    expectRefused(await recipient.client.post(`/api/handoffs/${token}/accept`, { newCollectionName: '' }), 400, 'newCollectionName');
    const [row] = await testDb().select().from(divisionHandoffs).where(eq(divisionHandoffs.plantId, division.id));
    expect(row.acceptedAt).toBeNull();
  });

  it('answers 410 for revoked and expired links and 404 for unknown ones', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Pia Sorel');
    const revoked = await insertHandoff(testDb(), { collectionId: w.collectionId, plantId: division.id, sentBy: w.people.grower.id, recipientEmail: recipient.email }, { revokedAt: new Date() });
    const expired = await insertHandoff(testDb(), { collectionId: w.collectionId, plantId: division.id, sentBy: w.people.grower.id, recipientEmail: recipient.email }, { expiresAt: new Date(Date.now() - 1000) });
    for (const [token, code] of [[revoked.token, 'handoff_revoked'], [expired.token, 'handoff_expired']] as const) {
      const preview = await browser(server.url).get(`/api/handoffs/${token}`);
      expectRefused(preview, 410);
      expect(preview.body.error.code).toBe(code);
      const accept = await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId });
      expectRefused(accept, 410);
      expect(accept.body.error.code).toBe(code);
    }
    const unknown = 'A'.repeat(43);
    expectRefused(await browser(server.url).get(`/api/handoffs/${unknown}`), 404);
    expectRefused(await recipient.client.post(`/api/handoffs/${unknown}/accept`, { collectionId: recipient.collectionId }), 404);
    expectRefused(await browser(server.url).get('/api/handoffs/too-short'), 400, 'params.token');
  });

  it('lets the sender or an owner revoke, not another grower or a viewer', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Quill Aster');
    const { handoff, token } = await send(w, division.id, recipient.email);
    const otherGrower = await insertUser(testDb(), { displayName: 'Second grower' });
    await testDb().insert(memberships).values({ collectionId: w.collectionId, userId: otherGrower.id, role: 'grower' });
    const second = browser(server.url, await sessionCookieFor(testDb(), otherGrower.id));
    const listed = await second.get(w.at(`/plants/${division.id}/handoffs`));
    expect(listed.body[0].canRevoke).toBe(false);
    expectRefused(await second.delete(w.at(`/handoffs/${handoff.id}`)), 403);
    expectRefused(await w.viewer.delete(w.at(`/handoffs/${handoff.id}`)), 403);
    expect((await w.owner.delete(w.at(`/handoffs/${handoff.id}`))).status).toBe(204);
    expect((await w.grower.get(w.at('/handoffs'))).body).toEqual([]);
    expectRefused(await w.owner.delete(w.at(`/handoffs/${handoff.id}`)), 404);
    const accept = await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId });
    expectRefused(accept, 410);
  });
});

describe('the history copy is read-only', () => {
  it('answers 409 to every write to a history-only plant and its records, and allows writes to the received division', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Ada Roux');
    const { token } = await send(w, division.id, recipient.email);
    const accepted = (await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId })).body;
    const at = (p: string) => `/api/collections/${recipient.collectionId}${p}`;
    const copy = (await recipient.client.get(at(`/plants/${accepted.plantId}`))).body;
    const history = (await recipient.client.get(at(`/plants/${copy.parentPlantId}`))).body;
    const lead = (await recipient.client.get(at(`/leads/${history.leads[0].id}`))).body;
    const measurement = lead.measurements[0];
    const [photo] = (await recipient.client.get(at(`/photos?plantId=${history.id}`))).body.items;
    expect(photo).toBeDefined();
    // A care entry written straight to the table, to try deleting it.
    const [care] = await testDb().insert(careEntries).values({ collectionId: recipient.collectionId, plantId: history.id, kind: 'water', occurredOn: daysAgo(70) }).returning();
    const counts = await rowCounts();

    const c = recipient.client;
    const attempts = [
      await c.patch(at(`/plants/${history.id}`), { version: history.version, medium: 'sphagnum' }),
      await c.post(at(`/plants/${history.id}/divide`), { dividedOn: daysAgo(1), pieces: [{ tag: 'X-1', bulbCount: 3 }] }),
      await c.post(at(`/plants/${history.id}/leads`), { season: 2026, label: 'new', firstSeen: daysAgo(3), status: 'growing' }),
      await c.post(at(`/plants/${history.id}/care`), { kind: 'water', occurredOn: daysAgo(1) }),
      await c.delete(at(`/care/${care.id}`)),
      await c.patch(at(`/leads/${lead.id}`), { version: lead.version, status: 'removed' }),
      await c.delete(at(`/leads/${lead.id}`)),
      await c.put(at(`/leads/${lead.id}/bloom`), { version: lead.bloom.version, flowerCount: 9 }),
      await c.post(at(`/leads/${lead.id}/measurements`), { date: daysAgo(1), heightMm: 190 }),
      await c.post(at(`/leads/${lead.id}/sheath`), { date: daysAgo(1), sheath: 'budded' }),
      await c.patch(at(`/measurements/${measurement.id}`), { version: measurement.version, heightMm: 1 }),
      await c.delete(at(`/measurements/${measurement.id}`)),
      await c.delete(at(`/photos/${photo.id}`)),
      await c.post(at(`/plants/${history.id}/handoffs`), { email: 'onward@example.test' }),
    ];
    for (const res of attempts) {
      expectRefused(res, 409);
      expect(res.body.error.code).toBe('read_only');
      expect(res.body.error.message).toMatch(/read-only copy of another grower's record/);
    }
    const upload = await supertest(server.url)
      .post(at('/photos'))
      .set('Origin', server.url)
      .set('Cookie', recipient.cookie)
      .field('plantId', history.id)
      .attach('photo', await cameraJpeg({ width: 120, height: 80, orientation: 1 }), { filename: 'bench.jpg', contentType: 'image/jpeg' });
    expectRefused(upload, 409);
    expect(await rowCounts()).toEqual(counts);

    // The received division itself is the recipient's to write to.
    const ownLead = copy.leads[0];
    const measured = await c.post(at(`/leads/${ownLead.id}/measurements`), { date: daysAgo(0), heightMm: 30 });
    expect(measured.status, JSON.stringify(measured.body)).toBe(201);
  });
});

describe('deleting a history copy', () => {
  it('is the owner\'s choice: the copy and its records go, the division stays without the inherited seasons', async () => {
    const { w, division } = await lineageWorld();
    const recipient = await person('Cai Moreno');
    const { token } = await send(w, division.id, recipient.email);
    const accepted = (await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId })).body;
    const at = (p: string) => `/api/collections/${recipient.collectionId}${p}`;
    const copy = (await recipient.client.get(at(`/plants/${accepted.plantId}`))).body;
    const historyId = copy.parentPlantId as string;
    expect(historyId).toBeTruthy();
    const historyLeads = (await recipient.client.get(at(`/plants/${historyId}`))).body.leads.length;
    expect(historyLeads).toBeGreaterThan(0);

    const res = await recipient.client.delete(at(`/plants/${historyId}`));
    expect(res.status, JSON.stringify(res.body)).toBe(204);
    expect((await recipient.client.get(at(`/plants/${historyId}`))).status).toBe(404);
    const after = (await recipient.client.get(at(`/plants/${accepted.plantId}`))).body;
    expect(after.parentPlantId).toBeNull();
    expect(after.leads.length).toBe(copy.leads.length);
    // The giver's records are untouched.
    expect((await w.owner.get(w.at(`/plants/${division.id}`))).status).toBe(200);
  });
});

describe('photos travel with the division', () => {
  it('copies the division\'s photos and the history\'s up to the division date, served in the recipient\'s collection', async () => {
    const { w, division, photos } = await lineageWorld();
    const recipient = await person('Bea Quarry');
    const { token } = await send(w, division.id, recipient.email);
    const accepted = (await recipient.client.post(`/api/handoffs/${token}/accept`, { collectionId: recipient.collectionId })).body;
    expect(accepted.contents.photos).toBe(2);
    const at = (p: string) => `/api/collections/${recipient.collectionId}${p}`;
    const copy = (await recipient.client.get(at(`/plants/${accepted.plantId}`))).body;

    const own = (await recipient.client.get(at(`/photos?plantId=${accepted.plantId}`))).body.items;
    expect(own).toHaveLength(1);
    expect(own[0]).toMatchObject({ takenOn: photos.division.takenOn, leadId: copy.leads[0].id });
    const history = (await recipient.client.get(at(`/photos?plantId=${copy.parentPlantId}`))).body.items;
    expect(history.map((p: { takenOn: string }) => p.takenOn)).toEqual([daysAgo(190)]);

    const served = await recipient.client.get(own[0].displayUrl);
    expect(served.status).toBe(200);
    expect(served.headers['content-type']).toMatch(/image\/webp/);
    const original = await w.grower.get(photos.division.displayUrl);
    expect(Buffer.compare(served.body as Buffer, original.body as Buffer)).toBe(0);
    // The copy is the recipient's own file: the giver's photo URL does not serve it there.
    expectRefused(await recipient.client.get(photos.division.displayUrl), 404);

    // The giver's photos stay where they were.
    const giverRows = (await w.grower.get(w.at(`/photos?plantId=${division.id}`))).body.items;
    expect(giverRows.map((p: { id: string }) => p.id)).toEqual([photos.division.id]);
  });

  it('removes the copied files again when the hand-off fails half way, and changes nothing', async () => {
    const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-handoff-failing-'));
    const base = localDiskStore(dir);
    let failAfter = Infinity;
    const flaky: PhotoStore = {
      ...base,
      put: async (key, body, type) => {
        if (failAfter-- <= 0) throw new Error('store full');
        return base.put(key, body, type);
      },
    };
    const flakyServer = await startTestServer({ photoStore: flaky });
    try {
      const { w, division } = await lineageWorld({ photoStore: base });
      const recipient = await person('Cyd Marlow');
      const send = await browser(flakyServer.url, w.people.grower.cookie).post(w.at(`/plants/${division.id}/handoffs`), { email: recipient.email });
      expect(send.status).toBe(201);
      const token = tokenFrom((await mailTo(flakyServer.mail, recipient.email))[0], 'handoff');
      const files = await storedFiles(dir);
      const counts = await rowCounts();

      failAfter = 3; // two photos of two files each: the fourth put fails
      const res = await browser(flakyServer.url, recipient.cookie).post(`/api/handoffs/${token}/accept`, {
        collectionId: recipient.collectionId,
      });
      expect(res.status).toBe(500);
      expect(await storedFiles(dir)).toEqual(files);
      expect(await rowCounts()).toEqual(counts);
      const [row] = await testDb().select().from(plants).where(and(eq(plants.id, division.id)));
      expect(row.givenAwayOn).toBeNull();
      const copies = await testDb().select().from(plants).where(inArray(plants.collectionId, [recipient.collectionId]));
      expect(copies).toEqual([]);
    } finally {
      await flakyServer.close();
      await fs.rm(dir, { recursive: true, force: true });
    }
  });
});
