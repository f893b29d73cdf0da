import { readFile } from 'node:fs/promises';
import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getCrsDefinition } from '@/db/crs';
import {
  countReadingsFromUpload, deleteDepthReading, getDepthReading, insertDepthReadings, updateDepthReading,
  type DepthReading, type DepthReadingValues,
} from '@/db/depth-readings';
import type { Project } from '@/db/projects';
import { getAnchorRoute, getRouteByRef } from '@/db/record-anchors';
import { listUploadPointFeatures } from '@/db/upload-points';
import { getUpload } from '@/db/uploads';
import { AppError, type ErrorCode } from '@/lib/api/errors';
import { epsgField, jsonField } from '@/lib/api/form-fields';
import type { ReceivedForm } from '@/lib/api/multipart';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import { decodeText } from '@/lib/ingest/decode-text';
import { parseDepthCsv, type DepthColumnMap, type DepthCsvResult } from '@/lib/ingest/parse-depth-csv';
import { checkDepths, DEPTH_LIMITS, depthFromUploadSchema, type DepthReadingInput, type DepthReadingPatch } from '@/lib/records/depth-schemas';
import { IngestError } from '@/lib/ingest/types';
import type { PointAnchor, PointAnchorInput } from '@/lib/records/anchor';
import { coverCompliance } from '@/lib/records/depth-compliance';
import { wallTimeToUtc } from '@/lib/records/zoned-time';
import { resolvePointAnchor } from './record-anchors';

export { depthFromUploadSchema, depthReadingPatchSchema, depthReadingSchema, measuredAtField } from '@/lib/records/depth-schemas';

/**
 * The same rule the routes apply with `side: 'contractor'`, kept in the services too so that no other
 * caller (a seed, a script) records what the contractor built on someone else's behalf.
 */
export function assertRecordWriter(actor: Principal, project: Project): void {
  if (!can(actor.role, 'record.write')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) {
    throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) record what was built; the network owner's people read it.`);
  }
}

const invalid = (path: string, message: string) => new AppError('invalid', message, [{ path, message }]);

/** measuredAt as stored: an ISO instant, or null; a wall time is read on the project's clock. */
export function instantOf(text: string | null | undefined, project: Project, path = 'measuredAt'): string | null {
  if (!text) return null;
  const iso = /(Z|[+-]\d{2}:?\d{2})$/i.test(text) ? new Date(text) : null;
  const out = iso ? (Number.isNaN(iso.getTime()) ? null : iso.toISOString()) : wallTimeToUtc(text.replace(/(:\d{2})\.\d+$/, '$1'), project.timeZone);
  if (!out) throw invalid(path, 'That date and time does not exist.');
  if (out < '1990-01-01' || Date.parse(out) > Date.now() + 86_400_000) throw invalid(path, 'The time must lie between 1990 and today.');
  return out;
}

/** Places a point, refusing a route that a plan revision removed (its records stay, no new ones). */
export async function placePoint(db: Knex, project: Project, a: PointAnchorInput): Promise<PointAnchor> {
  const anchor = await resolvePointAnchor(db, project.id, a);
  const route = await getAnchorRoute(db, project.id, anchor.routeId);
  if (route?.removed) throw invalid('routeId', `Route ${route.ref} was removed by a plan revision: its records stay, but no new ones are added to it.`);
  return anchor;
}

const anchorInput = (v: { routeId?: string; chainageM?: number; lon?: number; lat?: number }): PointAnchorInput =>
  v.chainageM !== undefined ? { routeId: v.routeId!, chainageM: v.chainageM } : { lon: v.lon!, lat: v.lat!, ...(v.routeId ? { routeId: v.routeId } : {}) };

const auditView = (r: DepthReading) => ({ routeRef: r.routeRef, chainageM: Number(r.chainageM.toFixed(2)), coverM: r.coverM, trenchDepthM: r.trenchDepthM, measuredAt: r.measuredAt, note: r.note || null });

/** Stores a typed reading. */
export async function createDepthReading(db: Knex, actor: Principal, project: Project, input: DepthReadingInput): Promise<DepthReading> {
  assertRecordWriter(actor, project);
  const anchor = await placePoint(db, project, anchorInput(input as never));
  const values: DepthReadingValues = { anchor, coverM: input.coverM ?? null, trenchDepthM: input.trenchDepthM ?? null, measuredAt: instantOf(input.measuredAt, project), source: 'typed', note: input.note ?? '' };
  return db.transaction(async (trx) => {
    const [id] = await insertDepthReadings(trx, project.id, actor.id, [values]);
    const reading = (await getDepthReading(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'depth_reading', objectId: id, action: 'create', after: auditView(reading) });
    return reading;
  });
}

