import type { Knex } from 'knex';
import { installedStretchRows } from '@/db/duct-bundles';
import type { Project } from '@/db/projects';
import type { CheckFinding } from '@/lib/records/quality-checks';
import { ductContinuity } from '../duct-bundles';

/**
 * continuity_break: one finding per boundary between installed stretches of a route where a duct changes
 * colour, position or size (or ends, or starts) with no joint or connector recorded there
 * (`continuityBreaks` in lib/records/duct-continuity.ts).
 */
export async function ductFindings(db: Knex, project: Project): Promise<CheckFinding[]> {
  const out: CheckFinding[] = [];
  for (const r of await ductContinuity(db, project.id)) {
    for (const b of r.breaks) {
      out.push({
        check: 'continuity_break',
        routeId: r.routeId,
        routeRef: r.routeRef,
        fromChainageM: b.fromChainageM,
        toChainageM: b.toChainageM,
        message: `${r.routeRef}: ${b.message}`,
        href: `/projects/${project.id}/records/ducts#bundle-${b.afterBundleId}`,
        recordId: b.afterBundleId,
      });
    }
  }
  return out;
}

/** Route and stretch of every installed bundle: the "built stretch with no duct bundle" check reads them. */
export async function installedBundleStretches(db: Knex, projectId: string): Promise<{ routeId: string; routeRef: string; fromChainageM: number; toChainageM: number }[]> {
  return (await installedStretchRows(db, projectId)).map((r) => ({ routeId: r.routeId, routeRef: r.routeRef, fromChainageM: r.from, toChainageM: r.to }));
}
