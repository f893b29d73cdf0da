import { z } from 'zod';
import type { Db } from '@/db/client';
import { searchAddresses, type AddressCandidate } from '@/db/address-search';
import { lookupStretches, nearbyPointsAndCrossings, type NearbyPoint } from '@/db/lookup';
import { bundleSummary } from '@/lib/records/duct-spec';
import { listVisibleProjectNames } from '@/db/projects';
import { ACCURACY_CLASS_LABELS, type AccuracyClass } from '@/lib/records/accuracy-classes';
import { snapOnLine } from '@/lib/records/anchor';
import { couldBeThisClose, LOOKUP_MAX_RADIUS_M, relativeSide, sideOf, sortStretches, type RouteSide } from '@/lib/lookup/stretches';
import { AppError } from '@/lib/api/errors';
import { env } from '@/lib/env';
import type { Principal } from '@/lib/auth/principal';
import type { LonLat } from '@/lib/matching/types';

export const addressSearchQuery = z.object({
  q: z.string().trim().min(2, 'type at least two characters of the address').max(200),
  limit: z.coerce.number().int().min(1).max(50).default(10),
});

const coord = (name: string, min: number, max: number) =>
  z
    .string({ message: `${name} is required (decimal degrees, WGS 84)` })
    .trim()
    .refine((s) => /^-?\d+(\.\d+)?$/.test(s), `${name} must be a decimal number of degrees`)
    .transform(Number)
    .refine((n) => n >= min && n <= max, `${name} must lie between ${min} and ${max}`);

export const nearbyQuery = z.object({
  lon: coord('lon', -180, 180),
  lat: coord('lat', -90, 90),
  radius: z
    .string()
    .optional()
    .refine((s) => s === undefined || (/^\d+(\.\d+)?$/.test(s) && Number(s) > 0 && Number(s) <= LOOKUP_MAX_RADIUS_M), `radius must be a number of metres above 0 and at most ${LOOKUP_MAX_RADIUS_M}`)
    .transform((s) => (s === undefined ? undefined : Number(s))),
  // the picked address's side of the street: when given, each stretch says "same side" or "across"
  addressId: z.string().uuid().optional(),
  order: z.enum(['distance', 'could_be']).default('distance'),
  format: z.enum(['json', 'geojson']).default('json'),
});

/** The projects the person's organisation may see: the owner all its own, a contractor those it builds. */
export async function visibleProjects(db: Db, me: Principal): Promise<{ id: string; name: string; ownerOrgName: string }[]> {
  return listVisibleProjectNames(db, me.organisationId);
}

export async function lookupAddresses(db: Db, me: Principal, q: z.infer<typeof addressSearchQuery>): Promise<(AddressCandidate & { projectName: string })[]> {
  const projects = await visibleProjects(db, me);
  const names = new Map(projects.map((p) => [p.id, p.name]));
  const found = await searchAddresses(db, { projectIds: projects.map((p) => p.id), q: q.q, limit: q.limit });
  return found.map((a) => ({ ...a, projectName: names.get(a.projectId)! }));
}

export interface Stretch {
  id: string;
  projectId: string;
  projectName: string;
  ownerOrganisation: string;
  /** how to reach the network owner (organisations.contact); empty when not set */
  ownerContact: string;
  routeRef: string | null;
  street: string | null;
  status: string;
  fromChainageM: number;
  toChainageM: number;
  /** geodesic distance from the spot (m) */
  distanceM: number;
  /** the 95 % position radius (m) and where it comes from */
  radiusM: number | null;
  radiusSource: string;
  couldBeThisCloseM: number;
  /** left or right of the route's direction, seen from the spot; relative to the picked address when one was */
  side: RouteSide | null;
  sideOfAddress: 'same side as the address' | 'across' | null;
  chainageM: number | null;
  cover: { nearest: { chainageM: number; coverM: number }[]; shallowestM: number | null };
  ducts: { summary: string; kind: 'planned' | 'installed'; ducts: { position: number; colour: string | null; colourHex: string | null; outerMm: number; innerMm: number | null }[] }[];
  laidOn: string | null;
  review: string;
  /** the newest issued handover package holding this section; null: not handed over yet */
  handoverRevision: { handoverId: string; revision: number; status: string } | null;
  coords: LonLat[];
  band: GeoJSON.Polygon | GeoJSON.MultiPolygon | null;
}

export interface NearbyResult {
  spot: { lon: number; lat: number };
  radiusM: number;
  stretches: Stretch[];
  nearby: NearbyPoint[];
  crossings: { id: string; routeRef: string; built: boolean; coords: LonLat[] }[];
}

