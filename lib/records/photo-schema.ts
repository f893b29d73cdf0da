import { z } from 'zod';
import { RANGES, rangedNumber } from './plausible-ranges';

/**
 * The fields that come with a photo. A photo must be placed: by its own EXIF GPS position, by a position
 * given by hand (lon/lat: the phone's or a tap on the map), by a route and chainage, or by the crossing or
 * test pit it shows. A hand position wins over EXIF (the person corrects the camera).
 */

/** Photos above this are refused while they arrive (a phone's JPEG is 2–10 MB [practice]). */
export const PHOTO_MAX_BYTES = 25 * 1024 * 1024;

const blank = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const num = <T extends z.ZodType>(s: T) => z.preprocess((v) => (typeof blank(v) === 'string' ? Number(String(v).replace(',', '.')) : blank(v)), s);

const lon = z.number({ message: 'Longitude must be a number of degrees.' }).min(-180, 'Longitude must be between -180 and 180.').max(180, 'Longitude must be between -180 and 180.');
const lat = z.number({ message: 'Latitude must be a number of degrees.' }).min(-90, 'Latitude must be between -90 and 90.').max(90, 'Latitude must be between -90 and 90.');
const caption = z.string().trim().max(500, 'Keep the caption under 500 characters.');

/** The multipart fields beside the file (all text, as a form sends them). */
export const photoFieldsSchema = z
  .object({
    caption: z.preprocess(blank, caption.optional()),
    lon: num(lon.optional()),
    lat: num(lat.optional()),
    routeId: z.preprocess(blank, z.uuid('Pick the route.').optional()),
    chainageM: num(rangedNumber(RANGES.chainageM).optional()),
    crossingId: z.preprocess(blank, z.uuid('The crossing must be the id of a road crossing record.').optional()),
    pitId: z.preprocess(blank, z.uuid('The test pit must be the id of a test pit.').optional()),
  })
  .superRefine((v, ctx) => {
    if ((v.lon === undefined) !== (v.lat === undefined)) ctx.addIssue({ code: 'custom', path: [v.lon === undefined ? 'lon' : 'lat'], message: 'Give both longitude and latitude, or neither.' });
    if (v.chainageM !== undefined && !v.routeId) ctx.addIssue({ code: 'custom', path: ['routeId'], message: 'A chainage needs its route.' });
    if (v.crossingId && v.pitId) ctx.addIssue({ code: 'custom', path: ['pitId'], message: 'Attach the photo to a crossing or a test pit, not both.' });
  });
export type PhotoFields = z.infer<typeof photoFieldsSchema>;

/**
 * A change (JSON), in the same field names as an upload: the caption, a new place by hand (lon/lat, snapped
 * to `routeId` when given) or at a route and chainage, the crossing or pit it shows (null detaches).
 */
export const photoPatchSchema = z
  .object({
    caption: caption.optional(),
    lon: lon.optional(),
    lat: lat.optional(),
    routeId: z.uuid('Pick the route.').optional(),
    chainageM: rangedNumber(RANGES.chainageM).optional(),
    crossingId: z.uuid('The crossing must be the id of a road crossing record.').nullable().optional(),
    pitId: z.uuid('The test pit must be the id of a test pit.').nullable().optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.lon === undefined) !== (v.lat === undefined)) ctx.addIssue({ code: 'custom', path: [v.lon === undefined ? 'lon' : 'lat'], message: 'Give both longitude and latitude, or neither.' });
    if (v.chainageM !== undefined && !v.routeId) ctx.addIssue({ code: 'custom', path: ['routeId'], message: 'A chainage needs its route.' });
    if (v.chainageM !== undefined && v.lon !== undefined) ctx.addIssue({ code: 'custom', path: ['chainageM'], message: 'Give a position or a chainage, not both.' });
    if (v.routeId && v.chainageM === undefined && v.lon === undefined) ctx.addIssue({ code: 'custom', path: ['chainageM'], message: 'Give the chainage on the route, or a position.' });
    if (v.crossingId && v.pitId) ctx.addIssue({ code: 'custom', path: ['pitId'], message: 'Attach the photo to a crossing or a test pit, not both.' });
  });
export type PhotoPatch = z.infer<typeof photoPatchSchema>;
