import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { decodePhoto, exifWallTime, PhotoRefusal, sniffPhoto, takenAtOf } from '@/lib/records/photo-image';

const exif = (takenWall: string | null, takenOffset: string | null = null) => ({ lon: null, lat: null, takenWall, takenOffset });

describe('photo bytes', () => {
  it('knows JPEG and PNG by their magic bytes, not their names', () => {
    // ITU-T T.81: SOI FF D8 then a marker's FF; PNG specification 5.2: the 8-byte signature
    expect(sniffPhoto(Buffer.from([0xff, 0xd8, 0xff, 0xe1, 0, 0]))).toBe('image/jpeg');
    expect(sniffPhoto(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0]))).toBe('image/png');
    expect(sniffPhoto(Buffer.from('GIF89a……'))).toBeNull();
    expect(sniffPhoto(Buffer.from([0xff, 0xd8]))).toBeNull();
    expect(sniffPhoto(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"/>'))).toBeNull();
  });

  it('makes an upright thumbnail within 320 px and refuses a damaged file', async () => {
    const tall = await sharp({ create: { width: 300, height: 900, channels: 3, background: '#345' } }).jpeg().toBuffer();
    const d = await decodePhoto(tall, 'image/jpeg');
    expect([d.width, d.height]).toEqual([300, 900]);
    expect(await sharp(d.thumbnail).metadata()).toMatchObject({ format: 'jpeg', width: 107, height: 320 });
    const err = await decodePhoto(tall.subarray(0, 200), 'image/jpeg').catch((e) => e);
    expect(err).toBeInstanceOf(PhotoRefusal);
    expect(err.kind).toBe('corrupt');
  });
});

describe('the time a photo was taken', () => {
  it('reads DateTimeOriginal on the project\'s clock, or with its own offset', () => {
    expect(exifWallTime('2026:11:04 10:15:30')).toBe('2026-11-04 10:15:30');
    // Europe/Berlin is UTC+1 in November and UTC+2 in July [IANA tz database]
    expect(takenAtOf(exif('2026:11:04 10:15:30'), 'Europe/Berlin')).toBe('2026-11-04T09:15:30.000Z');
    expect(takenAtOf(exif('2026:07:04 10:15:30'), 'Europe/Berlin')).toBe('2026-07-04T08:15:30.000Z');
    expect(takenAtOf(exif('2026:11:04 10:15:30', '-05:00'), 'Europe/Berlin')).toBe('2026-11-04T15:15:30.000Z');
  });

  it('drops a camera clock that was never set or runs ahead', () => {
    const now = new Date('2026-12-05T12:00:00Z');
    expect(takenAtOf(exif('1970:01:01 00:00:00'), 'UTC', now)).toBeNull();
    expect(takenAtOf(exif('2000:01:01 00:00:00'), 'UTC', now)).not.toBeNull();
    expect(takenAtOf(exif('2027:03:01 09:00:00'), 'UTC', now)).toBeNull();
    expect(takenAtOf(exif('2026:02:30 09:00:00'), 'UTC', now)).toBeNull();
    expect(takenAtOf(exif(null), 'UTC', now)).toBeNull();
  });
});
