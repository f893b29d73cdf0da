import type { Knex } from 'knex';
import type { Project } from '@/db/projects';
import { listRestorations } from '@/db/restorations';
import type { CheckFinding } from '@/lib/records/quality-checks';

/**
 * restoration_out_of_tolerance: one finding per restoration with a laying temperature outside the project's
 * target ± tolerance or laid thinner than required; restoration_late: one per restoration laid later after
 * cleaning than the project's limit. The verdict itself is `restorationVerdict` (lib/records/restoration.ts).
 */
export async function restorationFindings(db: Knex, project: Project): Promise<CheckFinding[]> {
  const out: CheckFinding[] = [];
  for (const r of await listRestorations(db, project.id)) {
    const where = { routeId: r.routeId, routeRef: r.routeRef, fromChainageM: r.fromChainageM, toChainageM: r.toChainageM, href: `/projects/${project.id}/records/restoration#restoration-${r.id}`, recordId: r.id };
    const stretch = `${r.routeRef} ${r.fromChainageM.toFixed(1)}–${r.toChainageM.toFixed(1)} m`;
    if (r.check.outOfTolerance) {
      const why = r.check.reasons.filter((x) => x.severity === 'fail').map((x) => x.text).join(' ');
      out.push({ check: 'restoration_out_of_tolerance', message: `Restoration on ${stretch}: ${why}`, ...where });
    }
    if (r.check.late) {
      out.push({ check: 'restoration_late', message: `Restoration on ${stretch}: ${r.check.reasons.find((x) => x.kind === 'late')!.text}`, ...where });
    }
  }
  return out;
}
