import exifr from 'exifr';
import sharp, { type Metadata, type OutputInfo } from 'sharp';
import { HttpError } from '../errors';

/** Larger uploads are refused before they are read to the end (multer's file-size limit). */
export const PHOTO_MAX_BYTES = 20 * 1024 * 1024;
/** About 50 megapixels: more than any phone or camera a grower carries; refused before decoding. */
export const PHOTO_MAX_PIXELS = 50_000_000;
/** Longest side of the stored display image and of the thumbnail, in pixels. */
export const DISPLAY_LONG_SIDE = 1600;
export const THUMB_LONG_SIDE = 400;
/** WebP qualities: photographs of leaves hold up well at these (common practice). */
const DISPLAY_QUALITY = 82;
const THUMB_QUALITY = 72;

const ACCEPTED_FORMATS = new Set(['jpeg', 'png', 'webp', 'heif']);

export interface ProcessedPhoto {
  display: { data: Buffer; width: number; height: number };
  thumb: { data: Buffer; width: number; height: number };
  /** The day the camera wrote into the picture, when it did and the date is plausible. */
  takenOn: string | null;
}

const unsupported = (reason: string) => new HttpError(415, 'unsupported_photo', reason, [{ field: 'photo', reason }]);

/**
 * Reads only the image's header (never the name or the declared type), refuses what is not
 * a JPEG, PNG, WebP or HEIF photo, or is too large to decode, then decodes it once, turns it
 * upright by its orientation tag and writes the display and thumbnail sizes as WebP. sharp
 * writes no metadata unless asked to, so EXIF (GPS position included), XMP and IPTC are gone.
 */
export async function processPhoto(input: Buffer, today: string): Promise<ProcessedPhoto> {
  let meta: Metadata;
  try {
    meta = await sharp(input, { limitInputPixels: false }).metadata();
  } catch {
    throw unsupported('This file is not a photo Sympodia can read: use JPEG, PNG, WebP or HEIF');
  }
  if (!meta.format || !ACCEPTED_FORMATS.has(meta.format)) {
    throw unsupported(`A ${meta.format ?? 'file of this kind'} is not accepted: use JPEG, PNG, WebP or HEIF`);
  }
  if (meta.format === 'heif' && meta.compression === 'hevc') {
    throw unsupported('This HEIC photo uses HEVC compression, which this server cannot decode: save it as JPEG and try again');
  }
  const width = meta.width ?? 0;
  const height = meta.pageHeight ?? meta.height ?? 0;
  if (width * height > PHOTO_MAX_PIXELS) {
    const megapixels = Math.round((width * height) / 1e6);
    const reason = `The image is ${width} × ${height} pixels (${megapixels} MP); at most ${PHOTO_MAX_PIXELS / 1e6} MP are accepted`;
    throw new HttpError(413, 'photo_too_large', reason, [{ field: 'photo', reason }]);
  }

  let display: OutputInfo & { data: Buffer };
  try {
    const { data, info } = await sharp(input, { limitInputPixels: PHOTO_MAX_PIXELS, failOn: 'error', pages: 1 })
      .rotate()
      .resize({ width: DISPLAY_LONG_SIDE, height: DISPLAY_LONG_SIDE, fit: 'inside', withoutEnlargement: true })
      .webp({ quality: DISPLAY_QUALITY })
      .toBuffer({ resolveWithObject: true });
    display = { ...info, data };
  } catch {
    const reason = 'The photo is damaged or cut short and cannot be read; try the original file again';
    throw new HttpError(400, 'damaged_photo', reason, [{ field: 'photo', reason }]);
  }
  const thumb = await sharp(display.data)
    .resize({ width: THUMB_LONG_SIDE, height: THUMB_LONG_SIDE, fit: 'inside', withoutEnlargement: true })
    .webp({ quality: THUMB_QUALITY })
    .toBuffer({ resolveWithObject: true });

  return {
    display: { data: display.data, width: display.width, height: display.height },
    thumb: { data: thumb.data, width: thumb.info.width, height: thumb.info.height },
    takenOn: await cameraDate(input, today),
  };
}

/** Earliest camera date believed: before this, a camera's clock was most likely never set. */
const EARLIEST_CAMERA_DATE = '1995-01-01';

async function cameraDate(input: Buffer, today: string): Promise<string | null> {
  try {
    const tags = (await exifr.parse(input, { pick: ['DateTimeOriginal', 'CreateDate'] })) as
      | { DateTimeOriginal?: unknown; CreateDate?: unknown }
      | undefined;
    const value = tags?.DateTimeOriginal ?? tags?.CreateDate;
    if (!(value instanceof Date) || Number.isNaN(value.getTime())) return null;
    // exifr reads the camera's wall-clock time as local time; the local calendar day is the one written.
    const day = `${value.getFullYear()}-${String(value.getMonth() + 1).padStart(2, '0')}-${String(value.getDate()).padStart(2, '0')}`;
    return day >= EARLIEST_CAMERA_DATE && day <= today ? day : null;
  } catch {
    return null;
  }
}
