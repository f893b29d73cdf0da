import type { Db } from './client';
import { recordsOnSection } from './record-anchors';
import type { PointAnchor } from '@/lib/records/anchor';

export type PitMethod = 'hand_dug' | 'vacuum' | 'other';
export type CrossingMethod = 'gpr' | 'test_pit' | 'records' | 'other';

interface PointRecord {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  chainageM: number;
  offsetM: number;
  lon: number;
  lat: number;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

/** A hand-dug (or vacuum-excavated) pit that confirms what lies in the ground before sawing. */
export interface TestPit extends PointRecord {
  name: string;
  dugOn: string | null;
  method: PitMethod;
  depthM: number | null;
  findings: string;
  uploadId: string | null;
  sourceSeq: number | null;
  crossingCount: number;
}

/** An existing utility found by radar, in a pit or from records, where our trench crosses or runs by it. */
export interface UtilityCrossing extends PointRecord {
  pitId: string | null;
  pitName: string | null;
  utilityKindId: string;
  utilityKey: string;
  utilityLabel: string;
  owner: string;
  depthM: number | null;
  clearanceM: number | null;
  method: CrossingMethod;
  foundOn: string | null;
  note: string;
}

type Section = { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number };

const pointColumns = (db: Db) => [
  'rec.id', 'rec.project_id', 'rec.route_id', 'r.ref as route_ref', 'r.removed_in_version', 'rec.chainage_m', 'rec.offset_m',
  db.raw('ST_X(rec.geom) as lon'), db.raw('ST_Y(rec.geom) as lat'), 'cu.name as created_by_name', 'rec.created_at', 'rec.updated_at',
];
const pointDto = (r: Record<string, any>): PointRecord => ({
  id: r.id, projectId: r.project_id, routeId: r.route_id, routeRef: r.route_ref, routeRemoved: r.removed_in_version !== null, chainageM: r.chainage_m,
  offsetM: r.offset_m, lon: r.lon, lat: r.lat, createdByName: r.created_by_name ?? null, createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
});
const anchorColumns = (db: Db, a: PointAnchor) => ({
  route_id: a.routeId, chainage_m: a.chainageM, offset_m: a.offsetM, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [a.position[0], a.position[1]]),
});

// ---- test pits ----

const pitColumns = (db: Db) => [
  ...pointColumns(db), 'rec.name', db.raw("to_char(rec.dug_on, 'YYYY-MM-DD') as dug_on"), 'rec.method', 'rec.depth_m', 'rec.findings', 'rec.upload_id', 'rec.source_seq',
  db.raw('(SELECT count(*)::int FROM utility_crossings c WHERE c.pit_id = rec.id) as crossing_count'),
];
const pitDto = (r: Record<string, any>): TestPit => ({
  ...pointDto(r), name: r.name, dugOn: r.dug_on, method: r.method, depthM: r.depth_m, findings: r.findings, uploadId: r.upload_id, sourceSeq: r.source_seq, crossingCount: r.crossing_count,
});
const pitBase = (db: Db) => db('test_pits as rec').join('planned_routes as r', 'r.id', 'rec.route_id').leftJoin('users as cu', 'cu.id', 'rec.created_by');

export interface TestPitValues {
  anchor: PointAnchor;
  name: string;
  dugOn: string | null;
  method: PitMethod;
  depthM: number | null;
  findings: string;
  uploadId?: string | null;
  sourceSeq?: number | null;
}

const pitRow = (db: Db, v: TestPitValues) => ({ ...anchorColumns(db, v.anchor), name: v.name, dug_on: v.dugOn, method: v.method, depth_m: v.depthM, findings: v.findings });

export async function getTestPit(db: Db, id: string): Promise<TestPit | undefined> {
  const row = await pitBase(db).where('rec.id', id).first(pitColumns(db));
  return row && pitDto(row);
}

export async function listTestPits(db: Db, projectId: string): Promise<TestPit[]> {
  const rows = await pitBase(db).where('rec.project_id', projectId).orderBy([{ column: 'r.ref' }, { column: 'rec.chainage_m' }]).select(pitColumns(db));
  return rows.map(pitDto);
}

export async function listTestPitsOnSection(db: Db, section: Section): Promise<TestPit[]> {
  const rows = await recordsOnSection(db, 'test_pits', section, 'point').leftJoin('users as cu', 'cu.id', 'rec.created_by').orderBy('rec.chainage_m').select(pitColumns(db));
  return rows.map(pitDto);
}

