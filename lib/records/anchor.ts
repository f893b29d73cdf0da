import { z } from 'zod';
import { localFrame, projectOntoLine } from '@/lib/matching/chainage';
import type { LonLat } from '@/lib/matching/types';
import { RANGES, rangedNumber } from './plausible-ranges';

/**
 * Where a trench record hangs. Sections are cut again by every reconciliation, so records anchor on what
 * lasts: a planned route (by id) and a chainage range on it (ducts, restoration, crossings), or a
 * chainage, or a point snapped to the nearest route with its chainage and signed offset (pits, photos and
 * depth readings taken by GNSS). A record shows on every current section whose stretch it touches.
 */

const chainage = rangedNumber(RANGES.chainageM);
const lon = z.number({ message: 'Longitude must be a number of degrees.' }).min(-180, 'Longitude must be between -180 and 180.').max(180, 'Longitude must be between -180 and 180.');
const lat = z.number({ message: 'Latitude must be a number of degrees.' }).min(-90, 'Latitude must be between -90 and 90.').max(90, 'Latitude must be between -90 and 90.');

/** A stretch of a route: from and to chainage (m), from < to. */
export const stretchAnchorSchema = z
  .object({ routeId: z.uuid('Pick the route.'), fromChainageM: chainage, toChainageM: chainage })
  .refine((v) => v.toChainageM > v.fromChainageM, { message: 'The stretch must end after it starts (to chainage above from chainage).', path: ['toChainageM'] });

/**
 * A point: at a chainage of a route (typed), or a position (GNSS, the phone's position or a tap on the
 * map), which the server snaps to the nearest route (or to `routeId` when given).
 */
export const pointAnchorSchema = z.union([
  z.object({ routeId: z.uuid('Pick the route.'), chainageM: chainage }),
  z.object({ lon, lat, routeId: z.uuid('Pick the route.').optional() }),
]);
export type StretchAnchor = z.infer<typeof stretchAnchorSchema>;
export type PointAnchorInput = z.infer<typeof pointAnchorSchema>;

/** A point anchored on a route, as stored: chainage along it and signed offset (left of the route's direction positive). */
export interface PointAnchor {
  routeId: string;
  chainageM: number;
  offsetM: number;
  /** the position: measured (GNSS, map) or, for a typed chainage, the route's point there */
  position: LonLat;
  source: 'chainage' | 'position';
}

/** Whether two chainage ranges share more than a point (a stretch ending where a section starts is not on it). */
export function rangesOverlap(aFrom: number, aTo: number, bFrom: number, bTo: number): boolean {
  return aFrom < bTo && bFrom < aTo;
}

/** Whether a point record at `chainageM` lies on a stretch, ends included. */
export function chainageOnStretch(chainageM: number, from: number, to: number): boolean {
  return chainageM >= from && chainageM <= to;
}

/**
 * Chainage and signed offset of p on a route's line (geodesic chainage, the same as the sections'):
 * `snapOnLine([[0, 0], [0.001, 0]], [0.0005, 0.0001])` → `{ chainageM: 55.66, offsetM: 11.06 }` (left is positive).
 */
export function snapOnLine(coords: LonLat[], p: LonLat): { chainageM: number; offsetM: number; distanceM: number } {
  const proj = projectOntoLine(coords, p);
  const a = coords[Math.min(proj.segment, coords.length - 1)];
  const b = coords[Math.min(proj.segment + 1, coords.length - 1)];
  const f = localFrame(a);
  const [bx, by] = f.toXY(b);
  const [px, py] = f.toXY(p);
  const side = Math.sign(bx * py - by * px) || 1;
  return { chainageM: proj.chainageM, offsetM: side * proj.distanceM, distanceM: proj.distanceM };
}
