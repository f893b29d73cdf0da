// Row shapes of the tables, as PostgreSQL returns them (snake_case). DTOs are made at each module's boundary.
import type { Role, OrgKind } from '@/lib/auth/roles';

export interface OrganisationRow {
  id: string;
  name: string;
  kind: OrgKind;
  /** how to reach the organisation about its network; empty when not set */
  contact: string;
  created_at: Date;
}

export interface UserRow {
  id: string;
  organisation_id: string;
  email: string;
  name: string;
  role: Role;
  password_hash: string | null;
  active: boolean;
  unit_system: 'metric' | 'imperial' | null;
  created_at: Date;
  updated_at: Date;
}

export interface UserLinkRow {
  id: string;
  user_id: string;
  purpose: 'invitation' | 'reset';
  token_hash: string;
  expires_at: Date;
  used_at: Date | null;
  created_by: string | null;
  created_at: Date;
}

export interface ApiTokenRow {
  id: string;
  user_id: string;
  name: string;
  prefix: string;
  token_hash: string;
  created_at: Date;
  last_used_at: Date | null;
  revoked_at: Date | null;
}

export interface SignInAttemptRow {
  id: number;
  email: string;
  ip: string;
  succeeded: boolean;
  at: Date;
}

export type AccuracyClass = 'handheld_gnss' | 'rtk_gnss' | 'total_station' | 'digitised' | 'unknown';

export interface ProjectRow {
  id: string;
  name: string;
  owner_org_id: string;
  contractor_org_id: string;
  area_name: string;
  default_srid: number;
  extent: unknown;
  time_zone: string;
  unit_system: 'metric' | 'imperial';
  min_cover_depth_m: number;
  lateral_tolerance_m: number;
  default_accuracy_class: AccuracyClass;
  accuracy_sigmas: Partial<Record<AccuracyClass, number>>;
  trench_width_mm: number;
  trench_depth_mm: number;
  min_clearance_m: number;
  gap_threshold_m: number;
  restoration_max_delay_min: number;
  laying_temp_target_c: number;
  laying_temp_tolerance_c: number;
  compaction_passes_default: number;
  surface_thickness_mm: number;
  colour_sequence_id: string | null;
  serve_distance_m: number;
  crossing_serve_distance_m: number;
  foot_tolerance_m: number;
  created_at: Date;
  updated_at: Date;
}

export interface AuditRow {
  id: number;
  at: Date;
  actor_user_id: string | null;
  actor_label: string;
  organisation_id: string | null;
  project_id: string | null;
  object_type: string;
  object_id: string;
  action: string;
  before: unknown;
  after: unknown;
}

export type JobStatus = 'queued' | 'running' | 'completed' | 'failed';

export interface JobRow {
  id: string;
  project_id: string;
  kind: string;
  status: JobStatus;
  progress: number;
  message: string;
  input: Record<string, unknown>;
  result: Record<string, unknown> | null;
  created_by: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  queue_job_id: string | null;
  heartbeat_at: Date | null;
}

export interface ProjectOrgChangeRow {
  id: string; // bigint, as pg returns it
  project_id: string;
  side: OrgKind;
  from_org_id: string;
  to_org_id: string;
  reason: string;
  proposed_by: string | null;
  proposed_by_org_id: string;
  proposed_at: Date;
  status: 'pending' | 'confirmed' | 'declined' | 'withdrawn';
  answered_by: string | null;
  answered_at: Date | null;
  answer_note: string | null;
}

