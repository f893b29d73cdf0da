import type { Knex } from 'knex';
import type { Project } from '@/db/projects';
import { listUtilityCrossings } from '@/db/test-pits';
import type { CheckFinding } from '@/lib/records/quality-checks';
import { crossingsBelowClearance } from '@/lib/records/utility-clearance';

/** clearance_below_minimum: one finding per utility crossing closer to our ducts than `project.records.minClearanceM`. */
export async function utilityFindings(db: Knex, project: Project): Promise<CheckFinding[]> {
  const crossings = await listUtilityCrossings(db, project.id);
  const min = project.records.minClearanceM;
  return crossingsBelowClearance(crossings, min).map((c) => ({
    check: 'clearance_below_minimum' as const,
    routeId: c.routeId,
    routeRef: c.routeRef,
    fromChainageM: c.chainageM,
    toChainageM: c.chainageM,
    message: `${c.utilityLabel}${c.owner ? ` (${c.owner})` : ''} at ${c.chainageM.toFixed(1)} m on ${c.routeRef}: clearance ${c.clearanceM!.toFixed(2)} m, below the minimum ${min.toFixed(2)} m.`,
    href: `/projects/${project.id}/records/pits#crossing-${c.id}`,
    recordId: c.id,
  }));
}
