import Flatbush from 'flatbush';
import { metresPerDegreeInto, pointAtChainage } from '@/lib/matching/chainage';
import type { LonLat } from '@/lib/matching/types';
import { snapOnLine } from '@/lib/records/anchor';
import { normaliseStreet } from './normalise';

/**
 * Which planned street route serves an address, where its foot point lies on it, and on which side of the
 * street the address stands.
 *
 * The serving route, in this order:
 * 1. the design's assignment, when the import had one (`design_route_ref` names a current route) — "design";
 * 2. the nearest current street route whose street name is the address's own street (names compared after
 *    `normaliseStreet`), within the project's serve distance — "street";
 * 3. the nearest current street route of any name within that distance — "nearest";
 * 4. none, with the reason.
 * Step 2 before 3 is what keeps a corner plot, or a house that lies nearer to a side street than to its own,
 * on the street of its address. Crossing routes never serve an address directly: they carry the service
 * across the street from a street route.
 *
 * The foot point is the address projected onto the serving route (geodesic chainage, `snapOnLine`); its
 * distance is geodesic. Past a route's end the foot point is the end itself.
 *
 * The side of the street. The trench runs along one side of the street, so for each street route one sign of
 * the signed offset (left of the route's direction positive) is the route's own side and the other is
 * across. The across sign of a route is decided, in this order:
 * 1. by its road crossings: a crossing route whose one end lies on this route (within
 *    `CROSSING_ATTACH_M`) has its far end across the street, so the sign of the far end's offset is across
 *    (the majority when crossings disagree);
 * 2. otherwise by the addresses it serves: the trench lies nearer the houses of its own side, so the sign
 *    whose addresses lie further from the line (mean distance) is across — this needs addresses on both
 *    sides;
 * 3. otherwise every address is on the route side.
 * The design's `design_side` wins over the geometry for its address. Limits: a route that changes side
 * along its length (a trench that crosses over mid-street without a crossing route) takes one sign for
 * the whole route; an address within half a metre of the line is on the route side; a route with neither
 * crossings nor addresses on both sides calls everyone "route".
 */

/** How near a crossing route's end must lie to a street route to count as starting on it (m). */
export const CROSSING_ATTACH_M = 5;

export interface ServingRouteInput {
  id: string;
  ref: string;
  street: string | null;
  kind: 'street' | 'crossing';
  coords: LonLat[];
  /** dropped by a plan revision */
  removed: boolean;
}

export interface ServingAddressInput {
  id: string;
  key: string;
  street: string;
  lon: number;
  lat: number;
  designRouteRef: string | null;
  designSide: 'route' | 'across' | null;
}

export type ServingBy = 'design' | 'street' | 'nearest';
export type Side = 'route' | 'across';
/** how the side was decided */
export type SideBy = 'design' | 'crossings' | 'addresses' | 'default';

export interface Serving {
  addressId: string;
  routeId: string | null;
  routeRef: string | null;
  by: ServingBy | null;
  side: Side | null;
  sideBy: SideBy | null;
  footChainageM: number | null;
  /** the foot point on the serving route */
  foot: LonLat | null;
  /** signed (left of the route's direction positive) */
  offsetM: number | null;
  distanceM: number | null;
  /** why no route serves it, when none does */
  reason: string | null;
}

/** A crossing route attached to a street route: its route-side end, where on the street route, and its far side. */
export interface CrossingAttachment {
  crossingRouteId: string;
  crossingRouteRef: string;
  /** the street route it starts on */
  streetRouteId: string;
  streetRouteRef: string;
  /** the crossing's end on the street route */
  nearEnd: LonLat;
  /** chainage of that end on the street route */
  chainageM: number;
  /** sign (+1 left, −1 right) of the far end's offset from the street route; 0 when it lies on the line */
  farSign: number;
}

export interface ServingResult {
  servings: Serving[];
  crossings: CrossingAttachment[];
  /** per street route id: the offset sign that is across (+1, −1) and how it was decided */
  across: Map<string, { sign: number; by: SideBy }>;
}

const fmt = (m: number) => (m < 10 ? m.toFixed(1) : m.toFixed(0));