async function ownReading(db: Knex, project: Project, id: string): Promise<DepthReading> {
  const r = await getDepthReading(db, id);
  if (!r || r.projectId !== project.id) throw new AppError('not_found', 'Depth reading not found.');
  return r;
}

/** Changes a reading; moving it needs a chainage (on its route or a given one) or a position. */
export async function editDepthReading(db: Knex, actor: Principal, project: Project, id: string, patch: DepthReadingPatch): Promise<DepthReading> {
  assertRecordWriter(actor, project);
  return db.transaction(async (trx) => {
    const before = await ownReading(trx, project, id);
    const moves = patch.chainageM !== undefined || patch.lon !== undefined || patch.lat !== undefined;
    if ((patch.lon === undefined) !== (patch.lat === undefined)) throw invalid(patch.lon === undefined ? 'lon' : 'lat', 'Give both longitude and latitude.');
    const anchor: PointAnchor = moves
      ? await placePoint(trx, project, anchorInput({ ...patch, routeId: patch.routeId ?? (patch.chainageM !== undefined ? before.routeId : undefined) }))
      : { routeId: before.routeId, chainageM: before.chainageM, offsetM: before.offsetM, position: [before.lon, before.lat], source: 'position' };
    const next = {
      coverM: patch.coverM !== undefined ? patch.coverM : before.coverM,
      trenchDepthM: patch.trenchDepthM !== undefined ? patch.trenchDepthM : before.trenchDepthM,
    };
    const problems: string[] = [];
    checkDepths(next, { addIssue: (i: { message?: string }) => problems.push(i.message ?? '') } as unknown as z.RefinementCtx);
    if (problems.length) throw invalid('coverM', problems[0]);
    await updateDepthReading(trx, id, actor.id, {
      anchor, ...next,
      measuredAt: patch.measuredAt !== undefined ? instantOf(patch.measuredAt, project) : before.measuredAt,
      note: patch.note ?? before.note,
    });
    const after = (await getDepthReading(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'depth_reading', objectId: id, action: 'update', before: auditView(before), after: auditView(after) });
    return after;
  });
}

export async function removeDepthReading(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertRecordWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await ownReading(trx, project, id);
    await deleteDepthReading(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'depth_reading', objectId: id, action: 'delete', before: auditView(before) });
  });
}

// ---- import from a CSV ----

const depthColumnsSchema = z
  .object({ lon: z.string(), lat: z.string(), x: z.string(), y: z.string(), route: z.string(), chainage: z.string(), cover: z.string(), depth: z.string(), time: z.string(), note: z.string() })
  .partial()
  .strict();

/** The multipart fields of a depth CSV import. */
export const depthImportFieldsSchema = z.object({
  crs: epsgField.optional(),
  columns: jsonField(depthColumnsSchema, '{"route":"Route","chainage":"Ch","cover":"Cover"}').optional(),
  confirm: z.enum(['1', 'true', 'yes']).optional(),
});

export interface DepthImportPreview {
  fileName: string;
  columns: { map: DepthColumnMap; guessed: boolean; headers: string[] };
  placement: 'position' | 'chainage';
  crs: string | null;
  rowCount: number;
  readyCount: number;
  /** each row that cannot be stored, with its line number (the header is line 1) and why */
  problems: { row: number; message: string }[];
  warnings: string[];
  /** the first readings as they would be stored */
  sample: { row: number; routeRef: string; chainageM: number; offsetM: number; coverM: number | null; trenchDepthM: number | null; measuredAt: string | null; compliance: string }[];
  /** set when confirmed: how many readings were stored */
  stored?: number;
}

