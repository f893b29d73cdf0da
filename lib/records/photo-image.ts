import exifr from 'exifr';
import sharp, { type Metadata } from 'sharp';
import { DATE_RANGE } from './plausible-ranges';
import { wallTimeToUtc } from './zoned-time';

/**
 * What a photo's bytes say about it: its type from the magic bytes (never the file name), its size in
 * pixels, its EXIF GPS position and time taken, and a small JPEG thumbnail. A file that is not a JPEG or a
 * PNG, or that cannot be decoded whole, is refused with a reason a person can act on.
 */

export type PhotoMime = 'image/jpeg' | 'image/png';

/** Thumbnails fit a 320 px square, as a JPEG. */
export const THUMBNAIL_PX = 320;
/** Larger images are refused before decoding (a decompression bomb is small on the wire): 100 megapixels. */
export const MAX_PIXELS = 100_000_000;

export class PhotoRefusal extends Error {
  constructor(readonly kind: 'not_image' | 'corrupt' | 'too_many_pixels', message: string) {
    super(message);
    this.name = 'PhotoRefusal';
  }
}

const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

/**
 * The type by magic bytes: JPEG starts FF D8 FF (ITU-T T.81 SOI marker and the next marker's FF), PNG with
 * its 8-byte signature (PNG specification, section 5.2). `sniffPhoto(bytes)` → 'image/jpeg' | 'image/png' | null.
 */
export function sniffPhoto(bytes: Buffer): PhotoMime | null {
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'image/jpeg';
  if (bytes.length >= 8 && bytes.subarray(0, 8).equals(PNG_SIGNATURE)) return 'image/png';
  return null;
}

export interface PhotoExif {
  /** WGS 84 degrees from the GPS IFD, when both are present and plausible */
  lon: number | null;
  lat: number | null;
  /** DateTimeOriginal as written ("YYYY:MM:DD HH:MM:SS", camera's wall clock) and its offset, if recorded */
  takenWall: string | null;
  takenOffset: string | null;
}

/** Reads GPS position and time taken from a photo's EXIF; a photo without EXIF (most PNGs) gives nulls. */
export async function readPhotoExif(bytes: Buffer): Promise<PhotoExif> {
  const none: PhotoExif = { lon: null, lat: null, takenWall: null, takenOffset: null };
  let tags: Record<string, unknown> | undefined;
  try {
    tags = await exifr.parse(bytes, { gps: true, exif: true, tiff: true, xmp: false, icc: false, iptc: false, jfif: false, ihdr: false, reviveValues: false });
  } catch {
    return none; // unreadable EXIF is no EXIF: the photo is placed by hand
  }
  if (!tags) return none;
  const lat = typeof tags.latitude === 'number' && Number.isFinite(tags.latitude) ? tags.latitude : null;
  const lon = typeof tags.longitude === 'number' && Number.isFinite(tags.longitude) ? tags.longitude : null;
  // a camera without a fix writes 0/0 or nothing; (0, 0) is in the Gulf of Guinea, not in a street
  const plausible = lat !== null && lon !== null && Math.abs(lat) <= 90 && Math.abs(lon) <= 180 && !(lat === 0 && lon === 0);
  const wall = typeof tags.DateTimeOriginal === 'string' && /^\d{4}:\d{2}:\d{2} \d{2}:\d{2}:\d{2}/.test(tags.DateTimeOriginal) ? tags.DateTimeOriginal.slice(0, 19) : null;
  const offset = typeof tags.OffsetTimeOriginal === 'string' && /^[+-]\d{2}:\d{2}$/.test(tags.OffsetTimeOriginal.trim()) ? tags.OffsetTimeOriginal.trim() : null;
  return { lon: plausible ? lon : null, lat: plausible ? lat : null, takenWall: wall, takenOffset: offset };
}

/** "2026:11:04 10:15:30" → "2026-11-04 10:15:30" (the form the project's clock reads). */
export function exifWallTime(wall: string): string {
  return `${wall.slice(0, 10).replace(/:/g, '-')} ${wall.slice(11, 19)}`;
}

/**
 * The instant a photo was taken: EXIF DateTimeOriginal, with its own OffsetTimeOriginal or else on the
 * project's clock; a date before 1990 or ahead of tomorrow (a camera with a flat clock battery) is dropped.
 * `takenAtOf({ takenWall: '2026:11:04 10:15:30', takenOffset: null, … }, 'Europe/Berlin')` → '2026-11-04T09:15:30.000Z'.
 */
export function takenAtOf(exif: PhotoExif, timeZone: string, now = new Date()): string | null {
  if (!exif.takenWall) return null;
  const wall = exifWallTime(exif.takenWall);
  const iso = exif.takenOffset ? new Date(`${wall.replace(' ', 'T')}${exif.takenOffset}`).toISOString() : wallTimeToUtc(wall, timeZone);
  if (!iso || Number.isNaN(Date.parse(iso))) return null;
  // a camera whose clock was never set writes 1970; a date ahead is a wrong clock too
  if (iso.slice(0, 10) < DATE_RANGE.min || Date.parse(iso) > now.getTime() + DATE_RANGE.maxDaysAhead * 86_400_000) return null;
  return iso;
}

export interface DecodedPhoto {
  width: number;
  height: number;
  thumbnail: Buffer;
}

/**
 * Decodes the whole image (a truncated or damaged file fails here) and makes the thumbnail, turned upright
 * by the EXIF orientation. Throws PhotoRefusal.
 */
export async function decodePhoto(bytes: Buffer, mime: PhotoMime): Promise<DecodedPhoto> {
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch (err) {
    throw new PhotoRefusal('corrupt', `The ${mime === 'image/png' ? 'PNG' : 'JPEG'} cannot be read: ${(err as Error).message}. Send the photo again as the camera saved it.`);
  }
  if (!meta.width || !meta.height) throw new PhotoRefusal('corrupt', 'The image has no size: it is damaged.');
  if (meta.width * meta.height > MAX_PIXELS) throw new PhotoRefusal('too_many_pixels', `The image is ${meta.width} × ${meta.height} pixels; at most ${MAX_PIXELS / 1e6} megapixels are taken.`);
  try {
    const thumbnail = await sharp(bytes, { failOn: 'warning', limitInputPixels: MAX_PIXELS })
      .rotate()
      .resize(THUMBNAIL_PX, THUMBNAIL_PX, { fit: 'inside', withoutEnlargement: true })
      .flatten({ background: '#ffffff' })
      .jpeg({ quality: 75 })
      .toBuffer();
    const upright = (meta.orientation ?? 1) >= 5;
    return { width: upright ? meta.height : meta.width, height: upright ? meta.width : meta.height, thumbnail };
  } catch (err) {
    throw new PhotoRefusal('corrupt', `The ${mime === 'image/png' ? 'PNG' : 'JPEG'} is damaged or cut short (${(err as Error).message}). Send the photo again as the camera saved it.`);
  }
}