/** A spatial index over the segments of the current street routes (bounding boxes in degrees). */
class SegmentIndex {
  private index: Flatbush | null;
  private owner: number[] = [];
  constructor(routes: ServingRouteInput[]) {
    let n = 0;
    for (const r of routes) n += Math.max(r.coords.length - 1, r.coords.length ? 1 : 0);
    this.index = n ? new Flatbush(n) : null;
    if (!this.index) return;
    routes.forEach((r, k) => {
      if (r.coords.length === 1) {
        const [x, y] = r.coords[0];
        this.index!.add(x, y, x, y);
        this.owner.push(k);
      }
      for (let i = 0; i + 1 < r.coords.length; i++) {
        const [ax, ay] = r.coords[i];
        const [bx, by] = r.coords[i + 1];
        this.index!.add(Math.min(ax, bx), Math.min(ay, by), Math.max(ax, bx), Math.max(ay, by));
        this.owner.push(k);
      }
    });
    this.index.finish();
  }

  /** Indices of the routes with a segment whose box comes within `radiusM` of p (a superset of those within). */
  near(p: LonLat, radiusM: number): number[] {
    if (!this.index) return [];
    const per = new Float64Array(2);
    metresPerDegreeInto(p[1], per);
    // 1 % and a metre of margin: the box test is only the first sieve, the distance is geodesic
    const dx = (radiusM * 1.01 + 1) / per[0];
    const dy = (radiusM * 1.01 + 1) / per[1];
    const out = new Set<number>();
    for (const i of this.index.search(p[0] - dx, p[1] - dy, p[0] + dx, p[1] + dy)) out.add(this.owner[i]);
    return [...out];
  }
}

/** The crossing routes that start on a street route, with their route-side end and the side their far end lies on. */
export function attachCrossings(streetRoutes: ServingRouteInput[], crossingRoutes: ServingRouteInput[], index = new SegmentIndex(streetRoutes)): CrossingAttachment[] {
  const out: CrossingAttachment[] = [];
  for (const c of crossingRoutes) {
    if (c.removed || c.coords.length < 2) continue;
    const ends: LonLat[] = [c.coords[0], c.coords[c.coords.length - 1]];
    let best: { end: number; route: number; chainageM: number; distanceM: number } | null = null;
    ends.forEach((e, end) => {
      for (const k of index.near(e, CROSSING_ATTACH_M)) {
        const s = snapOnLine(streetRoutes[k].coords, e);
        if (s.distanceM <= CROSSING_ATTACH_M && (!best || s.distanceM < best.distanceM)) best = { end, route: k, chainageM: s.chainageM, distanceM: s.distanceM };
      }
    });
    if (!best) continue;
    const b = best as { end: number; route: number; chainageM: number; distanceM: number };
    const street = streetRoutes[b.route];
    const far = snapOnLine(street.coords, ends[1 - b.end]);
    out.push({
      crossingRouteId: c.id, crossingRouteRef: c.ref, streetRouteId: street.id, streetRouteRef: street.ref,
      nearEnd: ends[b.end], chainageM: b.chainageM, farSign: Math.abs(far.offsetM) < 0.5 ? 0 : Math.sign(far.offsetM),
    });
  }
  return out;
}

/**
 * The serving route, foot point and side of every address (see the rule above). Scales by a spatial index
 * over the route segments: each address is measured only against the routes whose segments come near it.
 */
export function findServing(addresses: ServingAddressInput[], routes: ServingRouteInput[], settings: { serveDistanceM: number }): ServingResult {
  const finder = new ServingFinder(routes, settings);
  const servings: Serving[] = [];
  for (const a of addresses) servings.push(finder.serve(a));
  return finder.finish(addresses, servings);
}

/**
 * findServing in steps, so that a caller can work through many addresses a batch at a time (a job keeps its
 * heartbeat between batches): `serve` each address, then `finish` decides the sides from all of them.
 */
export class ServingFinder {
  private readonly streets: ServingRouteInput[];
  private readonly current: Map<string, ServingRouteInput>;
  private readonly streetNames: string[];
  private readonly index: SegmentIndex;
  private readonly crossings: CrossingAttachment[];
  private readonly limit: number;

  constructor(private readonly routes: ServingRouteInput[], settings: { serveDistanceM: number }) {
    this.streets = routes.filter((r) => r.kind === 'street' && !r.removed && r.coords.length > 0);
    this.current = new Map(routes.filter((r) => !r.removed && r.coords.length > 0).map((r) => [r.ref, r]));
    this.streetNames = this.streets.map((r) => (r.street ? normaliseStreet(r.street) : ''));
    this.index = new SegmentIndex(this.streets);
    this.crossings = attachCrossings(this.streets, routes.filter((r) => r.kind === 'crossing'), this.index);
    this.limit = settings.serveDistanceM;
  }

