/**
 * Vertical clearance between an existing utility and our ducts, against the project's minimum
 * (`project.records.minClearanceM`). A crossing whose clearance was not measured is 'unknown': it is shown,
 * but not counted as a failure (nothing measured it).
 */

export type ClearanceStatus = 'ok' | 'below_minimum' | 'unknown';

const EPS_M = 0.0005;

/** `clearanceStatus(0.2, 0.3)` → 'below_minimum'; `clearanceStatus(0.3, 0.3)` → 'ok'; `clearanceStatus(null, 0.3)` → 'unknown'. */
export function clearanceStatus(clearanceM: number | null, minClearanceM: number): ClearanceStatus {
  if (clearanceM === null || !Number.isFinite(clearanceM)) return 'unknown';
  return clearanceM + EPS_M >= minClearanceM ? 'ok' : 'below_minimum';
}

export interface CrossingForClearance {
  id: string;
  routeId: string;
  routeRef: string;
  chainageM: number;
  clearanceM: number | null;
  utilityLabel: string;
}

/** The crossings closer to our ducts than the minimum, in route and chainage order. */
export function crossingsBelowClearance<C extends CrossingForClearance>(crossings: C[], minClearanceM: number): C[] {
  return crossings
    .filter((c) => clearanceStatus(c.clearanceM, minClearanceM) === 'below_minimum')
    .sort((a, b) => a.routeRef.localeCompare(b.routeRef) || a.chainageM - b.chainageM);
}
