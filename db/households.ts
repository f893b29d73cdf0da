import type { Knex } from 'knex';
import type { Db } from './client';
import type { LonLat } from '@/lib/matching/types';

/** What the households job reads and writes: the register's inputs, the derived columns, the daily progress. */

export interface HouseholdAddressRow {
  id: string;
  key: string;
  street: string;
  units: number;
  lon: number;
  lat: number;
  designRouteRef: string | null;
  designSide: 'route' | 'across' | null;
  connected: boolean;
}

/** The project's current (not removed) addresses with what the rule reads of them. */
export async function loadHouseholdAddresses(db: Db, projectId: string): Promise<HouseholdAddressRow[]> {
  const rows = await db('addresses')
    .where({ project_id: projectId })
    .whereNull('removed_in_import')
    .select('id', 'key', 'street', 'units', 'design_route_ref', 'design_side', 'connected', db.raw('ST_X(geom) as lon, ST_Y(geom) as lat'))
    .orderBy('id');
  return rows.map((r: Record<string, any>) => ({
    id: r.id, key: r.key, street: r.street, units: r.units, lon: r.lon, lat: r.lat, designRouteRef: r.design_route_ref, designSide: r.design_side, connected: r.connected,
  }));
}

export interface HouseholdRouteRow {
  id: string;
  ref: string;
  street: string | null;
  kind: 'street' | 'crossing';
  coords: LonLat[];
  removed: boolean;
}