  /** The serving route of one address (its side is decided by `finish`). */
  serve(a: ServingAddressInput): Serving {
    const { streets, streetNames, limit } = this;
    const p: LonLat = [a.lon, a.lat];
    const none = (reason: string): Serving => ({ addressId: a.id, routeId: null, routeRef: null, by: null, side: null, sideBy: null, footChainageM: null, foot: null, offsetM: null, distanceM: null, reason });
    const serve = (r: ServingRouteInput, by: ServingBy, s = snapOnLine(r.coords, p)): Serving => ({
      addressId: a.id, routeId: r.id, routeRef: r.ref, by, side: null, sideBy: null, footChainageM: s.chainageM, foot: null,
      offsetM: s.offsetM, distanceM: s.distanceM, reason: null,
    });
    if (a.designRouteRef) {
      const r = this.current.get(a.designRouteRef);
      if (r) return serve(r, 'design');
    }
    const own = a.street ? normaliseStreet(a.street) : '';
    let byName: { k: number; s: ReturnType<typeof snapOnLine> } | null = null;
    let any: { k: number; s: ReturnType<typeof snapOnLine> } | null = null;
    for (const k of this.index.near(p, limit)) {
      const s = snapOnLine(streets[k].coords, p);
      if (s.distanceM > limit) continue;
      if (own && streetNames[k] === own && (!byName || s.distanceM < byName.s.distanceM)) byName = { k, s };
      if (!any || s.distanceM < any.s.distanceM) any = { k, s };
    }
    if (byName) return serve(streets[byName.k], 'street', byName.s);
    if (any) return serve(streets[any.k], 'nearest', any.s);
    return none(a.designRouteRef
      ? `The design's route ${a.designRouteRef} is not in the current plan, and no street route lies within ${fmt(limit)} m.`
      : `No street route within ${fmt(limit)} m.`);
  }

  /** Decides the side of the street of every served address (`servings[i]` is `addresses[i]`'s) and returns them all. */
  finish(addresses: ServingAddressInput[], servings: Serving[]): ServingResult {
    const { crossings, routes } = this;
    // the across sign of each street route: its crossings first, then its addresses
    const across = new Map<string, { sign: number; by: SideBy }>();
    const votes = new Map<string, number>();
    for (const c of crossings) if (c.farSign) votes.set(c.streetRouteId, (votes.get(c.streetRouteId) ?? 0) + c.farSign);
    for (const [id, v] of votes) if (v !== 0) across.set(id, { sign: Math.sign(v), by: 'crossings' });
    const spread = new Map<string, { pos: number; np: number; neg: number; nn: number }>();
    for (const s of servings) {
      if (!s.routeId || s.offsetM === null || Math.abs(s.offsetM) < 0.5) continue;
      const t = spread.get(s.routeId) ?? { pos: 0, np: 0, neg: 0, nn: 0 };
      if (s.offsetM > 0) { t.pos += s.offsetM; t.np++; } else { t.neg -= s.offsetM; t.nn++; }
      spread.set(s.routeId, t);
    }
    for (const [id, t] of spread) {
      if (across.has(id) || !t.np || !t.nn) continue;
      const pos = t.pos / t.np;
      const neg = t.neg / t.nn;
      if (pos !== neg) across.set(id, { sign: pos > neg ? 1 : -1, by: 'addresses' });
    }

    const routeById = new Map(routes.map((r) => [r.id, r]));
    const designSide = new Map(addresses.map((a) => [a.id, a.designSide]));
    for (const s of servings) {
      if (!s.routeId) continue;
      s.foot = pointAtChainage(routeById.get(s.routeId)!.coords, s.footChainageM!);
      const d = designSide.get(s.addressId);
      if (d) { s.side = d; s.sideBy = 'design'; continue; }
      const rule = across.get(s.routeId);
      if (!rule) { s.side = 'route'; s.sideBy = 'default'; continue; }
      s.side = Math.abs(s.offsetM!) >= 0.5 && Math.sign(s.offsetM!) === rule.sign ? 'across' : 'route';
      s.sideBy = rule.by;
    }
    return { servings, crossings, across };
  }
}
