import { createHash, randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import type { Knex } from 'knex';
import { z } from 'zod';
import { refreshPlannedBundles } from './duct-bundles';
import { writeAudit } from '@/db/audit';
import {
  deriveExtentFromPlan,
  findPlanVersionBySha,
  insertPlannedRoute,
  insertPlanVersion,
  insertPlanVersionFiles,
  insertRouteHistory,
  listPlannedRoutes,
  listPlanVersions,
  lockProjectPlan,
  updatePlannedRoute,
  type PlanVersion,
} from '@/db/planned';
import type { Project } from '@/db/projects';
import { AppError, type ErrorCode } from '@/lib/api/errors';
import type { ReceivedForm } from '@/lib/api/multipart';
import { epsgField, jsonField } from '@/lib/api/form-fields';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { IngestError } from '@/lib/ingest/types';
import { lineLengthM } from '@/lib/matching/chainage';
import { diffPlans } from '@/lib/matching/plan-diff';
import { attributeKeys, guessPlanMapping, toPlannedRoutes, type PlanMapping } from '@/lib/matching/plan-mapping';
import { buildRouteGraph } from '@/lib/matching/route-graph';
import type { PlannedRouteInput } from '@/lib/matching/types';
import { combinedSha, removeOriginals, storeOriginals } from './originals';
import { parse } from './uploads';

const mappingSchema = z.object({ ref: z.string(), street: z.string(), ducts: z.string(), kind: z.string() }).partial().strict();

export const planFieldsSchema = z.object({
  crs: epsgField.optional(),
  mapping: jsonField(mappingSchema, '{"ref":"route_id","street":"street","ducts":"bundle","kind":"type"}').optional(),
});

/**
 * Imports the design (GeoJSON, KML/KMZ, zipped shapefile) as the project's next plan version: routes are
 * matched to the previous version by reference; added, reshaped and retagged routes are written with
 * their history, removed ones are flagged, never deleted; the project's extent follows the plan.
 * The same file again returns the version it made.
 */
export async function importPlan(db: Knex, actor: Principal, project: Project, form: ReceivedForm): Promise<{ version: PlanVersion; created: boolean }> {
  const fields = planFieldsSchema.parse(form.fields);
  const parts = form.files.filter((f) => f.field === 'file' || f.field === 'files');
  if (parts.length === 0) throw new AppError('bad_request', 'Attach the design in a multipart part named "file".');
  const sha256 = combinedSha(parts);
  const existing = await findPlanVersionBySha(db, project.id, sha256);
  if (existing) return { version: existing, created: false };

  const files = await Promise.all(parts.map(async (p) => ({ name: p.fileName, bytes: await readFile(p.tmpPath) })));
  const parsed = await parse(db, project, files, { crs: fields.crs });
  if (parsed instanceof IngestError) throw new AppError(parsed.code as ErrorCode, parsed.message, parsed.details);
  if (parsed.format === 'gpx' || parsed.format === 'csv') {
    throw new AppError('unsupported_format', `A design is imported from GeoJSON, KML/KMZ or a zipped shapefile; this is a ${parsed.format.toUpperCase()} file. Field traces go to Uploads.`);
  }
  const keys = attributeKeys(parsed.features);
  const mapping: PlanMapping = fields.mapping ?? guessPlanMapping(keys);
  for (const [field, key] of Object.entries(mapping)) {
    if (key && !keys.includes(key)) {
      throw new AppError('invalid', `mapping.${field}: the design has no attribute '${key}'; it has ${keys.map((k) => `'${k}'`).join(', ') || 'none'}.`, [{ path: `mapping.${field}`, message: `No attribute '${key}'.` }]);
    }
  }
  const { routes, warnings } = toPlannedRoutes(parsed.features, mapping);
  if (routes.length === 0) throw new AppError('too_few_points', 'The design holds no lines to use as routes.');
  if (!fields.mapping) warnings.unshift(`attribute mapping guessed from the names present: ${JSON.stringify(mapping)}; send mapping to set it`);
  const graph = buildRouteGraph(routes);
  const lengths = new Map(routes.map((r) => [r.ref, lineLengthM(r.coords)]));

  const versionId = randomUUID();
  const stored = await storeOriginals(`plans/${project.id}/${versionId}`, parts, files.map((f) => f.bytes));
  try {
    await db.transaction(async (trx) => {
      const version = await lockProjectPlan(trx, project.id);
      const all = await listPlannedRoutes(trx, project.id, true);
      const current = all.filter((r) => r.removedInVersion === null);
      const byRef = new Map(all.map((r) => [r.ref, r]));
      const changes = diffPlans(current, routes);
      const next = new Map(routes.map((r) => [r.ref, r]));
      for (const ref of changes.added) {
        const r = next.get(ref)!;
        const old = byRef.get(ref);
        if (old) {
          // a route a revision removed comes back: the same route, with its records, restored
          await updatePlannedRoute(trx, old.id, { street: r.street, ducts: r.ducts, kind: r.kind, coords: r.coords, lengthM: lengths.get(ref)!, geometryVersion: version, removedInVersion: null });
          await insertRouteHistory(trx, old.id, version, 'restored', r);
        } else {
          const id = await insertPlannedRoute(trx, project.id, { ...r, lengthM: lengths.get(ref)! }, version);
          await insertRouteHistory(trx, id, version, 'added', r);
        }
      }
      for (const ref of changes.reshaped) {
        const r = next.get(ref)!;
        await updatePlannedRoute(trx, byRef.get(ref)!.id, { street: r.street, ducts: r.ducts, kind: r.kind, coords: r.coords, lengthM: lengths.get(ref)!, geometryVersion: version });
        await insertRouteHistory(trx, byRef.get(ref)!.id, version, 'reshaped', r);
      }
      for (const ref of changes.retagged) {
        const r = next.get(ref)!;
        await updatePlannedRoute(trx, byRef.get(ref)!.id, { street: r.street, ducts: r.ducts, kind: r.kind });
        await insertRouteHistory(trx, byRef.get(ref)!.id, version, 'retagged', r);
      }
      for (const ref of changes.removed) {
        const old = byRef.get(ref)!;
        await updatePlannedRoute(trx, old.id, { removedInVersion: version });
        await insertRouteHistory(trx, old.id, version, 'removed', old);
      }
      const lengthM = [...lengths.values()].reduce((a, b) => a + b, 0);
      await insertPlanVersion(trx, {
        id: versionId, projectId: project.id, version, fileName: parts.map((p) => p.fileName).join(', ').slice(0, 500), sha256, format: parsed.format, crs: parsed.sourceCrs,
        mapping: mapping as Record<string, string>, mappingGuessed: !fields.mapping, changes: changes as unknown as Record<string, string[]>, diagnostics: graph.diagnostics,
        warnings: [...parsed.warnings, ...warnings], routeCount: routes.length, lengthM, importedBy: actor.id,
      });
      await insertPlanVersionFiles(trx, versionId, stored);
      const before = project.extent;
      await deriveExtentFromPlan(trx, project.id);
      await writeAudit(trx, auditActor(actor), {
        projectId: project.id, objectType: 'plan_version', objectId: versionId, action: 'import',
        after: { version, routes: routes.length, added: changes.added.length, removed: changes.removed.length, reshaped: changes.reshaped.length, retagged: changes.retagged.length, mapping, diagnostics: graph.diagnostics.length },
      });
      const after = await trx('projects').where({ id: project.id }).first(trx.raw('ST_XMin(extent) as w, ST_YMin(extent) as s, ST_XMax(extent) as e, ST_YMax(extent) as n'));
      await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'project', objectId: project.id, action: 'extent_from_plan', before: { extent: before }, after: { extent: [after.w, after.s, after.e, after.n] } });
      // the planned duct bundles follow the design's `ducts` attribute (audited when something changed)
      await refreshPlannedBundles(trx, actor, project);
    });
  } catch (err) {
    await removeOriginals(stored);
    throw err;
  }
  return { version: (await listPlanVersions(db, project.id)).find((v) => v.id === versionId)!, created: true };
}

