/**
 * Cover compliance of depth readings against the project's minimum cover (`project.minCoverDepthM`).
 * Cover is measured from the surface to the top of the uppermost duct; a reading with only a trench depth
 * says nothing about cover, so it is 'unknown', never a pass.
 */

export type Compliance = 'pass' | 'fail' | 'unknown';

/** Half a millimetre: readings are typed to the centimetre, so a cover equal to the minimum passes despite float noise. */
const EPS_M = 0.0005;

/**
 * `coverCompliance(0.38, 0.4)` → 'fail'; `coverCompliance(0.4, 0.4)` → 'pass'; `coverCompliance(null, 0.4)` → 'unknown'.
 */
export function coverCompliance(coverM: number | null, minCoverM: number): Compliance {
  if (coverM === null || !Number.isFinite(coverM)) return 'unknown';
  return coverM + EPS_M >= minCoverM ? 'pass' : 'fail';
}

export interface ReadingForCompliance {
  id: string;
  routeId: string;
  routeRef: string;
  chainageM: number;
  coverM: number | null;
}

/** By how much a reading falls short of the minimum (m, positive), or null when it passes or has no cover. */
export function coverShortfall(coverM: number | null, minCoverM: number): number | null {
  return coverCompliance(coverM, minCoverM) === 'fail' ? minCoverM - (coverM as number) : null;
}

/** The readings below the minimum cover, in route and chainage order, each with its shortfall. */
export function readingsBelowMinimum<R extends ReadingForCompliance>(readings: R[], minCoverM: number): (R & { shortfallM: number })[] {
  return readings
    .filter((r) => coverCompliance(r.coverM, minCoverM) === 'fail')
    .map((r) => ({ ...r, shortfallM: minCoverM - (r.coverM as number) }))
    .sort((a, b) => a.routeRef.localeCompare(b.routeRef) || a.chainageM - b.chainageM);
}

/** Counts per outcome, for a summary line: `{ pass: 12, fail: 2, unknown: 1 }`. */
export function complianceCounts(readings: { coverM: number | null }[], minCoverM: number): Record<Compliance, number> {
  const out: Record<Compliance, number> = { pass: 0, fail: 0, unknown: 0 };
  for (const r of readings) out[coverCompliance(r.coverM, minCoverM)]++;
  return out;
}
