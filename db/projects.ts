import type { Db } from './client';
import type { AccuracyClass, ProjectRow } from './tables';

export interface Project {
  id: string;
  name: string;
  ownerOrgId: string;
  ownerOrgName: string;
  contractorOrgId: string;
  contractorOrgName: string;
  areaName: string;
  defaultCrs: string;
  /** [west, south, east, north] in degrees (RFC 7946 bbox order), or null */
  extent: [number, number, number, number] | null;
  timeZone: string;
  unitSystem: 'metric' | 'imperial';
  minCoverDepthM: number;
  lateralToleranceM: number;
  defaultAccuracyClass: AccuracyClass;
  /** σ per axis (m) overriding the defaults of some accuracy classes for this project */
  accuracySigmas: Partial<Record<AccuracyClass, number>>;
  /** the settings the trench records are checked against */
  records: RecordSettings;
  /** how addresses are tied to routes and counted as passed */
  households: HouseholdSettings;
  createdAt: string;
  updatedAt: string;
}

/** What the trench records of a project are checked against (project settings, not constants). */
export interface RecordSettings {
  trenchWidthMm: number;
  trenchDepthMm: number;
  minClearanceM: number;
  gapThresholdM: number;
  restorationMaxDelayMin: number;
  layingTempTargetC: number;
  layingTempToleranceC: number;
  compactionPassesDefault: number;
  surfaceThicknessMm: number;
  /** the project's duct colour sequence (colour_sequences.id), or null */
  colourSequenceId: string | null;
}

/** How addresses are tied to their serving route and counted as passed (project settings, not constants). */
export interface HouseholdSettings {
  /** how far from its serving street route an address may lie (m) */
  serveDistanceM: number;
  /** how far a built road crossing's route-side end may lie from an address's foot point to serve it (m) */
  crossingServeDistanceM: number;
  /** how far short of an address's foot point a built stretch may stop and still pass it (m) */
  footToleranceM: number;
}

export interface ProjectValues {
  name: string;
  ownerOrgId: string;
  contractorOrgId: string;
  areaName: string;
  defaultSrid: number;
  extent: [number, number, number, number] | null;
  timeZone: string;
  unitSystem: 'metric' | 'imperial';
  minCoverDepthM: number;
  lateralToleranceM: number;
  defaultAccuracyClass: AccuracyClass;
  accuracySigmas?: Partial<Record<AccuracyClass, number>>;
  records?: Partial<RecordSettings>;
  households?: Partial<HouseholdSettings>;
}

type JoinedRow = ProjectRow & {
  owner_org_name: string;
  contractor_org_name: string;
  xmin: number | null;
  ymin: number | null;
  xmax: number | null;
  ymax: number | null;
};

const toDto = (r: JoinedRow): Project => ({
  id: r.id,
  name: r.name,
  ownerOrgId: r.owner_org_id,
  ownerOrgName: r.owner_org_name,
  contractorOrgId: r.contractor_org_id,
  contractorOrgName: r.contractor_org_name,
  areaName: r.area_name,
  defaultCrs: `EPSG:${r.default_srid}`,
  extent: r.xmin === null ? null : [r.xmin, r.ymin!, r.xmax!, r.ymax!],
  timeZone: r.time_zone,
  unitSystem: r.unit_system,
  minCoverDepthM: r.min_cover_depth_m,
  lateralToleranceM: r.lateral_tolerance_m,
  defaultAccuracyClass: r.default_accuracy_class,
  accuracySigmas: r.accuracy_sigmas ?? {},
  records: {
    trenchWidthMm: r.trench_width_mm,
    trenchDepthMm: r.trench_depth_mm,
    minClearanceM: r.min_clearance_m,
    gapThresholdM: r.gap_threshold_m,
    restorationMaxDelayMin: r.restoration_max_delay_min,
    layingTempTargetC: r.laying_temp_target_c,
    layingTempToleranceC: r.laying_temp_tolerance_c,
    compactionPassesDefault: r.compaction_passes_default,
    surfaceThicknessMm: r.surface_thickness_mm,
    colourSequenceId: r.colour_sequence_id,
  },
  households: {
    serveDistanceM: r.serve_distance_m,
    crossingServeDistanceM: r.crossing_serve_distance_m,
    footToleranceM: r.foot_tolerance_m,
  },
  createdAt: r.created_at.toISOString(),
  updatedAt: r.updated_at.toISOString(),
});

function baseQuery(db: Db) {
  return db('projects as p')
    .join('organisations as o', 'o.id', 'p.owner_org_id')
    .join('organisations as c', 'c.id', 'p.contractor_org_id')
    .select(
      'p.*',
      'o.name as owner_org_name',
      'c.name as contractor_org_name',
      db.raw('ST_XMin(p.extent) as xmin, ST_YMin(p.extent) as ymin, ST_XMax(p.extent) as xmax, ST_YMax(p.extent) as ymax'),
    );
}

