import type { Db } from './client';

/** An address of the register with what the households job derived for it. */
export interface Address {
  id: string;
  projectId: string;
  /** the register's own identifier; a re-import updates by it */
  key: string;
  street: string;
  /** as written, with its letter or suffix */
  number: string;
  postcode: string;
  locality: string;
  /** households (units) in the building */
  units: number;
  buildingType: string;
  lon: number;
  lat: number;
  /** the design's assignment, when the import had one */
  designRouteRef: string | null;
  designSide: 'route' | 'across' | null;
  connected: boolean;
  /** YYYY-MM-DD */
  connectedOn: string | null;
  connectedSource: 'hand' | 'import' | null;
  /** removed by a later import: kept with its history, counted nowhere */
  removed: boolean;
  servingRouteId: string | null;
  servingRouteRef: string | null;
  /** how the serving route was found: the design's assignment, the address's own street, or the nearest route */
  servingBy: 'design' | 'street' | 'nearest' | null;
  side: 'route' | 'across' | null;
  footChainageM: number | null;
  /** from the address to its foot point on the serving route (m) */
  distanceM: number | null;
  passed: boolean;
  passedApproved: boolean;
  passedViaCrossingId: string | null;
  notPassedReason: string | null;
  computedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

export type AddressStatusFilter = 'passed' | 'not_passed' | 'connected';

interface Row {
  id: string; project_id: string; key: string; street: string; number: string; postcode: string; locality: string;
  units: number; building_type: string; lon: number; lat: number; design_route_ref: string | null; design_side: Address['designSide'];
  connected: boolean; connected_on: string | null; connected_source: Address['connectedSource']; removed_in_import: string | null;
  serving_route_id: string | null; serving_route_ref: string | null; serving_by: Address['servingBy']; side: Address['side'];
  foot_chainage_m: number | null; distance_m: number | null; passed: boolean; passed_approved: boolean; passed_via_crossing_id: string | null;
  not_passed_reason: string | null; computed_at: Date | null; created_at: Date; updated_at: Date;
}

const toDto = (r: Row): Address => ({
  id: r.id, projectId: r.project_id, key: r.key, street: r.street, number: r.number, postcode: r.postcode, locality: r.locality,
  units: r.units, buildingType: r.building_type, lon: r.lon, lat: r.lat, designRouteRef: r.design_route_ref, designSide: r.design_side,
  connected: r.connected, connectedOn: r.connected_on, connectedSource: r.connected_source, removed: r.removed_in_import !== null,
  servingRouteId: r.serving_route_id, servingRouteRef: r.serving_route_ref, servingBy: r.serving_by, side: r.side,
  footChainageM: r.foot_chainage_m, distanceM: r.distance_m, passed: r.passed, passedApproved: r.passed_approved,
  passedViaCrossingId: r.passed_via_crossing_id, notPassedReason: r.not_passed_reason,
  computedAt: r.computed_at?.toISOString() ?? null, createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
});

function baseQuery(db: Db) {
  return db('addresses as a')
    .leftJoin('planned_routes as r', 'r.id', 'a.serving_route_id')
    .select(
      'a.*', 'r.ref as serving_route_ref',
      db.raw("ST_X(a.geom) as lon, ST_Y(a.geom) as lat, to_char(a.connected_on, 'YYYY-MM-DD') as connected_on"),
    );
}

/** The project's current addresses (removed ones only when asked), by street, number and key. */
export async function listAddresses(db: Db, projectId: string, opts: { status?: AddressStatusFilter; includeRemoved?: boolean } = {}): Promise<Address[]> {
  const q = baseQuery(db).where('a.project_id', projectId);
  if (!opts.includeRemoved) q.whereNull('a.removed_in_import');
  if (opts.status === 'passed') q.where('a.passed', true);
  if (opts.status === 'not_passed') q.where('a.passed', false);
  if (opts.status === 'connected') q.where('a.connected', true);
  const rows = await q.orderBy([{ column: 'a.street' }, { column: 'a.number_base' }, { column: 'a.number_suffix' }, { column: 'a.key' }]);
  return (rows as Row[]).map(toDto);
}

export async function getAddress(db: Db, id: string): Promise<Address | undefined> {
  const row = await baseQuery(db).where('a.id', id).first();
  return row && toDto(row as Row);
}

export async function getAddressByKey(db: Db, projectId: string, key: string): Promise<Address | undefined> {
  const row = await baseQuery(db).where({ 'a.project_id': projectId, 'a.key': key }).first();
  return row && toDto(row as Row);
}
