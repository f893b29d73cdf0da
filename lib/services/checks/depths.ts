import type { Knex } from 'knex';
import { depthReadingChainageRows, listDepthReadings } from '@/db/depth-readings';
import type { Project } from '@/db/projects';
import { readingsBelowMinimum } from '@/lib/records/depth-compliance';
import type { CheckFinding } from '@/lib/records/quality-checks';

const cm = (m: number) => `${(m * 100).toFixed(0)} cm`;

/** cover_below_minimum: one finding per reading whose cover is below `project.minCoverDepthM`. */
export async function depthFindings(db: Knex, project: Project): Promise<CheckFinding[]> {
  const readings = await listDepthReadings(db, project.id);
  return readingsBelowMinimum(readings, project.minCoverDepthM).map((r) => ({
    check: 'cover_below_minimum' as const,
    routeId: r.routeId,
    routeRef: r.routeRef,
    fromChainageM: r.chainageM,
    toChainageM: r.chainageM,
    message: `Cover ${r.coverM!.toFixed(2)} m at ${r.chainageM.toFixed(1)} m on ${r.routeRef}, ${cm(r.shortfallM)} below the minimum ${project.minCoverDepthM.toFixed(2)} m.`,
    href: `/projects/${project.id}/records/depths#reading-${r.id}`,
    recordId: r.id,
  }));
}

/** Route and chainage of every depth reading: the "built stretch with no depth reading" check reads them. */
export async function depthReadingChainages(db: Knex, projectId: string): Promise<{ routeId: string; routeRef: string; chainageM: number }[]> {
  return depthReadingChainageRows(db, projectId);
}