/** Places the parsed rows on routes; rows that cannot be placed join the problems. */
async function placeRows(db: Knex, project: Project, parsed: DepthCsvResult) {
  const placed: { row: number; values: DepthReadingValues; routeRef: string }[] = [];
  const problems = [...parsed.problems];
  const byRef = new Map<string, Awaited<ReturnType<typeof getRouteByRef>>>();
  const refOf = new Map<string, string>();
  for (const r of parsed.rows) {
    try {
      let input: PointAnchorInput;
      if (r.place.kind === 'chainage') {
        if (!byRef.has(r.place.routeRef)) byRef.set(r.place.routeRef, await getRouteByRef(db, project.id, r.place.routeRef));
        const route = byRef.get(r.place.routeRef);
        if (!route) throw invalid('route', `there is no route ${r.place.routeRef} in this project`);
        input = { routeId: route.id, chainageM: r.place.chainageM };
      } else {
        input = { lon: r.place.lon, lat: r.place.lat };
      }
      const anchor = await placePoint(db, project, input);
      if (!refOf.has(anchor.routeId)) refOf.set(anchor.routeId, (await getAnchorRoute(db, project.id, anchor.routeId))!.ref);
      placed.push({ row: r.row, routeRef: refOf.get(anchor.routeId)!, values: { anchor, coverM: r.coverM, trenchDepthM: r.trenchDepthM, measuredAt: r.measuredAt, source: 'csv', sourceRow: r.row, note: r.note } });
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      problems.push({ row: r.row, message: `row ${r.row}: ${e.message.replace(/^That /, 'the ').replace(/\.$/, '')}` });
    }
  }
  problems.sort((a, b) => a.row - b.row);
  return { placed, problems };
}

/**
 * Reads a depth CSV and either reports what it would store (preview: the column mapping, each row that
 * cannot be stored with its row number and reason, the first readings) or, confirmed, stores every reading
 * in one transaction. A confirmed file with any failing row stores nothing (422, the rows in details).
 */
export async function importDepthCsv(db: Knex, actor: Principal, project: Project, form: ReceivedForm, opts: { preview: boolean }): Promise<DepthImportPreview> {
  assertRecordWriter(actor, project);
  const fields = depthImportFieldsSchema.parse(form.fields);
  const part = form.files.find((f) => f.field === 'file');
  if (!part) throw new AppError('bad_request', 'Attach the CSV in a multipart part named "file".');
  const confirm = !opts.preview && fields.confirm !== undefined;
  let parsed: DepthCsvResult;
  try {
    parsed = await parseDepthCsv(decodeText(await readFile(part.tmpPath)), {
      columns: fields.columns as DepthColumnMap | undefined,
      crs: fields.crs,
      resolveCrs: (srid) => getCrsDefinition(db, srid),
      timeZone: project.timeZone,
      projectExtent: project.extent,
    });
  } catch (e) {
    if (e instanceof IngestError) throw new AppError(e.code as ErrorCode, e.message, e.details);
    throw e;
  }
  const { placed, problems } = await placeRows(db, project, parsed);
  const preview: DepthImportPreview = {
    fileName: part.fileName,
    columns: parsed.columns,
    placement: parsed.placement,
    crs: parsed.sourceCrs,
    rowCount: parsed.rows.length + parsed.problems.length,
    readyCount: placed.length,
    problems,
    warnings: parsed.warnings,
    sample: placed.slice(0, 20).map((p) => ({
      row: p.row, routeRef: p.routeRef, chainageM: p.values.anchor.chainageM, offsetM: p.values.anchor.offsetM, coverM: p.values.coverM, trenchDepthM: p.values.trenchDepthM,
      measuredAt: p.values.measuredAt, compliance: coverCompliance(p.values.coverM, project.minCoverDepthM),
    })),
  };
  if (!confirm) return preview;
  if (problems.length > 0) {
    throw new AppError('invalid', `${problems.length} row${problems.length === 1 ? '' : 's'} cannot be stored (rows ${problems.slice(0, 20).map((p) => p.row).join(', ')}${problems.length > 20 ? ', …' : ''}); nothing was stored. Correct the file and send it again.`, problems.map((p) => ({ path: `row ${p.row}`, message: p.message, row: p.row })));
  }
  await db.transaction(async (trx) => {
    await insertDepthReadings(trx, project.id, actor.id, placed.map((p) => p.values));
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'depth_reading', objectId: project.id, action: 'import',
      after: { fileName: part.fileName, count: placed.length, placement: parsed.placement, crs: parsed.sourceCrs, belowMinimum: placed.filter((p) => coverCompliance(p.values.coverM, project.minCoverDepthM) === 'fail').length },
    });
  });
  return { ...preview, stored: placed.length };
}

// ---- from an upload's attribute ----

/** A number from an attribute value, or undefined when the value is empty (the feature does not carry it). */
function attributeNumber(v: unknown): number | undefined | typeof NaN {
  if (v === null || v === undefined || v === '') return undefined;
  if (typeof v === 'number') return v;
  const s = String(v).trim().replace(',', '.');
  if (s === '') return undefined;
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(s) ? Number(s) : Number.NaN;
}