/** The current planned network as an RFC 7946 FeatureCollection; removed routes only when asked. */
export async function plannedFeatureCollection(db: Knex, projectId: string, includeRemoved: boolean) {
  const routes = await listPlannedRoutes(db, projectId, includeRemoved);
  return {
    type: 'FeatureCollection' as const,
    features: routes.map((r) => ({
      type: 'Feature' as const,
      id: r.id,
      geometry: { type: 'LineString' as const, coordinates: r.coords },
      properties: { ref: r.ref, street: r.street, ducts: r.ducts, kind: r.kind, lengthM: Math.round(r.lengthM * 1000) / 1000, firstVersion: r.firstVersion, geometryVersion: r.geometryVersion, removedInVersion: r.removedInVersion },
    })),
  };
}

/**
 * Adds an unplanned stretch to the plan as a new route (an engineer's promotion), as the next plan version
 * with its change list, so the design's history shows where the route came from. Runs in the caller's
 * transaction; the caller writes the correction and reconciles.
 */
export async function addPromotedRoute(
  trx: Knex.Transaction,
  actor: Principal,
  projectId: string,
  p: { ref: string; street: string | null; kind: 'street' | 'crossing'; coords: PlannedRouteInput['coords']; sectionId: string; reason: string },
): Promise<number> {
  const version = await lockProjectPlan(trx, projectId);
  const current = await listPlannedRoutes(trx, projectId);
  const route: PlannedRouteInput = { ref: p.ref, street: p.street, ducts: null, kind: p.kind, coords: p.coords };
  const lengthM = lineLengthM(p.coords);
  const id = await insertPlannedRoute(trx, projectId, { ...route, lengthM }, version);
  await insertRouteHistory(trx, id, version, 'added', route);
  const graph = buildRouteGraph([...current, route]);
  const versionId = randomUUID();
  await insertPlanVersion(trx, {
    id: versionId, projectId, version, fileName: `promoted from unplanned section ${p.sectionId}`,
    sha256: createHash('sha256').update(JSON.stringify(route)).digest('hex'), format: 'promotion', crs: 'EPSG:4326', mapping: {}, mappingGuessed: false,
    changes: { added: [p.ref], removed: [], reshaped: [], retagged: [] }, diagnostics: graph.diagnostics, warnings: [],
    routeCount: current.length + 1, lengthM: current.reduce((n, r) => n + r.lengthM, 0) + lengthM, importedBy: actor.id,
  });
  await deriveExtentFromPlan(trx, projectId);
  await writeAudit(trx, auditActor(actor), { projectId, objectType: 'plan_version', objectId: versionId, action: 'promote_route', after: { version, ref: p.ref, fromSection: p.sectionId, lengthM, reason: p.reason } });
  return version;
}
