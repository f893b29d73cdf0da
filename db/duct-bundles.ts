import type { Db } from './client';
import { recordsOnSection } from './record-anchors';
import type { DuctBundleDuctRow, DuctBundleRow, DuctJointRow } from './tables';
import { colourLabel } from '@/lib/records/duct-colours';
import { bundleSummary } from '@/lib/records/duct-spec';
import type { PointAnchor } from '@/lib/records/anchor';
import type { DuctPurpose } from '@/lib/records/duct-schemas';


/** One duct of a bundle as the API and the pages see it. */
export interface Duct {
  position: number;
  ductSizeId: string | null;
  outerMm: number;
  innerMm: number | null;
  colourPosition: number | null;
  colourName: string | null;
  colourHex: string | null;
  colourMarking: 'stripe' | 'tracer' | null;
  /** "blue", "blue with stripe"; null when no colour is recorded */
  colourLabel: string | null;
  purpose: DuctPurpose | null;
}

export interface DuctBundle {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  fromChainageM: number;
  toChainageM: number;
  kind: 'planned' | 'installed';
  /** null on a planned bundle: the plan does not say */
  tracerWire: boolean | null;
  warningTape: boolean | null;
  protectiveFill: boolean | null;
  note: string;
  plannedSpec: string | null;
  colourSequenceId: string | null;
  ducts: Duct[];
  /** "12 × 7/4 mm" */
  summary: string;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

export type DuctValues = Omit<Duct, 'colourLabel'>;

export interface DuctBundleValues {
  routeId: string;
  fromChainageM: number;
  toChainageM: number;
  kind: 'planned' | 'installed';
  tracerWire: boolean | null;
  warningTape: boolean | null;
  protectiveFill: boolean | null;
  note: string;
  plannedSpec: string | null;
  colourSequenceId: string | null;
  ducts: DuctValues[];
}

export interface DuctJoint {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  chainageM: number;
  offsetM: number;
  lon: number;
  lat: number;
  kind: 'joint' | 'connector';
  ductPositions: number[];
  note: string;
  createdByName: string | null;
  createdAt: string;
}

type BundleJoined = DuctBundleRow & { route_ref: string; removed_in_version: number | null; created_by_name: string | null };

const bundleColumns = ['rec.*', 'r.ref as route_ref', 'r.removed_in_version', 'u.name as created_by_name'];

export const toDuct = (d: DuctBundleDuctRow): Duct => ({
  position: d.position,
  ductSizeId: d.duct_size_id,
  outerMm: d.outer_mm,
  innerMm: d.inner_mm,
  colourPosition: d.colour_position,
  colourName: d.colour_name,
  colourHex: d.colour_hex,
  colourMarking: d.colour_marking,
  colourLabel: d.colour_name === null ? null : colourLabel(d.colour_name, d.colour_marking),
  purpose: d.purpose,
});

async function withDucts(db: Db, rows: BundleJoined[]): Promise<DuctBundle[]> {
  if (rows.length === 0) return [];
  const ducts: DuctBundleDuctRow[] = await db('duct_bundle_ducts').whereIn('bundle_id', rows.map((r) => r.id)).orderBy(['bundle_id', 'position']);
  const by = new Map<string, Duct[]>();
  for (const d of ducts) {
    const list = by.get(d.bundle_id) ?? [];
    list.push(toDuct(d));
    by.set(d.bundle_id, list);
  }
  return rows.map((r) => {
    const ds = by.get(r.id) ?? [];
    return {
      id: r.id,
      projectId: r.project_id,
      routeId: r.route_id,
      routeRef: r.route_ref,
      routeRemoved: r.removed_in_version !== null,
      fromChainageM: r.from_chainage_m,
      toChainageM: r.to_chainage_m,
      kind: r.kind,
      tracerWire: r.tracer_wire,
      warningTape: r.warning_tape,
      protectiveFill: r.protective_fill,
      note: r.note,
      plannedSpec: r.planned_spec,
      colourSequenceId: r.colour_sequence_id,
      ducts: ds,
      summary: bundleSummary(ds),
      createdByName: r.created_by_name ?? null,
      createdAt: r.created_at.toISOString(),
      updatedAt: r.updated_at.toISOString(),
    };
  });
}

const bundles = (db: Db) => db('duct_bundles as rec').join('planned_routes as r', 'r.id', 'rec.route_id').leftJoin('users as u', 'u.id', 'rec.created_by');

export async function getDuctBundle(db: Db, id: string): Promise<DuctBundle | undefined> {
  const rows = await bundles(db).where('rec.id', id).select(bundleColumns);
  return (await withDucts(db, rows))[0];
}

/** The project's bundles by route and chainage, planned before installed at the same chainage. */
export async function listDuctBundles(db: Db, projectId: string, filter: { routeId?: string; kind?: 'planned' | 'installed' } = {}): Promise<DuctBundle[]> {
  const q = bundles(db).where('rec.project_id', projectId);
  if (filter.routeId) q.andWhere('rec.route_id', filter.routeId);
  if (filter.kind) q.andWhere('rec.kind', filter.kind);
  const rows = await q.orderBy([{ column: 'r.ref' }, { column: 'rec.from_chainage_m' }, { column: 'rec.kind', order: 'desc' }]).select(bundleColumns);
  return withDucts(db, rows);
}

/** The bundles (planned and installed) on a section's stretch, by chainage: for the section page. */
export async function listDuctBundlesOnSection(db: Db, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<DuctBundle[]> {
  const rows = await recordsOnSection(db, 'duct_bundles', section, 'stretch')
    .leftJoin('users as u', 'u.id', 'rec.created_by')
    .orderBy([{ column: 'rec.from_chainage_m' }, { column: 'rec.kind', order: 'desc' }])
    .select(bundleColumns);
  return withDucts(db, rows);
}

const bundleRow = (v: DuctBundleValues) => ({
  route_id: v.routeId,
  from_chainage_m: v.fromChainageM,
  to_chainage_m: v.toChainageM,
  kind: v.kind,
  tracer_wire: v.tracerWire,
  warning_tape: v.warningTape,
  protective_fill: v.protectiveFill,
  note: v.note,
  planned_spec: v.plannedSpec,
  colour_sequence_id: v.colourSequenceId,
});

async function insertDucts(db: Db, bundleId: string, ducts: DuctValues[]): Promise<void> {
  if (ducts.length === 0) return;
  await db('duct_bundle_ducts').insert(
    ducts.map((d) => ({
      bundle_id: bundleId,
      position: d.position,
      duct_size_id: d.ductSizeId,
      outer_mm: d.outerMm,
      inner_mm: d.innerMm,
      colour_position: d.colourPosition,
      colour_name: d.colourName,
      colour_hex: d.colourHex,
      colour_marking: d.colourMarking,
      purpose: d.purpose,
    })),
  );
}

export async function insertDuctBundle(db: Db, projectId: string, userId: string | null, v: DuctBundleValues): Promise<string> {
  const [{ id }] = await db('duct_bundles').insert({ ...bundleRow(v), project_id: projectId, created_by: userId, updated_by: userId }).returning('id');
  await insertDucts(db, id, v.ducts);
  return id;
}

/** Replaces the bundle's values and its ducts. */
export async function updateDuctBundle(db: Db, id: string, userId: string, v: DuctBundleValues): Promise<void> {
  await db('duct_bundles').where({ id }).update({ ...bundleRow(v), updated_by: userId, updated_at: db.fn.now() });
  await db('duct_bundle_ducts').where({ bundle_id: id }).delete();
  await insertDucts(db, id, v.ducts);
}

export async function deleteDuctBundle(db: Db, id: string): Promise<number> {
  return db('duct_bundles').where({ id }).delete();
}

/** Removes the planned bundles of the given routes (the ducts go with them). */
export async function deletePlannedBundles(db: Db, projectId: string, routeIds: string[]): Promise<number> {
  if (routeIds.length === 0) return 0;
  return db('duct_bundles').where({ project_id: projectId, kind: 'planned' }).whereIn('route_id', routeIds).delete();
}

/** Route and stretch of every installed bundle of the project, by route and chainage. */
export async function installedStretchRows(db: Db, projectId: string): Promise<{ routeId: string; routeRef: string; from: number; to: number }[]> {
  const rows = await db('duct_bundles as rec')
    .join('planned_routes as r', 'r.id', 'rec.route_id')
    .where({ 'rec.project_id': projectId, 'rec.kind': 'installed' })
    .orderBy([{ column: 'r.ref' }, { column: 'rec.from_chainage_m' }])
    .select('rec.route_id', 'r.ref', 'rec.from_chainage_m', 'rec.to_chainage_m');
  return rows.map((r) => ({ routeId: r.route_id, routeRef: r.ref, from: r.from_chainage_m, to: r.to_chainage_m }));
}

// ---- joints and connectors ----

type JointJoined = DuctJointRow & { route_ref: string; removed_in_version: number | null; created_by_name: string | null; lon: number; lat: number };

const jointColumns = (db: Db) => ['rec.*', 'r.ref as route_ref', 'r.removed_in_version', 'u.name as created_by_name', db.raw('ST_X(rec.geom) as lon'), db.raw('ST_Y(rec.geom) as lat')];

const toJoint = (r: JointJoined): DuctJoint => ({
  id: r.id,
  projectId: r.project_id,
  routeId: r.route_id,
  routeRef: r.route_ref,
  routeRemoved: r.removed_in_version !== null,
  chainageM: r.chainage_m,
  offsetM: r.offset_m,
  lon: r.lon,
  lat: r.lat,
  kind: r.kind,
  ductPositions: r.duct_positions,
  note: r.note,
  createdByName: r.created_by_name ?? null,
  createdAt: r.created_at.toISOString(),
});

const joints = (db: Db) => db('duct_joints as rec').join('planned_routes as r', 'r.id', 'rec.route_id').leftJoin('users as u', 'u.id', 'rec.created_by');

export async function getDuctJoint(db: Db, id: string): Promise<DuctJoint | undefined> {
  const row = await joints(db).where('rec.id', id).first(jointColumns(db));
  return row && toJoint(row);
}

export async function listDuctJoints(db: Db, projectId: string, routeId?: string): Promise<DuctJoint[]> {
  const q = joints(db).where('rec.project_id', projectId);
  if (routeId) q.andWhere('rec.route_id', routeId);
  const rows = await q.orderBy([{ column: 'r.ref' }, { column: 'rec.chainage_m' }]).select(jointColumns(db));
  return rows.map(toJoint);
}

export async function insertDuctJoint(db: Db, projectId: string, userId: string | null, v: { anchor: PointAnchor; kind: 'joint' | 'connector'; ductPositions: number[]; note: string }): Promise<string> {
  const [{ id }] = await db('duct_joints')
    .insert({
      project_id: projectId,
      route_id: v.anchor.routeId,
      chainage_m: v.anchor.chainageM,
      offset_m: v.anchor.offsetM,
      geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [v.anchor.position[0], v.anchor.position[1]]),
      kind: v.kind,
      duct_positions: v.ductPositions,
      note: v.note,
      created_by: userId,
      updated_by: userId,
    })
    .returning('id');
  return id;
}

export async function deleteDuctJoint(db: Db, id: string): Promise<number> {
  return db('duct_joints').where({ id }).delete();
}