/**
 * Depth readings from an upload's points and line vertices that carry the named attribute (a depth column
 * of a shapefile, a GeoJSON property, a survey CSV point's value). All in one transaction; any value that
 * is not a plausible depth, or a point too far from every route, refuses the whole import. An upload's
 * readings are taken once (a second time is a conflict: delete them first).
 */
export async function depthReadingsFromUpload(db: Knex, actor: Principal, project: Project, uploadId: string, input: z.infer<typeof depthFromUploadSchema>): Promise<{ stored: number; skipped: number; readings: DepthReading[] }> {
  assertRecordWriter(actor, project);
  const upload = await getUpload(db, uploadId);
  if (!upload || upload.projectId !== project.id) throw new AppError('not_found', 'Upload not found.');
  if (upload.status !== 'stored') throw new AppError('conflict', `The upload is ${upload.status}; readings are taken only from a stored upload.`);
  if ((await countReadingsFromUpload(db, uploadId)) > 0) throw new AppError('conflict', 'Depth readings were already taken from this upload; delete them first to take them again.');
  const features = await listUploadPointFeatures(db, uploadId);
  const lim = input.measures === 'cover' ? DEPTH_LIMITS.coverM : DEPTH_LIMITS.trenchDepthM;
  const values: DepthReadingValues[] = [];
  const problems: { path: string; message: string }[] = [];
  let skipped = 0;
  let seen = false;
  for (const f of features) {
    const row = typeof f.attributes.row === 'number' ? f.attributes.row : f.seq + 1;
    const perVertex = f.kind === 'line' ? f.pointAttributes?.[input.attribute] : undefined;
    const items: { value: unknown; coord: [number, number]; vertex: number | null; time: string | null }[] =
      f.kind === 'point'
        ? [{ value: f.attributes[input.attribute], coord: f.coords[0], vertex: null, time: f.times?.[0] ?? null }]
        : perVertex
          ? f.coords.map((c, i) => ({ value: perVertex[i], coord: c, vertex: i + 1, time: f.times?.[i] ?? null }))
          : [];
    if (f.kind === 'line' && !perVertex && f.attributes[input.attribute] !== undefined) {
      // one figure for a whole line says nothing about where along it it was measured
      seen = true;
      skipped++;
      continue;
    }
    for (const it of items) {
      if (it.value !== undefined) seen = true;
      const v = attributeNumber(it.value);
      if (v === undefined) continue;
      const where = `feature ${f.seq + 1}${it.vertex ? `, vertex ${it.vertex}` : ''}${f.name ? ` (${f.name})` : ''}`;
      if (Number.isNaN(v) || v < lim.min || v > lim.max) {
        problems.push({ path: where, message: `${where}: ${input.attribute} '${String(it.value)}' is not a depth in metres (${lim.min}–${lim.max} m)` });
        continue;
      }
      try {
        const anchor = await placePoint(db, project, { lon: it.coord[0], lat: it.coord[1] });
        values.push({
          anchor, coverM: input.measures === 'cover' ? v : null, trenchDepthM: input.measures === 'trench_depth' ? v : null, measuredAt: it.time,
          source: 'upload', uploadId, sourceRow: row, sourceVertex: it.vertex, note: '',
        });
      } catch (e) {
        if (!(e instanceof AppError)) throw e;
        problems.push({ path: where, message: `${where}: ${e.message}` });
      }
    }
  }
  if (!seen) throw invalid('attribute', `No point of this upload carries an attribute named '${input.attribute}'.`);
  if (problems.length) throw new AppError('invalid', `${problems.length} value${problems.length === 1 ? '' : 's'} cannot be stored; nothing was stored. ${problems.slice(0, 5).map((p) => p.message).join('; ')}`, problems);
  if (values.length === 0) throw invalid('attribute', `No point of this upload has a value in '${input.attribute}'.`);
  const ids = await db.transaction(async (trx) => {
    const out = await insertDepthReadings(trx, project.id, actor.id, values);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'depth_reading', objectId: uploadId, action: 'import_upload', after: { fileName: upload.fileName, attribute: input.attribute, measures: input.measures, count: out.length } });
    return out;
  });
  const readings = (await Promise.all(ids.slice(0, 50).map((id) => getDepthReading(db, id)))).filter((r): r is DepthReading => r !== undefined);
  return { stored: ids.length, skipped, readings };
}