export async function getProject(db: Db, id: string): Promise<Project | undefined> {
  const row = await baseQuery(db).where('p.id', id).first();
  return row && toDto(row as JoinedRow);
}

/** Projects whose owner or contractor organisation is the given one, newest first. */
export async function listProjectsForOrganisation(db: Db, organisationId: string): Promise<Project[]> {
  const rows = await baseQuery(db)
    .where((q) => q.where('p.owner_org_id', organisationId).orWhere('p.contractor_org_id', organisationId))
    .orderBy('p.created_at', 'desc');
  return (rows as JoinedRow[]).map(toDto);
}

/** The projects an organisation owns or builds, with only their names: the lookup's list on every request. */
export async function listVisibleProjectNames(db: Db, organisationId: string): Promise<{ id: string; name: string; ownerOrgName: string }[]> {
  const rows = await db('projects as p')
    .join('organisations as o', 'o.id', 'p.owner_org_id')
    .where((q) => q.where('p.owner_org_id', organisationId).orWhere('p.contractor_org_id', organisationId))
    .orderBy('p.created_at', 'desc')
    .select('p.id', 'p.name', 'o.name as owner_org_name');
  return rows.map((r: { id: string; name: string; owner_org_name: string }) => ({ id: r.id, name: r.name, ownerOrgName: r.owner_org_name }));
}

function toColumns(db: Db, v: Partial<ProjectValues>): Record<string, unknown> {
  const c: Record<string, unknown> = {};
  if (v.name !== undefined) c.name = v.name.trim();
  if (v.ownerOrgId !== undefined) c.owner_org_id = v.ownerOrgId;
  if (v.contractorOrgId !== undefined) c.contractor_org_id = v.contractorOrgId;
  if (v.areaName !== undefined) c.area_name = v.areaName.trim();
  if (v.defaultSrid !== undefined) c.default_srid = v.defaultSrid;
  if (v.extent !== undefined)
    c.extent = v.extent === null ? null : db.raw('ST_MakeEnvelope(?, ?, ?, ?, 4326)', v.extent);
  if (v.timeZone !== undefined) c.time_zone = v.timeZone;
  if (v.unitSystem !== undefined) c.unit_system = v.unitSystem;
  if (v.minCoverDepthM !== undefined) c.min_cover_depth_m = v.minCoverDepthM;
  if (v.lateralToleranceM !== undefined) c.lateral_tolerance_m = v.lateralToleranceM;
  if (v.defaultAccuracyClass !== undefined) c.default_accuracy_class = v.defaultAccuracyClass;
  if (v.accuracySigmas !== undefined) c.accuracy_sigmas = JSON.stringify(v.accuracySigmas);
  const r = v.records ?? {};
  const recordColumns: [keyof RecordSettings, string][] = [
    ['trenchWidthMm', 'trench_width_mm'], ['trenchDepthMm', 'trench_depth_mm'], ['minClearanceM', 'min_clearance_m'],
    ['gapThresholdM', 'gap_threshold_m'], ['restorationMaxDelayMin', 'restoration_max_delay_min'], ['layingTempTargetC', 'laying_temp_target_c'],
    ['layingTempToleranceC', 'laying_temp_tolerance_c'], ['compactionPassesDefault', 'compaction_passes_default'], ['surfaceThicknessMm', 'surface_thickness_mm'],
    ['colourSequenceId', 'colour_sequence_id'],
  ];
  for (const [k, col] of recordColumns) if (r[k] !== undefined) c[col] = r[k];
  const h = v.households ?? {};
  if (h.serveDistanceM !== undefined) c.serve_distance_m = h.serveDistanceM;
  if (h.crossingServeDistanceM !== undefined) c.crossing_serve_distance_m = h.crossingServeDistanceM;
  if (h.footToleranceM !== undefined) c.foot_tolerance_m = h.footToleranceM;
  return c;
}

export async function insertProject(db: Db, v: ProjectValues): Promise<Project> {
  const [{ id }] = await db('projects').insert(toColumns(db, v)).returning('id');
  return (await getProject(db, id))!;
}

export async function updateProject(db: Db, id: string, v: Partial<ProjectValues>): Promise<Project> {
  await db('projects')
    .where({ id })
    .update({ ...toColumns(db, v), updated_at: db.fn.now() });
  return (await getProject(db, id))!;
}

/** Whether the EPSG code exists in PostGIS's spatial_ref_sys catalogue. */
export async function sridExists(db: Db, srid: number): Promise<boolean> {
  const row = await db('spatial_ref_sys').where({ srid, auth_name: 'EPSG' }).first('srid');
  return row !== undefined;
}