/** Every planned route of the project (removed ones flagged: a design assignment may still name one). */
export async function loadHouseholdRoutes(db: Db, projectId: string): Promise<HouseholdRouteRow[]> {
  const rows = await db('planned_routes')
    .where({ project_id: projectId })
    .select('id', 'ref', 'street', 'kind', 'removed_in_version', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'))
    .orderBy('ref');
  return rows.map((r: Record<string, any>) => ({ id: r.id, ref: r.ref, street: r.street, kind: r.kind, coords: r.geometry.coordinates, removed: r.removed_in_version !== null }));
}

/** The current sections (not retired) with their status and review. */
export async function loadHouseholdSections(db: Db, projectId: string) {
  const rows = await db('sections')
    .where({ project_id: projectId })
    .whereNull('retired_in_run')
    .select('id', 'planned_route_ref', 'status', 'from_chainage_m', 'to_chainage_m', 'review');
  return rows.map((r: Record<string, any>) => ({ id: r.id as string, plannedRouteRef: r.planned_route_ref as string | null, status: r.status, fromChainageM: r.from_chainage_m as number, toChainageM: r.to_chainage_m as number, review: r.review }));
}

/** The road crossing records of the project. */
export async function loadCrossingRecords(db: Db, projectId: string) {
  const rows = await db('road_crossings').where({ project_id: projectId }).select('id', 'route_id', 'built', 'address_ref');
  return rows.map((r: Record<string, any>) => ({ id: r.id as string, routeId: r.route_id as string, built: r.built as boolean, addressRef: r.address_ref as string | null }));
}

export interface DerivedColumns {
  id: string;
  servingRouteId: string | null;
  servingBy: 'design' | 'street' | 'nearest' | null;
  side: 'route' | 'across' | null;
  footChainageM: number | null;
  distanceM: number | null;
  passed: boolean;
  passedApproved: boolean;
  passedViaCrossingId: string | null;
  notPassedReason: string | null;
}

/**
 * Writes the derived columns of many addresses in one statement (arrays unnested, joined by id) and clears
 * them on removed addresses, which count nowhere. `updated_at` stays: it is the register's, not the job's.
 */
export async function writeDerivedColumns(db: Db, projectId: string, rows: DerivedColumns[], at: Date): Promise<void> {
  const CHUNK = 20000;
  for (let i = 0; i < rows.length; i += CHUNK) {
    const part = rows.slice(i, i + CHUNK);
    await db.raw(
      `UPDATE addresses a SET serving_route_id = u.serving_route_id, serving_by = u.serving_by, side = u.side,
         foot_chainage_m = u.foot_chainage_m, distance_m = u.distance_m, passed = u.passed, passed_approved = u.passed_approved,
         passed_via_crossing_id = u.passed_via_crossing_id, not_passed_reason = u.not_passed_reason, computed_at = ?
       FROM unnest(?::uuid[], ?::uuid[], ?::text[], ?::text[], ?::float8[], ?::float8[], ?::bool[], ?::bool[], ?::uuid[], ?::text[])
         AS u(id, serving_route_id, serving_by, side, foot_chainage_m, distance_m, passed, passed_approved, passed_via_crossing_id, not_passed_reason)
       WHERE a.id = u.id AND a.project_id = ?`,
      [
        at,
        part.map((r) => r.id), part.map((r) => r.servingRouteId), part.map((r) => r.servingBy), part.map((r) => r.side),
        part.map((r) => r.footChainageM), part.map((r) => r.distanceM), part.map((r) => r.passed), part.map((r) => r.passedApproved),
        part.map((r) => r.passedViaCrossingId), part.map((r) => r.notPassedReason), projectId,
        // arrays with nulls: pg sends them as arrays, knex's types know only arrays without
      ] as unknown as Knex.RawBinding[],
    );
  }
  await db('addresses')
    .where({ project_id: projectId })
    .whereNotNull('removed_in_import')
    .update({ serving_route_id: null, serving_by: null, side: null, foot_chainage_m: null, distance_m: null, passed: false, passed_approved: false, passed_via_crossing_id: null, not_passed_reason: 'Removed from the register.', computed_at: at });
}

export interface ProgressDay {
  /** YYYY-MM-DD, the project's own calendar */
  day: string;
  addresses: number;
  households: number;
  householdsServed: number;
  addressesPassed: number;
  householdsPassed: number;
  householdsPassedApproved: number;
  addressesConnected: number;
  householdsConnected: number;
}

/** Upserts the day's progress row: the last recompute of a day is the day's figure. */
export async function upsertProgress(db: Db, projectId: string, p: ProgressDay, at: Date): Promise<void> {
  await db('household_progress')
    .insert({
      project_id: projectId, day: p.day, addresses: p.addresses, households: p.households, households_served: p.householdsServed,
      addresses_passed: p.addressesPassed, households_passed: p.householdsPassed, households_passed_approved: p.householdsPassedApproved,
      addresses_connected: p.addressesConnected, households_connected: p.householdsConnected, computed_at: at,
    })
    .onConflict(['project_id', 'day'])
    .merge();
}

/** The project's daily series, oldest first. */
export async function listProgress(db: Db, projectId: string): Promise<ProgressDay[]> {
  const rows = await db('household_progress')
    .where({ project_id: projectId })
    .select('addresses', 'households', 'households_served', 'addresses_passed', 'households_passed', 'households_passed_approved', 'addresses_connected', 'households_connected', db.raw("to_char(day, 'YYYY-MM-DD') as day"))
    .orderBy('day');
  return rows.map((r: Record<string, any>) => ({
    day: r.day, addresses: r.addresses, households: r.households, householdsServed: r.households_served, addressesPassed: r.addresses_passed,
    householdsPassed: r.households_passed, householdsPassedApproved: r.households_passed_approved, addressesConnected: r.addresses_connected,
    householdsConnected: r.households_connected,
  }));
}

export interface AddressHistoryEntry {
  id: number;
  change: 'added' | 'changed' | 'removed' | 'restored' | 'connected' | 'disconnected';
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
  importId: string | null;
  importFileName: string | null;
  changedByName: string | null;
  at: string;
}

/** An address's history, newest first. */
export async function listAddressHistory(db: Db, addressId: string): Promise<AddressHistoryEntry[]> {
  const rows = await db('address_history as h')
    .leftJoin('users as u', 'u.id', 'h.changed_by')
    .leftJoin('address_imports as i', 'i.id', 'h.import_id')
    .where('h.address_id', addressId)
    .select('h.id', 'h.change', 'h.before', 'h.after', 'h.import_id', 'i.file_name', 'u.name as changed_by_name', 'h.at')
    .orderBy([{ column: 'h.at', order: 'desc' }, { column: 'h.id', order: 'desc' }]);
  return rows.map((r: Record<string, any>) => ({
    id: r.id, change: r.change, before: r.before, after: r.after, importId: r.import_id, importFileName: r.file_name ?? null,
    changedByName: r.changed_by_name ?? null, at: r.at.toISOString(),
  }));
}

/** Records a drop as installed (or takes it back) by hand, with the history row. */
export async function setAddressConnected(db: Db, addressId: string, projectId: string, connected: boolean, connectedOn: string | null, by: string | null, before: { connected: boolean; connectedOn: string | null; connectedSource: string | null }): Promise<void> {
  await db('addresses').where({ id: addressId, project_id: projectId }).update({ connected, connected_on: connected ? connectedOn : null, connected_source: connected ? 'hand' : null, updated_at: db.fn.now() });
  await db('address_history').insert({
    address_id: addressId, project_id: projectId, change: connected ? 'connected' : 'disconnected', changed_by: by,
    before: JSON.stringify(before), after: JSON.stringify({ connected, connectedOn: connected ? connectedOn : null, connectedSource: connected ? 'hand' : null }),
  });
}
