import type { Knex } from 'knex';
import type { Project } from '@/db/projects';
import { gapFindings, noBundleFindings, noDepthFindings, type BuiltStretch } from '@/lib/records/coverage-checks';
import { findingsOnStretch, summariseFindings, type CheckFinding } from '@/lib/records/quality-checks';
import { ductFindings, installedBundleStretches } from './checks/ducts';
import { depthFindings, depthReadingChainages } from './checks/depths';
import { utilityFindings } from './checks/utilities';
import { restorationFindings } from './checks/restoration';

/** The project's current sections on planned routes, with the route's id, for the coverage checks. */
async function builtStretches(db: Knex, projectId: string): Promise<BuiltStretch[]> {
  const rows = await db('sections as s')
    .join('planned_routes as r', function () {
      this.on('r.ref', '=', 's.planned_route_ref').andOn('r.project_id', '=', 's.project_id');
    })
    .where('s.project_id', projectId)
    .whereNull('s.retired_in_run')
    .select('s.id', 'r.id as route_id', 'r.ref', 's.status', 's.from_chainage_m', 's.to_chainage_m');
  return rows.map((r) => ({ id: r.id, routeId: r.route_id, routeRef: r.ref, status: r.status, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m }));
}

/**
 * Every quality check of a project, computed from its records now: cover and clearance below the
 * minimum, continuity breaks, restoration out of tolerance or late, gaps between built stretches, and built
 * stretches with no depth reading or no duct bundle.
 */
export async function projectFindings(db: Knex, project: Project): Promise<CheckFinding[]> {
  const sectionHref = (s: BuiltStretch) => `/projects/${project.id}/sections/${s.id}`;
  const sections = await builtStretches(db, project.id);
  const readings = new Map<string, number[]>();
  for (const r of await depthReadingChainages(db, project.id)) (readings.get(r.routeId) ?? readings.set(r.routeId, []).get(r.routeId)!).push(r.chainageM);
  const bundles = new Map<string, [number, number][]>();
  for (const b of await installedBundleStretches(db, project.id)) (bundles.get(b.routeId) ?? bundles.set(b.routeId, []).get(b.routeId)!).push([b.fromChainageM, b.toChainageM]);
  return [
    ...(await depthFindings(db, project)),
    ...(await utilityFindings(db, project)),
    ...(await ductFindings(db, project)),
    ...(await restorationFindings(db, project)),
    ...gapFindings(sections, project.records.gapThresholdM, sectionHref),
    ...noDepthFindings(sections, readings, sectionHref),
    ...noBundleFindings(sections, bundles, sectionHref),
  ];
}

/** The checks page: every check with its count and findings. */
export async function projectChecks(db: Knex, project: Project) {
  return { checks: summariseFindings(await projectFindings(db, project)) };
}

/** The open checks of a section: the findings whose stretch touches it. */
export async function sectionFindings(db: Knex, project: Project, section: { plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<CheckFinding[]> {
  return findingsOnStretch(await projectFindings(db, project), section.plannedRouteRef, section.fromChainageM, section.toChainageM);
}
