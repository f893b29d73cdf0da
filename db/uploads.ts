import type { Db } from './client';
import type { AccuracyClass } from '@/lib/records/accuracy-classes';
import type { ParsedFeature } from '@/lib/ingest/types';

export type UploadStatus = 'stored' | 'failed' | 'withdrawn' | 'superseded';
export type UploadContent = 'trench' | 'road_crossings' | 'test_pits' | 'depth_shots' | 'mixed';

export interface UploadRow {
  id: string;
  project_id: string;
  sha256: string;
  size_bytes: number;
  file_name: string;
  format: string | null;
  crs: string | null;
  status: UploadStatus;
  error_code: string | null;
  error_message: string | null;
  error_details: unknown;
  warnings: string[];
  accuracy_class: AccuracyClass;
  sigma_m: number;
  survey_date: string | null;
  crew: string;
  content: UploadContent;
  columns: unknown;
  feature_count: number;
  point_count: number;
  superseded_by: string | null;
  uploaded_by: string | null;
  created_at: Date;
  updated_at: Date;
}

export interface Upload {
  id: string;
  projectId: string;
  fileName: string;
  sha256: string;
  sizeBytes: number;
  format: string | null;
  crs: string | null;
  status: UploadStatus;
  error: { code: string; message: string; details?: unknown } | null;
  warnings: string[];
  accuracyClass: AccuracyClass;
  sigmaM: number;
  surveyDate: string | null;
  crew: string;
  content: UploadContent;
  columns: unknown;
  featureCount: number;
  pointCount: number;
  supersededBy: string | null;
  uploadedBy: string | null;
  uploadedByName: string | null;
  createdAt: string;
}

const toDto = (r: UploadRow & { uploader_name?: string | null }): Upload => ({
  id: r.id,
  projectId: r.project_id,
  fileName: r.file_name,
  sha256: r.sha256,
  sizeBytes: r.size_bytes,
  format: r.format,
  crs: r.crs,
  status: r.status,
  error: r.error_code ? { code: r.error_code, message: r.error_message ?? '', ...(r.error_details ? { details: r.error_details } : {}) } : null,
  warnings: r.warnings,
  accuracyClass: r.accuracy_class,
  sigmaM: r.sigma_m,
  surveyDate: r.survey_date,
  crew: r.crew,
  content: r.content,
  columns: r.columns,
  featureCount: r.feature_count,
  pointCount: r.point_count,
  supersededBy: r.superseded_by,
  uploadedBy: r.uploaded_by,
  uploadedByName: r.uploader_name ?? null,
  createdAt: r.created_at.toISOString(),
});

const base = (db: Db) =>
  db('uploads as u')
    .leftJoin('users as p', 'p.id', 'u.uploaded_by')
    .select('u.id', 'u.project_id', 'u.sha256', 'u.size_bytes', 'u.file_name', 'u.format', 'u.crs', 'u.status', 'u.error_code', 'u.error_message', 'u.error_details', 'u.warnings', 'u.accuracy_class', 'u.sigma_m', db.raw("to_char(u.survey_date, 'YYYY-MM-DD') as survey_date"), 'u.crew', 'u.content', 'u.columns', 'u.feature_count', 'u.point_count', 'u.superseded_by', 'u.uploaded_by', 'u.created_at', 'u.updated_at', 'p.name as uploader_name');

export async function getUpload(db: Db, id: string): Promise<Upload | undefined> {
  const row = await base(db).where('u.id', id).first();
  return row && toDto(row);
}

export async function findUploadBySha(db: Db, projectId: string, sha256: string): Promise<Upload | undefined> {
  const row = await base(db).where({ 'u.project_id': projectId, 'u.sha256': sha256 }).first();
  return row && toDto(row);
}

export async function listUploads(db: Db, projectId: string): Promise<Upload[]> {
  const rows = await base(db).where('u.project_id', projectId).orderBy('u.created_at', 'desc');
  return rows.map(toDto);
}

export interface UploadValues {
  id: string;
  projectId: string;
  sha256: string;
  sizeBytes: number;
  fileName: string;
  accuracyClass: AccuracyClass;
  sigmaM: number;
  surveyDate: string | null;
  crew: string;
  content: UploadContent;
  uploadedBy: string;
}

export interface UploadOutcome {
  format: string | null;
  crs: string | null;
  status: 'stored' | 'failed';
  error: { code: string; message: string; details?: unknown } | null;
  warnings: string[];
  columns: unknown;
  featureCount: number;
  pointCount: number;
}

const outcomeColumns = (o: UploadOutcome) => ({
  format: o.format,
  crs: o.crs,
  status: o.status,
  error_code: o.error?.code ?? null,
  error_message: o.error?.message ?? null,
  error_details: o.error?.details === undefined ? null : JSON.stringify(o.error.details),
  warnings: JSON.stringify(o.warnings),
  columns: o.columns === undefined || o.columns === null ? null : JSON.stringify(o.columns),
  feature_count: o.featureCount,
  point_count: o.pointCount,
});