export async function lookupNearby(db: Db, me: Principal, q: z.infer<typeof nearbyQuery>): Promise<NearbyResult> {
  const projects = await visibleProjects(db, me);
  const ids = projects.map((p) => p.id);
  const byId = new Map(projects.map((p) => [p.id, p]));
  const spot: LonLat = [q.lon, q.lat];
  const radiusM = q.radius ?? env().LOOKUP_RADIUS_M;
  // the stretches with all they need (db/lookup.ts: two statements), the points and crossings, and the picked address, side by side
  const [sections, { points: nearby, crossings: crossingRows }, address] = await Promise.all([
    lookupStretches(db, ids, spot, radiusM),
    nearbyPointsAndCrossings(db, ids, spot, radiusM),
    q.addressId
      ? db('addresses').where({ id: q.addressId }).whereIn('project_id', ids).first<{ project_id: string; lon: number; lat: number } | undefined>('project_id', db.raw('ST_X(geom) as lon, ST_Y(geom) as lat'))
      : Promise.resolve(undefined),
  ]);
  if (q.addressId && !address) throw new AppError('not_found', 'That address is not in a project your organisation may see.');

  const stretches: Stretch[] = [];
  for (const s of sections) {
    const r = s.route;
    const line = r?.coords ?? s.coords;
    const snap = snapOnLine(line, spot);
    const side = sideOf(snap.offsetM);
    const addressSide: RouteSide | null = address ? sideOf(snapOnLine(line, [address.lon, address.lat]).offsetM) : null;
    const nearest = [...s.covers].sort((a, b) => Math.abs(a.chainageM - snap.chainageM) - Math.abs(b.chainageM - snap.chainageM)).slice(0, 2);
    const installed = s.bundles.filter((b) => b.kind === 'installed');
    const p = byId.get(s.projectId)!;
    stretches.push({
      id: s.id, projectId: s.projectId, projectName: p.name, ownerOrganisation: p.ownerOrgName, ownerContact: s.ownerContact, routeRef: s.routeRef, street: r?.street ?? null, status: s.status,
      fromChainageM: s.fromChainageM, toChainageM: s.toChainageM, distanceM: round(s.distanceM, 2), radiusM: s.accuracyM === null ? null : round(s.accuracyM, 3),
      radiusSource: s.classes.length ? sortClasses(s.classes).map((c) => ACCURACY_CLASS_LABELS[c]).join(', ') : 'unknown',
      couldBeThisCloseM: round(couldBeThisClose(s.distanceM, s.accuracyM), 2), side: r ? side : null, sideOfAddress: r ? relativeSide(side, addressSide) : null,
      chainageM: r ? round(snap.chainageM, 1) : null,
      cover: { nearest, shallowestM: s.covers.length ? Math.min(...s.covers.map((c) => c.coverM)) : null },
      ducts: (installed.length ? installed : s.bundles).map((b) => ({ summary: bundleSummary(b.ducts), kind: b.kind, ducts: b.ducts.map((d) => ({ position: d.position, colour: d.colourLabel, colourHex: d.colourHex, outerMm: d.outerMm, innerMm: d.innerMm })) })),
      laidOn: s.laidOn, review: s.review, handoverRevision: s.handover, coords: s.coords, band: s.band,
    });
  }
  const sorted = sortStretches(stretches, q.order);
  const crossings = crossingRows.map(({ projectId: _p, ...c }) => c);
  return { spot: { lon: q.lon, lat: q.lat }, radiusM, stretches: sorted, nearby, crossings };
}

const round = (x: number, d: number) => Math.round(x * 10 ** d) / 10 ** d;
/** Classes in the catalogue's order, whatever order the database gave them in. */
const CLASS_ORDER = Object.keys(ACCURACY_CLASS_LABELS) as AccuracyClass[];
const sortClasses = (cs: AccuracyClass[]) => [...cs].sort((a, b) => CLASS_ORDER.indexOf(a) - CLASS_ORDER.indexOf(b));

/** The stretches as GeoJSON: each a LineString feature with the fields as properties (id = section id). */
export function nearbyGeoJson(r: NearbyResult): GeoJSON.FeatureCollection {
  return {
    type: 'FeatureCollection',
    features: r.stretches.map(({ coords, band, ...props }) => ({ type: 'Feature', id: props.id, geometry: { type: 'LineString', coordinates: coords }, properties: { ...props, band } })),
  };
}
