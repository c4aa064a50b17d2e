import zlib from 'node:zlib';
import sharp from 'sharp';
import type { Database } from '../../db/client';
import { processPhoto } from '../../server/photos/process';
import type { PhotoStore } from '../../server/photos/store';
import { addPhoto } from '../../server/services/photos';

/**
 * A camera-like JPEG made for the tests: a graded, textured picture (so it compresses like a
 * photograph, not like a flat colour) carrying the EXIF a phone writes — make and model, the
 * time it was taken, a GPS position and an orientation tag (6: the camera was turned a
 * quarter to the right, so the stored pixels lie on their side).
 */
export async function cameraJpeg(options: { width?: number; height?: number; takenAt?: string; orientation?: number } = {}) {
  const width = options.width ?? 1200;
  const height = options.height ?? 800;
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const i = (y * width + x) * 3;
      raw[i] = (x * 7 + y * 3) % 256;
      raw[i + 1] = 80 + ((x ^ y) % 120);
      raw[i + 2] = (y * 5) % 256;
    }
  }
  return sharp(raw, { raw: { width, height, channels: 3 } })
    .withMetadata({ orientation: options.orientation ?? 6 })
    .withExif({
      IFD0: { Make: 'Fieldcam', Model: 'Bench 1', Software: 'Sympodia test pictures' },
      IFD2: { DateTimeOriginal: options.takenAt ?? '2026:11:20 10:15:00' },
      IFD3: { GPSLatitudeRef: 'S', GPSLatitude: '33/1 52/1 12/1', GPSLongitudeRef: 'E', GPSLongitude: '151/1 12/1 30/1' },
    })
    .jpeg({ quality: 90 })
    .toBuffer();
}

/**
 * A complete, valid PNG of 20,000 × 20,000 pixels (400 MP) that is small on disk: one bit
 * per pixel, every pixel the same, so its 50 MB of rows deflate to a few tens of kilobytes.
 * Written by hand (signature, IHDR, IDAT, IEND, each with its CRC) because an image library
 * refuses to make one this large in memory.
 */
export function hugePng(size = 20_000): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const length = Buffer.alloc(4);
    length.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(zlib.crc32(body));
    return Buffer.concat([length, body, crc]);
  };
  const header = Buffer.alloc(13);
  header.writeUInt32BE(size, 0);
  header.writeUInt32BE(size, 4);
  header[8] = 1; // bit depth
  header[9] = 0; // greyscale
  const row = Buffer.alloc(1 + Math.ceil(size / 8)); // filter byte 0, then all-black pixels
  const rows = Buffer.alloc(row.length * size);
  const data = zlib.deflateSync(rows, { level: 9 });
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', data),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/** A stored photo of a lead, as an upload by `userId` would leave it: files in the store and its row. */
export async function insertPhoto(
  db: Database,
  store: PhotoStore,
  member: { collectionId: string; userId: string; role: 'owner' | 'grower' | 'viewer' },
  leadId: string,
) {
  const today = new Date().toISOString().slice(0, 10);
  const processed = await processPhoto(await cameraJpeg({ width: 240, height: 160, orientation: 1 }), today);
  return (await addPhoto(db, store, member, { leadId, caption: null }, processed, 1000, today)).photo;
}