/**
 * Inserts the upload unless the project already has these bytes; returns false when another request won
 * (the unique index on project + SHA-256 makes concurrent identical sends wait for the first to commit).
 */
export async function insertUploadOnce(db: Db, v: UploadValues, o: UploadOutcome): Promise<boolean> {
  const rows = await db('uploads')
    .insert({
      id: v.id,
      project_id: v.projectId,
      sha256: v.sha256,
      size_bytes: v.sizeBytes,
      file_name: v.fileName,
      accuracy_class: v.accuracyClass,
      sigma_m: v.sigmaM,
      survey_date: v.surveyDate,
      crew: v.crew,
      content: v.content,
      uploaded_by: v.uploadedBy,
      ...outcomeColumns(o),
    })
    .onConflict(['project_id', 'sha256'])
    .ignore()
    .returning('id');
  return rows.length === 1;
}

export async function updateUploadOutcome(
  db: Db,
  id: string,
  settings: Partial<Pick<UploadValues, 'accuracyClass' | 'sigmaM' | 'surveyDate' | 'crew' | 'content'>>,
  o: UploadOutcome,
): Promise<void> {
  const s: Record<string, unknown> = {};
  if (settings.accuracyClass !== undefined) s.accuracy_class = settings.accuracyClass;
  if (settings.sigmaM !== undefined) s.sigma_m = settings.sigmaM;
  if (settings.surveyDate !== undefined) s.survey_date = settings.surveyDate;
  if (settings.crew !== undefined) s.crew = settings.crew;
  if (settings.content !== undefined) s.content = settings.content;
  await db('uploads').where({ id }).update({ ...s, ...outcomeColumns(o), updated_at: db.fn.now() });
}

export async function setUploadStatus(db: Db, id: string, status: UploadStatus, supersededBy?: string): Promise<void> {
  await db('uploads').where({ id }).update({ status, superseded_by: supersededBy ?? null, updated_at: db.fn.now() });
}

export interface UploadFile {
  fileName: string;
  storageKey: string;
  sha256: string;
  sizeBytes: number;
}

export async function insertUploadFiles(db: Db, uploadId: string, files: UploadFile[]): Promise<void> {
  await db('upload_files').insert(
    files.map((f) => ({ upload_id: uploadId, file_name: f.fileName, storage_key: f.storageKey, sha256: f.sha256, size_bytes: f.sizeBytes })),
  );
}

export async function listUploadFiles(db: Db, uploadId: string): Promise<UploadFile[]> {
  const rows = await db('upload_files').where({ upload_id: uploadId }).orderBy('id');
  return rows.map((r) => ({ fileName: r.file_name, storageKey: r.storage_key, sha256: r.sha256, sizeBytes: r.size_bytes }));
}

const BATCH = 500;

/** 2D WKB (OGC Simple Features, little-endian) of a line or point: PostGIS reads it far faster than GeoJSON. */
function toWkb(f: ParsedFeature): Buffer {
  const coords = f.kind === 'line' ? f.coords : [f.coord];
  const head = f.kind === 'line' ? 9 : 5;
  const buf = Buffer.allocUnsafe(head + 16 * coords.length);
  buf.writeUInt8(1, 0);
  buf.writeUInt32LE(f.kind === 'line' ? 2 : 1, 1);
  if (f.kind === 'line') buf.writeUInt32LE(coords.length, 5);
  for (let i = 0; i < coords.length; i++) {
    buf.writeDoubleLE(coords[i][0], head + 16 * i);
    buf.writeDoubleLE(coords[i][1], head + 16 * i + 8);
  }
  return buf;
}

// PostgreSQL array literals built directly: ISO times and numbers need no quoting, and this is several
// times faster than the driver's generic array serialisation for 100,000-element arrays
const arrayLiteral = (xs: (string | number | null)[]) => `{${xs.map((x) => (x === null ? 'NULL' : x)).join(',')}}`;

function heightsOf(f: ParsedFeature): string | null {
  const coords = f.kind === 'line' ? f.coords : [f.coord];
  return coords.some((c) => c.length === 3) ? arrayLiteral(coords.map((c) => (c.length === 3 ? c[2] : null))) : null;
}

function timesOf(f: ParsedFeature): string | null {
  if (f.kind === 'point') return f.time ? arrayLiteral([f.time]) : null;
  return f.times && f.times.some((t) => t !== null) ? arrayLiteral(f.times) : null;
}