export async function insertTestPits(db: Db, projectId: string, userId: string, values: TestPitValues[]): Promise<string[]> {
  if (values.length === 0) return [];
  const rows = values.map((v) => ({ ...pitRow(db, v), project_id: projectId, upload_id: v.uploadId ?? null, source_seq: v.sourceSeq ?? null, created_by: userId, updated_by: userId }));
  const out = await db('test_pits').insert(rows).returning('id');
  return out.map((r: { id: string }) => r.id);
}

export async function updateTestPit(db: Db, id: string, userId: string, v: TestPitValues): Promise<void> {
  await db('test_pits').where({ id }).update({ ...pitRow(db, v), updated_by: userId, updated_at: db.fn.now() });
}

export async function deleteTestPit(db: Db, id: string): Promise<number> {
  return db('test_pits').where({ id }).delete();
}

export async function countPitsFromUpload(db: Db, uploadId: string): Promise<number> {
  const [{ n }] = await db('test_pits').where({ upload_id: uploadId }).count<{ n: string }[]>('* as n');
  return Number(n);
}

// ---- utility crossings ----

const crossingColumns = (db: Db) => [
  ...pointColumns(db), 'rec.pit_id', 'p.name as pit_name', 'rec.utility_kind_id', 'k.key as utility_key', 'k.label as utility_label', 'rec.owner', 'rec.depth_m',
  'rec.clearance_m', 'rec.method', db.raw("to_char(rec.found_on, 'YYYY-MM-DD') as found_on"), 'rec.note',
];
const crossingDto = (r: Record<string, any>): UtilityCrossing => ({
  ...pointDto(r), pitId: r.pit_id, pitName: r.pit_name ?? null, utilityKindId: r.utility_kind_id, utilityKey: r.utility_key, utilityLabel: r.utility_label, owner: r.owner,
  depthM: r.depth_m, clearanceM: r.clearance_m, method: r.method, foundOn: r.found_on, note: r.note,
});
const crossingJoins = <Q extends ReturnType<Db>>(q: Q) =>
  q.join('utility_kinds as k', 'k.id', 'rec.utility_kind_id').leftJoin('test_pits as p', 'p.id', 'rec.pit_id').leftJoin('users as cu', 'cu.id', 'rec.created_by');
const crossingBase = (db: Db) => crossingJoins(db('utility_crossings as rec').join('planned_routes as r', 'r.id', 'rec.route_id'));

export interface UtilityCrossingValues {
  anchor: PointAnchor;
  pitId: string | null;
  utilityKindId: string;
  owner: string;
  depthM: number | null;
  clearanceM: number | null;
  method: CrossingMethod;
  foundOn: string | null;
  note: string;
}

const crossingRow = (db: Db, v: UtilityCrossingValues) => ({
  ...anchorColumns(db, v.anchor), pit_id: v.pitId, utility_kind_id: v.utilityKindId, owner: v.owner, depth_m: v.depthM, clearance_m: v.clearanceM, method: v.method, found_on: v.foundOn, note: v.note,
});

export async function getUtilityCrossing(db: Db, id: string): Promise<UtilityCrossing | undefined> {
  const row = await crossingBase(db).where('rec.id', id).first(crossingColumns(db));
  return row && crossingDto(row);
}

export async function listUtilityCrossings(db: Db, projectId: string): Promise<UtilityCrossing[]> {
  const rows = await crossingBase(db).where('rec.project_id', projectId).orderBy([{ column: 'r.ref' }, { column: 'rec.chainage_m' }]).select(crossingColumns(db));
  return rows.map(crossingDto);
}

export async function listUtilityCrossingsOnSection(db: Db, section: Section): Promise<UtilityCrossing[]> {
  const rows = await crossingJoins(recordsOnSection(db, 'utility_crossings', section, 'point')).orderBy('rec.chainage_m').select(crossingColumns(db));
  return rows.map(crossingDto);
}

export async function insertUtilityCrossing(db: Db, projectId: string, userId: string, v: UtilityCrossingValues): Promise<string> {
  const [{ id }] = await db('utility_crossings').insert({ ...crossingRow(db, v), project_id: projectId, created_by: userId, updated_by: userId }).returning('id');
  return id;
}

export async function updateUtilityCrossing(db: Db, id: string, userId: string, v: UtilityCrossingValues): Promise<void> {
  await db('utility_crossings').where({ id }).update({ ...crossingRow(db, v), updated_by: userId, updated_at: db.fn.now() });
}

export async function deleteUtilityCrossing(db: Db, id: string): Promise<number> {
  return db('utility_crossings').where({ id }).delete();
}
