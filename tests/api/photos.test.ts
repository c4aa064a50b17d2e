import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import exifr from 'exifr';
import sharp from 'sharp';
import S3rver from 's3rver';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { photos } from '../../db/schema';
import { localDiskStore, type PhotoStore, s3Store } from '../../server/photos/store';
import { cameraJpeg, hugePng } from '../factories/photos';
import { daysAgo, insertLead, insertMeasurement, insertPlant } from '../factories/records';
import { rowCounts, testDb } from './support/database';
import { collectionWorld, expectRefused } from './support/records';
import { startTestServer, type TestServer } from './support/server';

let server: TestServer;
let photoDir: string;

beforeAll(async () => {
  photoDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-photos-'));
  server = await startTestServer({ photoStore: localDiskStore(photoDir) });
});
afterAll(async () => {
  await server.close();
  await fs.rm(photoDir, { recursive: true, force: true });
});

type World = Awaited<ReturnType<typeof collectionWorld>>;
type Who = 'owner' | 'grower' | 'viewer' | 'outsider';

/** A multipart upload as the browser sends it: this server's Origin and the person's cookie. */
function upload(w: World, who: Who, fields: Record<string, string>, file?: { data: Buffer; name: string; type: string }, collection = w.collectionId) {
  let req = supertest(server.url)
    .post(`/api/collections/${collection}/photos`)
    .set('Origin', server.url)
    .set('Cookie', w.people[who].cookie);
  for (const [name, value] of Object.entries(fields)) req = req.field(name, value);
  if (file) req = req.attach('photo', file.data, { filename: file.name, contentType: file.type });
  return req;
}

function fetchFile(w: World, who: Who, url: string) {
  return supertest(server.url).get(url).set('Cookie', w.people[who].cookie).buffer(true).parse((res, done) => {
    const parts: Buffer[] = [];
    res.on('data', (part: Buffer) => parts.push(part));
    res.on('end', () => done(null, Buffer.concat(parts)));
  });
}

async function filesUnder(dir: string): Promise<string[]> {
  const entries = await fs.readdir(dir, { recursive: true, withFileTypes: true });
  return entries.filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name));
}

async function photoWorld() {
  const w = await collectionWorld(server);
  const plant = await insertPlant(testDb(), w.collectionId);
  const lead = await insertLead(testDb(), plant, { firstSeen: daysAgo(60) });
  return { w, plant, lead };
}