/** Stores parsed features in bulk: one row per line (with per-point times and attributes as arrays) or point. */
export async function insertUploadFeatures(db: Db, uploadId: string, projectId: string, features: ParsedFeature[]): Promise<void> {
  await db('upload_features').where({ upload_id: uploadId }).delete();
  for (let i = 0; i < features.length; i += BATCH) {
    const rows = features.slice(i, i + BATCH).map((f, j) => {
      return {
        upload_id: uploadId,
        project_id: projectId,
        seq: i + j,
        kind: f.kind,
        name: f.name,
        geom: db.raw('ST_SetSRID(ST_GeomFromWKB(?), 4326)', [toWkb(f)]),
        point_count: f.kind === 'line' ? f.coords.length : 1,
        heights: heightsOf(f),
        times: timesOf(f),
        point_attributes: f.kind === 'line' && f.pointAttributes ? JSON.stringify(f.pointAttributes) : null,
        attributes: JSON.stringify(f.attributes ?? {}),
      };
    });
    await db('upload_features').insert(rows);
  }
}

export async function deleteUploadFeatures(db: Db, uploadId: string): Promise<void> {
  await db('upload_features').where({ upload_id: uploadId }).delete();
}

/** The upload's geometry as an RFC 7946 FeatureCollection (coordinates at 7 decimals, about 1 cm). */
export async function uploadFeatureCollection(db: Db, uploadId: string) {
  const rows = await db('upload_features')
    .where({ upload_id: uploadId })
    .orderBy('seq')
    .select('id', 'seq', 'kind', 'name', 'point_count', 'attributes', db.raw('ST_AsGeoJSON(geom, 7)::json as geometry'));
  return {
    type: 'FeatureCollection' as const,
    features: rows.map((r) => ({
      type: 'Feature' as const,
      id: r.id,
      geometry: r.geometry,
      properties: { seq: r.seq, kind: r.kind, name: r.name, pointCount: r.point_count, ...r.attributes },
    })),
  };
}

export interface UploadExclusion {
  id: number;
  kind: 'time' | 'distance';
  /** ISO times for a time range, metres along each trace from its start for a distance range */
  from: string | number;
  to: string | number;
  reason: string;
  createdAt?: string;
  createdByName?: string | null;
}

export async function insertUploadExclusion(db: Db, uploadId: string, e: Omit<UploadExclusion, 'id'>, userId: string): Promise<number> {
  const [{ id }] = await db('upload_exclusions')
    .insert({
      upload_id: uploadId, kind: e.kind, reason: e.reason, created_by: userId,
      ...(e.kind === 'time' ? { from_time: e.from, to_time: e.to } : { from_m: e.from, to_m: e.to }),
    })
    .returning('id');
  return Number(id);
}

export async function listUploadExclusions(db: Db, uploadId: string): Promise<UploadExclusion[]> {
  const rows = await db('upload_exclusions as e').leftJoin('users as p', 'p.id', 'e.created_by').where({ 'e.upload_id': uploadId }).orderBy('e.id').select('e.*', 'p.name as created_by_name');
  return rows.map(exclusionDto);
}

const exclusionDto = (r: Record<string, any>): UploadExclusion => ({
  id: Number(r.id), kind: r.kind, reason: r.reason,
  from: r.kind === 'time' ? r.from_time.toISOString() : r.from_m,
  to: r.kind === 'time' ? r.to_time.toISOString() : r.to_m,
  createdAt: r.created_at.toISOString(),
  createdByName: r.created_by_name ?? null,
});

export async function getUploadExclusion(db: Db, uploadId: string, id: number): Promise<UploadExclusion | undefined> {
  const row = await db('upload_exclusions').where({ upload_id: uploadId, id }).first();
  return row && exclusionDto(row);
}

export async function deleteUploadExclusion(db: Db, uploadId: string, id: number): Promise<number> {
  return db('upload_exclusions').where({ upload_id: uploadId, id }).delete();
}

/** One stored fix of an upload: position, time (epoch seconds, null when the file gave none) and its running index. */
export interface UploadFix {
  lon: number;
  lat: number;
  t: number | null;
  seq: number;
}

/**
 * The upload's fixes as the matcher reads them: each line feature a trace, and the loose points of the
 * upload one more trace in file order (one survey run), e.g. `await listUploadTraces(db, id)` → `[[fix, …], …]`.
 */
export async function listUploadTraces(db: Db, uploadId: string): Promise<UploadFix[][]> {
  const rows = await db('upload_features').where({ upload_id: uploadId }).orderBy('seq').select('kind', 'times', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'));
  const traces: UploadFix[][] = [];
  const points: UploadFix[] = [];
  let seq = 0;
  for (const r of rows) {
    const times: (Date | null)[] | null = r.times;
    if (r.kind === 'line') {
      traces.push(r.geometry.coordinates.map((c: number[], i: number) => ({ lon: c[0], lat: c[1], t: times?.[i] ? times[i]!.getTime() / 1000 : null, seq: seq++ })));
    } else {
      const c = r.geometry.coordinates;
      points.push({ lon: c[0], lat: c[1], t: times?.[0] ? times[0]!.getTime() / 1000 : null, seq: seq++ });
    }
  }
  if (points.length >= 2) traces.push(points);
  return traces;
}