// ---- depth readings, test pits and utility crossings (issue 14) ----
export interface DepthReadingRow {
  id: string;
  project_id: string;
  route_id: string;
  chainage_m: number;
  offset_m: number;
  geom: unknown;
  cover_m: number | null;
  trench_depth_m: number | null;
  measured_at: Date | null;
  source: 'typed' | 'csv' | 'upload';
  upload_id: string | null;
  source_row: number | null;
  source_vertex: number | null;
  note: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface TestPitRow {
  id: string;
  project_id: string;
  route_id: string;
  chainage_m: number;
  offset_m: number;
  geom: unknown;
  name: string;
  dug_on: string | null;
  method: 'hand_dug' | 'vacuum' | 'other';
  depth_m: number | null;
  findings: string;
  upload_id: string | null;
  source_seq: number | null;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface UtilityCrossingRow {
  id: string;
  project_id: string;
  route_id: string;
  chainage_m: number;
  offset_m: number;
  geom: unknown;
  pit_id: string | null;
  utility_kind_id: string;
  owner: string;
  depth_m: number | null;
  clearance_m: number | null;
  method: 'gpr' | 'test_pit' | 'records' | 'other';
  found_on: string | null;
  note: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

// ---- duct bundles, their ducts and duct joints (issue 14, ducts part) ----
export interface DuctBundleRow {
  id: string;
  project_id: string;
  route_id: string;
  from_chainage_m: number;
  to_chainage_m: number;
  kind: 'planned' | 'installed';
  tracer_wire: boolean | null;
  warning_tape: boolean | null;
  protective_fill: boolean | null;
  note: string;
  planned_spec: string | null;
  colour_sequence_id: string | null;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface DuctBundleDuctRow {
  id: number;
  bundle_id: string;
  position: number;
  duct_size_id: string | null;
  outer_mm: number;
  inner_mm: number | null;
  colour_position: number | null;
  colour_name: string | null;
  colour_hex: string | null;
  colour_marking: 'stripe' | 'tracer' | null;
  purpose: 'feeder' | 'distribution' | 'drop' | 'spare' | null;
}

export interface DuctJointRow {
  id: string;
  project_id: string;
  route_id: string;
  chainage_m: number;
  offset_m: number;
  geom: unknown;
  kind: 'joint' | 'connector';
  duct_positions: number[];
  note: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

// ---- road crossings and photos (issue 14) ----
export interface RoadCrossingRow {
  id: string;
  project_id: string;
  route_id: string;
  from_chainage_m: number;
  to_chainage_m: number;
  built: boolean;
  built_on: Date | null;
  length_m: number | null;
  sawn_before_main: boolean | null;
  duct_count: number | null;
  duct_size_id: string | null;
  address_ref: string | null;
  note: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface PhotoRow {
  id: string;
  project_id: string;
  route_id: string;
  chainage_m: number;
  offset_m: number;
  geom: unknown;
  placed_by: 'exif' | 'hand' | 'chainage' | 'crossing' | 'pit';
  crossing_id: string | null;
  /** a test pit's id (no foreign key: the pits table is another migration's) */
  pit_id: string | null;
  taken_at: Date | null;
  caption: string;
  file_name: string;
  mime_type: 'image/jpeg' | 'image/png';
  size_bytes: number;
  sha256: string;
  width: number;
  height: number;
  storage_key: string;
  thumbnail_key: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

// ---- surface restoration and daily production (issue 14, restoration part) ----
export interface RestorationRow {
  id: string;
  project_id: string;
  route_id: string;
  from_chainage_m: number;
  to_chainage_m: number;
  restored_at: Date;
  backfill_material_id: string | null;
  compaction_passes: number;
  required_thickness_mm: number;
  laid_thickness_mm: number | null;
  edges_cleaned_at: Date | null;
  surface_laid_at: Date | null;
  crew: string;
  note: string;
  created_by: string | null;
  updated_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface RestorationTemperatureRow {
  id: string;
  restoration_id: string;
  measured_at: Date | null;
  temp_c: number;
}

export interface ProductionCorrectionRow {
  id: string;
  project_id: string;
  day: string;
  crew: string;
  quantity: 'sawn_m' | 'laid_m' | 'backfilled_m' | 'restored_m' | 'crossings' | 'pits';
  value: number;
  reason: string;
  created_by: string | null;
  created_at: Date;
}
