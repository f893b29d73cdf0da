/**
 * The quality checks an engineer reads before approving. Each check is computed on the server from the
 * records (pure functions in lib/records, loaders in lib/services/checks/*) and reported as findings: one
 * per offending record or stretch, with a link to it. A finding whose stretch touches a section is an open
 * check of that section: approving it needs a comment.
 */
export const CHECKS = {
  cover_below_minimum: { label: 'Cover below the minimum', severity: 'fail' },
  clearance_below_minimum: { label: 'Clearance to another utility below the minimum', severity: 'fail' },
  continuity_break: { label: 'Duct continuity breaks', severity: 'warn' },
  restoration_out_of_tolerance: { label: 'Restoration out of tolerance', severity: 'fail' },
  restoration_late: { label: 'Surface laid late after cleaning', severity: 'warn' },
  gap_between_built: { label: 'Gaps between built stretches', severity: 'warn' },
  no_depth_reading: { label: 'Built stretches with no depth reading', severity: 'warn' },
  no_duct_bundle: { label: 'Built stretches with no duct bundle', severity: 'warn' },
} as const;
export type CheckKey = keyof typeof CHECKS;
export const CHECK_KEYS = Object.keys(CHECKS) as CheckKey[];

export interface CheckFinding {
  check: CheckKey;
  routeId: string;
  routeRef: string;
  /** the stretch the finding is about; a point gives from = to */
  fromChainageM: number;
  toChainageM: number;
  /** what is wrong, in a sentence with the measured and required values */
  message: string;
  /** the page of the offending record (or the section) */
  href: string;
  recordId?: string;
}

/** Findings that touch a section's stretch (a point at either end counts). */
export function findingsOnStretch(findings: CheckFinding[], routeRef: string | null, from: number, to: number): CheckFinding[] {
  if (routeRef === null) return [];
  return findings.filter((f) => f.routeRef === routeRef && (f.fromChainageM === f.toChainageM ? f.fromChainageM >= from && f.fromChainageM <= to : f.fromChainageM < to && f.toChainageM > from));
}

/** Findings grouped by check, every check present (count 0 when it passes), in CHECKS order. */
export function summariseFindings(findings: CheckFinding[]): { check: CheckKey; label: string; severity: 'fail' | 'warn'; count: number; findings: CheckFinding[] }[] {
  return CHECK_KEYS.map((check) => {
    const these = findings.filter((f) => f.check === check);
    return { check, label: CHECKS[check].label, severity: CHECKS[check].severity, count: these.length, findings: these };
  });
}