describe('uploading a photo', () => {
  it('stores an upright WebP display size and thumbnail with no metadata, GPS position included', async () => {
    const { w, lead, plant } = await photoWorld();
    const original = await cameraJpeg({ width: 2400, height: 1600, orientation: 6 });
    // The picture really carries a position and a turned orientation before upload.
    const before = await exifr.parse(original, { gps: true });
    expect(before.latitude).toBeCloseTo(-33.87, 2);
    expect((await sharp(original).metadata()).orientation).toBe(6);

    const res = await upload(w, 'grower', { leadId: lead.id, caption: 'third leaf opening' }, { data: original, name: 'IMG_0042.jpg', type: 'image/jpeg' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    // Orientation 6 turns a 2400 × 1600 picture to stand 1600 wide and 2400 tall; the longest side becomes 1600.
    expect(res.body).toMatchObject({ leadId: lead.id, plantId: plant.id, measurementId: null, caption: 'third leaf opening', width: 1067, height: 1600, thumbWidth: 267, thumbHeight: 400, takenOn: '2026-11-20' });

    for (const [url, long] of [[res.body.displayUrl, 1600], [res.body.thumbUrl, 400]] as const) {
      const file = await fetchFile(w, 'viewer', url);
      expect(file.status).toBe(200);
      expect(file.headers['content-type']).toBe('image/webp');
      expect(file.headers['cache-control']).toMatch(/private/);
      const meta = await sharp(file.body as Buffer).metadata();
      expect(meta.format).toBe('webp');
      expect(Math.max(meta.width!, meta.height!)).toBe(long);
      expect(meta.height! > meta.width!).toBe(true);
      expect(meta.exif).toBeUndefined();
      expect(meta.xmp).toBeUndefined();
      expect(meta.iptc).toBeUndefined();
      expect(meta.orientation).toBeUndefined();
      // No EXIF chunk and none of the camera's strings anywhere in the file.
      const bytes = (file.body as Buffer).toString('latin1');
      expect(bytes).not.toMatch(/EXIF|Exif|Fieldcam|GPS/);
    }
  });

  it('takes a measurement’s date and its lead and plant when attached to a measurement', async () => {
    const { w, lead, plant } = await photoWorld();
    const measurement = await insertMeasurement(testDb(), lead, { measuredOn: daysAgo(12) });
    const res = await upload(w, 'grower', { measurementId: measurement.id, takenOn: daysAgo(3) }, { data: await cameraJpeg(), name: 'a.jpg', type: 'image/jpeg' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ measurementId: measurement.id, leadId: lead.id, plantId: plant.id, takenOn: daysAgo(12) });
  });

  it('takes the date sent with the photo over the camera’s, and accepts PNG and WebP', async () => {
    const { w, plant } = await photoWorld();
    const png = await sharp(await cameraJpeg({ width: 300, height: 200 })).png().toBuffer();
    const webp = await sharp(await cameraJpeg({ width: 300, height: 200 })).webp().toBuffer();
    const a = await upload(w, 'owner', { plantId: plant.id, takenOn: daysAgo(5) }, { data: png, name: 'bench.png', type: 'image/png' });
    const b = await upload(w, 'owner', { plantId: plant.id }, { data: webp, name: 'bench.webp', type: 'image/webp' });
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(a.body).toMatchObject({ takenOn: daysAgo(5), width: 300, height: 200, leadId: null });
    // Converted pictures lose the camera's date, so the upload day stands.
    expect(b.body.takenOn).toBe(daysAgo(0));
  });

  it('accepts HEIF where sharp can decode it (AV1-coded), named .heic', async () => {
    const { w, lead } = await photoWorld();
    const heif = await sharp(await cameraJpeg({ width: 320, height: 240, orientation: 1 })).heif({ compression: 'av1', quality: 60 }).toBuffer();
    expect((await sharp(heif).metadata()).format).toBe('heif');
    const res = await upload(w, 'grower', { leadId: lead.id }, { data: heif, name: 'IMG_0001.heic', type: 'image/heic' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ width: 320, height: 240 });
  });

  it('judges the file by its content, not its name or declared type', async () => {
    const { w, lead } = await photoWorld();
    const png = await sharp(await cameraJpeg({ width: 320, height: 240 })).png().toBuffer();
    const res = await upload(w, 'grower', { leadId: lead.id }, { data: png, name: 'leaf.jpg', type: 'image/jpeg' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ width: 320, height: 240 });
  });

  it('lists a lead’s and a plant’s photos oldest first, to members only', async () => {
    const { w, lead, plant } = await photoWorld();
    const later = await upload(w, 'grower', { leadId: lead.id, takenOn: daysAgo(2) }, { data: await cameraJpeg({ width: 200, height: 100 }), name: 'b.jpg', type: 'image/jpeg' });
    const earlier = await upload(w, 'grower', { leadId: lead.id, takenOn: daysAgo(20) }, { data: await cameraJpeg({ width: 200, height: 100 }), name: 'a.jpg', type: 'image/jpeg' });
    const own = await upload(w, 'grower', { plantId: plant.id, takenOn: daysAgo(9) }, { data: await cameraJpeg({ width: 200, height: 100 }), name: 'c.jpg', type: 'image/jpeg' });
    const ofLead = await w.viewer.get(w.at(`/photos?leadId=${lead.id}`));
    expect(ofLead.status).toBe(200);
    expect(ofLead.body.items.map((p: { id: string }) => p.id)).toEqual([earlier.body.id, later.body.id]);
    const ofPlant = await w.viewer.get(w.at(`/photos?plantId=${plant.id}`));
    expect(ofPlant.body.items.map((p: { id: string }) => p.id)).toEqual([earlier.body.id, own.body.id, later.body.id]);
    expectRefused(await w.viewer.get(w.at('/photos')), 400, 'query.plantId', /plantId or leadId/);
    expect((await w.outsider.get(w.at(`/photos?leadId=${lead.id}`))).status).toBe(404);
  });
});

describe('refusing a photo', () => {
  async function expectNothingStored(w: World, send: () => Promise<supertest.Response>, status: number, reason: RegExp) {
    const counts = await rowCounts();
    const files = await filesUnder(photoDir);
    const res = await send();
    expectRefused(res, status, 'photo', reason);
    expect(await rowCounts()).toEqual(counts);
    expect(await filesUnder(photoDir)).toEqual(files);
    return res;
  }

  it('a text file renamed .jpg: 415', async () => {
    const { w, lead } = await photoWorld();
    const text = Buffer.from('Bench notes: water Tuesday, feed Friday.\n'.repeat(50));
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: text, name: 'leaf.jpg', type: 'image/jpeg' }), 415, /not a photo/);
  });

  it('a truncated JPEG: 400', async () => {
    const { w, lead } = await photoWorld();
    const whole = await cameraJpeg({ width: 1600, height: 1200 });
    const cut = whole.subarray(0, Math.floor(whole.length * 0.6));
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: cut, name: 'cut.jpg', type: 'image/jpeg' }), 400, /damaged or cut short/);
  });

  it('a 20,000 × 20,000 PNG: 413 before it is decoded', async () => {
    const { w, lead } = await photoWorld();
    const png = hugePng();
    expect(png.length).toBeLessThan(1024 * 1024);
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: png, name: 'scan.png', type: 'image/png' }), 413, /20000 × 20000 pixels \(400 MP\)/);
  });

  it('a 30 MB file: 413', async () => {
    const { w, lead } = await photoWorld();
    const big = Buffer.alloc(30 * 1024 * 1024, 0x5a);
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: big, name: 'huge.jpg', type: 'image/jpeg' }), 413, /larger than 20 MB/);
  });

  it('a GIF, and an SVG: 415', async () => {
    const { w, lead } = await photoWorld();
    const gif = await sharp(await cameraJpeg({ width: 64, height: 64 })).gif().toBuffer();
    const svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10"/></svg>');
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: gif, name: 'a.gif', type: 'image/gif' }), 415, /gif is not accepted/);
    await expectNothingStored(w, () => upload(w, 'grower', { leadId: lead.id }, { data: svg, name: 'a.jpg', type: 'image/jpeg' }), 415, /svg is not accepted/);
  });

  it('no file, or no subject, or two subjects: 400 naming the field', async () => {
    const { w, lead, plant } = await photoWorld();
    const jpeg = { data: await cameraJpeg({ width: 100, height: 100 }), name: 'a.jpg', type: 'image/jpeg' };
    expectRefused(await upload(w, 'grower', { leadId: lead.id }), 400, 'photo', /Attach a photo/);
    expectRefused(await upload(w, 'grower', {}, jpeg), 400, 'plantId', /exactly one/);
    expectRefused(await upload(w, 'grower', { plantId: plant.id, leadId: lead.id }, jpeg), 400, 'plantId', /exactly one/);
    expectRefused(await upload(w, 'grower', { leadId: 'not-an-id' }, jpeg), 400, 'leadId');
    expectRefused(await upload(w, 'grower', { leadId: lead.id, takenOn: '2099-01-01' }, jpeg), 400, 'takenOn', /future/);
  });

  it('a lead of another collection: 404, nothing stored', async () => {
    const { w } = await photoWorld();
    const otherPlant = await insertPlant(testDb(), w.otherCollectionId);
    const otherLead = await insertLead(testDb(), otherPlant);
    const counts = await rowCounts();
    const res = await upload(w, 'grower', { leadId: otherLead.id }, { data: await cameraJpeg({ width: 100, height: 100 }), name: 'a.jpg', type: 'image/jpeg' });
    expect(res.status).toBe(404);
    expect(await rowCounts()).toEqual(counts);
  });

  it('a viewer cannot upload (403), an outsider learns nothing (404)', async () => {
    const { w, lead } = await photoWorld();
    const jpeg = { data: await cameraJpeg({ width: 100, height: 100 }), name: 'a.jpg', type: 'image/jpeg' };
    const counts = await rowCounts();
    expect((await upload(w, 'viewer', { leadId: lead.id }, jpeg)).status).toBe(403);
    expect((await upload(w, 'outsider', { leadId: lead.id }, jpeg)).status).toBe(404);
    expect(await rowCounts()).toEqual(counts);
  });
});

