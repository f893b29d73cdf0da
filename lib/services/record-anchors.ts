import type { Db } from '@/db/client';
import { getAnchorRoute, nearestRoutes, type AnchorRoute } from '@/db/record-anchors';
import { pointAtChainage } from '@/lib/matching/chainage';
import type { LonLat } from '@/lib/matching/types';
import { snapOnLine, type PointAnchor, type PointAnchorInput, type StretchAnchor } from '@/lib/records/anchor';
import { AppError } from '@/lib/api/errors';

/** The route of a stretch record, checked: in the project, not removed (unless `allowRemoved`), the stretch within its length. */
export async function resolveStretchAnchor(db: Db, projectId: string, a: StretchAnchor, allowRemoved = false): Promise<AnchorRoute> {
  const route = await getAnchorRoute(db, projectId, a.routeId);
  if (!route) throw new AppError('invalid', 'That route is not in this project.', [{ path: 'routeId', message: 'Pick a route of this project.' }]);
  if (route.removed && !allowRemoved) throw new AppError('invalid', `Route ${route.ref} was removed by a plan revision: its records stay, but no new ones are added to it.`, [{ path: 'routeId', message: 'This route was removed from the plan.' }]);
  if (a.toChainageM > route.lengthM + 0.5) {
    throw new AppError('invalid', `Route ${route.ref} is ${route.lengthM.toFixed(1)} m long: the stretch cannot end at ${a.toChainageM} m.`, [{ path: 'toChainageM', message: `At most ${route.lengthM.toFixed(1)} m on route ${route.ref}.` }]);
  }
  return route;
}

/**
 * Resolves a point anchor: a typed chainage gets the route's point there; a position is snapped to the
 * given route or to the nearest current route of the project (among the five nearest by PostGIS's index,
 * then exactly, geodesically). Refuses a route of another project, a chainage beyond the route's end and a
 * position further than `maxDistanceM` from any route.
 */
export async function resolvePointAnchor(db: Db, projectId: string, a: PointAnchorInput, maxDistanceM = 100): Promise<PointAnchor> {
  if ('chainageM' in a) {
    const route = await getAnchorRoute(db, projectId, a.routeId);
    if (!route) throw new AppError('invalid', 'That route is not in this project.', [{ path: 'routeId', message: 'Pick a route of this project.' }]);
    if (a.chainageM > route.lengthM + 0.5) {
      throw new AppError('invalid', `Route ${route.ref} is ${route.lengthM.toFixed(1)} m long: chainage ${a.chainageM} m is beyond its end.`, [{ path: 'chainageM', message: `At most ${route.lengthM.toFixed(1)} m on route ${route.ref}.` }]);
    }
    const c = Math.min(a.chainageM, route.lengthM);
    return { routeId: route.id, chainageM: c, offsetM: 0, position: pointAtChainage(route.coords, c), source: 'chainage' };
  }
  const p: LonLat = [a.lon, a.lat];
  let candidates: AnchorRoute[];
  if (a.routeId) {
    const r = await getAnchorRoute(db, projectId, a.routeId);
    if (!r) throw new AppError('invalid', 'That route is not in this project.', [{ path: 'routeId', message: 'Pick a route of this project.' }]);
    candidates = [r];
  } else {
    candidates = await nearestRoutes(db, projectId, p);
  }
  let best: (PointAnchor & { distanceM: number }) | undefined;
  for (const r of candidates) {
    const s = snapOnLine(r.coords, p);
    if (!best || s.distanceM < best.distanceM) best = { routeId: r.id, chainageM: s.chainageM, offsetM: s.offsetM, distanceM: s.distanceM, position: p, source: 'position' };
  }
  if (!best) throw new AppError('invalid', 'This project has no planned route to place the record on: import the plan first.', [{ path: 'lon', message: 'No route to place it on.' }]);
  if (best.distanceM > maxDistanceM) {
    throw new AppError('invalid', `That position is ${best.distanceM.toFixed(0)} m from the nearest route, more than ${maxDistanceM} m: check the position or pick the route.`, [{ path: 'lon', message: `More than ${maxDistanceM} m from any route.` }]);
  }
  const { distanceM: _d, ...anchor } = best;
  return anchor;
}