describe('fetching and deleting photos', () => {
  it('a non-member cannot fetch a photo, even with its exact address', async () => {
    const { w, lead } = await photoWorld();
    const res = await upload(w, 'grower', { leadId: lead.id }, { data: await cameraJpeg({ width: 300, height: 200 }), name: 'a.jpg', type: 'image/jpeg' });
    expect((await fetchFile(w, 'outsider', res.body.thumbUrl)).status).toBe(404);
    expect((await supertest(server.url).get(res.body.displayUrl)).status).toBe(401);
    // The same photo id under the outsider's own collection is not found either.
    expect((await fetchFile(w, 'outsider', res.body.thumbUrl.replace(w.collectionId, w.otherCollectionId))).status).toBe(404);
    expect((await fetchFile(w, 'viewer', res.body.thumbUrl.replace(/thumb$/, 'original'))).status).toBe(404);
  });

  it('an owner deletes any photo, a grower only their own; the files go with the row', async () => {
    const { w, lead } = await photoWorld();
    const jpeg = { data: await cameraJpeg({ width: 300, height: 200 }), name: 'a.jpg', type: 'image/jpeg' };
    const byOwner = await upload(w, 'owner', { leadId: lead.id }, jpeg);
    const byGrower = await upload(w, 'grower', { leadId: lead.id }, jpeg);
    expectRefused(await w.grower.delete(w.at(`/photos/${byOwner.body.id}`)), 403);
    expect((await w.viewer.delete(w.at(`/photos/${byGrower.body.id}`))).status).toBe(403);
    expect((await w.grower.delete(w.at(`/photos/${byGrower.body.id}`))).status).toBe(204);
    expect((await w.owner.delete(w.at(`/photos/${byOwner.body.id}`))).status).toBe(204);
    expect(await testDb().select().from(photos).where(eq(photos.leadId, lead.id))).toEqual([]);
    const left = await filesUnder(photoDir);
    expect(left.filter((f) => f.includes(byOwner.body.id) || f.includes(byGrower.body.id))).toEqual([]);
    expect((await fetchFile(w, 'owner', byOwner.body.thumbUrl)).status).toBe(404);
  });

  it('a lead given to a division takes its photos to the new plant', async () => {
    const { w, lead, plant } = await photoWorld();
    const jpeg = { data: await cameraJpeg({ width: 300, height: 200 }), name: 'a.jpg', type: 'image/jpeg' };
    const photo = await upload(w, 'grower', { leadId: lead.id }, jpeg);
    const divided = await w.grower.post(w.at(`/plants/${plant.id}/divide`), { dividedOn: daysAgo(1), pieces: [{ tag: 'DIV-PHOTO', leadIds: [lead.id], bulbCount: 4 }] });
    expect(divided.status, JSON.stringify(divided.body)).toBe(201);
    const [row] = await testDb().select().from(photos).where(eq(photos.id, photo.body.id));
    expect(row.plantId).toBe(divided.body.plants[0].id);
  });

  it('deleting a lead or a plant takes its photos’ files too', async () => {
    const { w, lead, plant } = await photoWorld();
    const jpeg = { data: await cameraJpeg({ width: 300, height: 200 }), name: 'a.jpg', type: 'image/jpeg' };
    const ofLead = await upload(w, 'grower', { leadId: lead.id }, jpeg);
    const ofPlant = await upload(w, 'grower', { plantId: plant.id }, jpeg);
    const mine = (id: string) => filesUnder(photoDir).then((files) => files.filter((f) => f.includes(id)));
    expect(await mine(ofLead.body.id)).toHaveLength(2);
    expect((await w.owner.delete(w.at(`/leads/${lead.id}`))).status).toBe(204);
    expect(await mine(ofLead.body.id)).toEqual([]);
    expect(await mine(ofPlant.body.id)).toHaveLength(2);
    expect((await w.owner.delete(w.at(`/plants/${plant.id}`))).status).toBe(204);
    expect(await mine(ofPlant.body.id)).toEqual([]);
  });

  it('an unwritable photo folder gives a clear 503 and leaves no row', async () => {
    const w = await collectionWorld(server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const blocked = path.join(photoDir, 'blocked-by-a-file');
    await fs.writeFile(blocked, 'not a folder');
    const broken = await startTestServer({ photoStore: localDiskStore(blocked) });
    try {
      const counts = await rowCounts();
      const res = await supertest(broken.url)
        .post(`/api/collections/${w.collectionId}/photos`)
        .set('Origin', broken.url)
        .set('Cookie', w.people.grower.cookie)
        .field('plantId', plant.id)
        .attach('photo', await cameraJpeg({ width: 100, height: 100 }), { filename: 'a.jpg', contentType: 'image/jpeg' });
      expectRefused(res, 503);
      expect(res.body.error.code).toBe('photo_storage_unavailable');
      expect(await rowCounts()).toEqual(counts);
    } finally {
      await broken.close();
    }
  });
});

describe('sending under a client key', () => {
  const jpeg = async () => ({ data: await cameraJpeg({ width: 300, height: 200 }), name: 'a.jpg', type: 'image/jpeg' });
  const filesOf = (id: string) => filesUnder(photoDir).then((files) => files.filter((f) => f.includes(id)));
  const rowsOf = (leadId: string) => testDb().select().from(photos).where(eq(photos.leadId, leadId));

  it('a resend under the same key is stored once and answered with the first photo', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    const first = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    const again = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expect(again.status, JSON.stringify(again.body)).toBe(200);
    expect(again.body.id).toBe(first.body.id);
    expect(await rowsOf(lead.id)).toHaveLength(1);
    expect(await filesOf(first.body.id)).toHaveLength(2);
  });

  it('a cancel after the photo arrived removes it and its files; it is idempotent and a late resend is refused', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    const stored = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expect(stored.status).toBe(201);
    const cancelled = await w.grower.delete(w.at(`/photo-uploads/${clientKey}`));
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
    expect(cancelled.body).toEqual({ removed: true });
    expect(await rowsOf(lead.id)).toEqual([]);
    expect(await filesOf(stored.body.id)).toEqual([]);
    expect((await fetchFile(w, 'grower', stored.body.thumbUrl)).status).toBe(404);
    expect((await w.grower.delete(w.at(`/photo-uploads/${clientKey}`))).body).toEqual({ removed: false });
    const late = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expectRefused(late, 409);
    expect(late.body.error).toMatchObject({ code: 'upload_cancelled', details: [{ field: 'clientKey', reason: 'cancelled' }] });
    expect(await rowsOf(lead.id)).toEqual([]);
  });

  it('a cancel that arrives before the photo refuses it, leaving no row and no file', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    expect((await w.grower.delete(w.at(`/photo-uploads/${clientKey}`))).body).toEqual({ removed: false });
    const filesBefore = await filesUnder(photoDir);
    const res = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expectRefused(res, 409);
    expect(res.body.error.code).toBe('upload_cancelled');
    expect(await rowsOf(lead.id)).toEqual([]);
    expect(await filesUnder(photoDir)).toEqual(filesBefore);
  });

  it('an upload and its cancel sent at the same moment never leave the photo behind', async () => {
    const { w, lead } = await photoWorld();
    const file = await jpeg();
    const outcomes = await Promise.all(
      Array.from({ length: 12 }, async (_, i) => {
        const clientKey = randomUUID();
        const [sent, cancelled] = await Promise.all([
          upload(w, 'grower', { leadId: lead.id, clientKey }, file),
          // Cancels leave from at once to well after, so both orders are exercised.
          new Promise((resolve) => setTimeout(resolve, i * 30)).then(() => w.grower.delete(w.at(`/photo-uploads/${clientKey}`))),
        ]);
        expect(cancelled.status).toBe(200);
        // Whichever came first, the two answers agree: stored and then removed, or refused.
        if (sent.status === 201) expect(cancelled.body.removed, 'a stored photo must be removed by its cancel').toBe(true);
        else expect(sent.body.error?.code).toBe('upload_cancelled');
        return sent.status;
      }),
    );
    expect(outcomes.every((status) => status === 201 || status === 409)).toBe(true);
    expect(await rowsOf(lead.id)).toEqual([]);
  });

  it('two attempts under one key at the same moment store one photo, and both are answered with it', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    const file = await jpeg();
    const answers = await Promise.all([upload(w, 'grower', { leadId: lead.id, clientKey }, file), upload(w, 'grower', { leadId: lead.id, clientKey }, file)]);
    expect(answers.map((a) => a.status).sort()).toEqual([200, 201]);
    expect(answers[0].body.id).toBe(answers[1].body.id);
    expect(await rowsOf(lead.id)).toHaveLength(1);
    // The attempt that lost the key removed its own files: only the stored photo's two remain.
    expect((await filesUnder(photoDir)).filter((f) => f.includes(`${w.collectionId}`))).toHaveLength(2);
  });

  it('a resend after the photo was deleted is refused by name, and a cancel then finds nothing to remove', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    const stored = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expect((await w.grower.delete(w.at(`/photos/${stored.body.id}`))).status).toBe(204);
    const again = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expectRefused(again, 409);
    expect(again.body.error).toMatchObject({ code: 'upload_photo_deleted', details: [{ field: 'clientKey', reason: 'photo deleted' }] });
    expect((await w.grower.delete(w.at(`/photo-uploads/${clientKey}`))).body).toEqual({ removed: false });
    expect(await rowsOf(lead.id)).toEqual([]);
  });

  it('a cancel and a delete of the same stored photo at once both answer, without a deadlock', async () => {
    const { w, lead } = await photoWorld();
    for (let i = 0; i < 6; i += 1) {
      const clientKey = randomUUID();
      const stored = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
      const [cancelled, deleted] = await Promise.all([w.grower.delete(w.at(`/photo-uploads/${clientKey}`)), w.owner.delete(w.at(`/photos/${stored.body.id}`))]);
      expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
      // The delete finds the photo, or finds it already gone with the cancel.
      expect([204, 404], JSON.stringify(deleted.body)).toContain(deleted.status);
      expect(cancelled.body.removed || deleted.status === 204).toBe(true);
    }
    expect(await rowsOf(lead.id)).toEqual([]);
  });

  it('a key is its sender’s: no one else can cancel or reuse it; a viewer cannot cancel; a bad key is named', async () => {
    const { w, lead } = await photoWorld();
    const clientKey = randomUUID();
    const stored = await upload(w, 'grower', { leadId: lead.id, clientKey }, await jpeg());
    expect(stored.status).toBe(201);
    const byOwner = await w.owner.delete(w.at(`/photo-uploads/${clientKey}`));
    expectRefused(byOwner, 409);
    expect(byOwner.body.error.code).toBe('client_key_reused');
    const reused = await upload(w, 'owner', { leadId: lead.id, clientKey }, await jpeg());
    expectRefused(reused, 409);
    expect(reused.body.error.code).toBe('client_key_reused');
    expectRefused(await w.viewer.delete(w.at(`/photo-uploads/${clientKey}`)), 403);
    expect((await w.outsider.delete(w.at(`/photo-uploads/${clientKey}`))).status).toBe(404);
    const bad = await w.grower.delete(w.at('/photo-uploads/not-a-key'));
    expectRefused(bad, 400);
    expect(bad.body.error.details[0].field).toBe('params.clientKey');
    expect(await rowsOf(lead.id)).toHaveLength(1);
    expect(await filesOf(stored.body.id)).toHaveLength(2);
  });
});

describe('photos in an S3-compatible store', () => {
  let s3: S3rver;
  let s3Dir: string;
  let store: PhotoStore;
  let s3Server: TestServer;

  beforeAll(async () => {
    s3Dir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-s3-'));
    s3 = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: s3Dir, configureBuckets: [{ name: 'sympodia-photos', configs: [] }] });
    const { port } = (await s3.run()) as { port: number };
    store = s3Store({ endpoint: `http://127.0.0.1:${port}`, region: 'us-east-1', bucket: 'sympodia-photos', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', forcePathStyle: true });
    s3Server = await startTestServer({ photoStore: store });
  });
  afterAll(async () => {
    await s3Server.close();
    await s3.close();
    await fs.rm(s3Dir, { recursive: true, force: true });
  });

  it('stores, serves and deletes through the S3 API', async () => {
    const w = await collectionWorld(s3Server);
    const plant = await insertPlant(testDb(), w.collectionId);
    const res = await supertest(s3Server.url)
      .post(`/api/collections/${w.collectionId}/photos`)
      .set('Origin', s3Server.url)
      .set('Cookie', w.people.grower.cookie)
      .field('plantId', plant.id)
      .attach('photo', await cameraJpeg({ width: 800, height: 600, orientation: 1 }), { filename: 'a.jpg', contentType: 'image/jpeg' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const [row] = await testDb().select().from(photos).where(eq(photos.id, res.body.id));
    const stored = await store.get(`${row.storageKey}/display.webp`);
    expect((await sharp(stored!).metadata()).width).toBe(800);

    const served = await supertest(s3Server.url).get(res.body.thumbUrl).set('Cookie', w.people.viewer.cookie).buffer(true).parse((r, done) => {
      const parts: Buffer[] = [];
      r.on('data', (p: Buffer) => parts.push(p));
      r.on('end', () => done(null, Buffer.concat(parts)));
    });
    expect(served.status).toBe(200);
    expect((await sharp(served.body as Buffer).metadata()).width).toBe(400);

    expect((await w.grower.delete(w.at(`/photos/${res.body.id}`))).status).toBe(204);
    expect(await store.get(`${row.storageKey}/display.webp`)).toBeNull();
    expect(await store.get(`${row.storageKey}/thumb.webp`)).toBeNull();
  });
});
