import type { CheckFinding } from './quality-checks';

/** A current section as the coverage checks see it. */
export interface BuiltStretch {
  id: string;
  routeId: string;
  routeRef: string;
  status: 'as_planned' | 'deviates' | 'unplanned' | 'not_built';
  fromChainageM: number;
  toChainageM: number;
}

const isBuilt = (s: BuiltStretch) => s.status === 'as_planned' || s.status === 'deviates';
const fmt = (m: number) => m.toFixed(1);

/**
 * Gaps between built stretches of a route longer than the threshold: between two built sections, what is
 * not covered (a not-built stretch, or nothing) is a gap. Stretches before the first and after the last
 * built one are work not yet done, not gaps.
 * `gapFindings([{…0–40 built}, {…40–60 not built}, {…60–90 built}], 5, href)` → one finding, 40–60 m (20.0 m).
 */
export function gapFindings(sections: BuiltStretch[], thresholdM: number, href: (s: BuiltStretch) => string): CheckFinding[] {
  const out: CheckFinding[] = [];
  const byRoute = new Map<string, BuiltStretch[]>();
  for (const s of sections) if (isBuilt(s)) (byRoute.get(s.routeId) ?? byRoute.set(s.routeId, []).get(s.routeId)!).push(s);
  for (const built of byRoute.values()) {
    built.sort((a, b) => a.fromChainageM - b.fromChainageM);
    let reach = built[0].toChainageM;
    for (let i = 1; i < built.length; i++) {
      const s = built[i];
      const gap = s.fromChainageM - reach;
      if (gap > thresholdM) {
        out.push({
          check: 'gap_between_built',
          routeId: s.routeId,
          routeRef: s.routeRef,
          fromChainageM: reach,
          toChainageM: s.fromChainageM,
          message: `${s.routeRef}: ${fmt(gap)} m between built stretches (${fmt(reach)}–${fmt(s.fromChainageM)} m), more than the project's ${fmt(thresholdM)} m.`,
          href: href(s),
        });
      }
      reach = Math.max(reach, s.toChainageM);
    }
  }
  return out;
}

/**
 * Built sections with no depth reading on their stretch (ends included).
 * `readings` are chainages per route id.
 */
export function noDepthFindings(sections: BuiltStretch[], readings: Map<string, number[]>, href: (s: BuiltStretch) => string): CheckFinding[] {
  return sections
    .filter((s) => isBuilt(s) && !(readings.get(s.routeId) ?? []).some((c) => c >= s.fromChainageM && c <= s.toChainageM))
    .map((s) => ({
      check: 'no_depth_reading' as const,
      routeId: s.routeId,
      routeRef: s.routeRef,
      fromChainageM: s.fromChainageM,
      toChainageM: s.toChainageM,
      message: `${s.routeRef} ${fmt(s.fromChainageM)}–${fmt(s.toChainageM)} m is built but has no depth reading.`,
      href: href(s),
      recordId: s.id,
    }));
}

/**
 * Built sections not covered by installed duct bundles: a finding for each built section with uncovered
 * metres (a bundle recorded on part of it covers that part only), listing the first uncovered stretch.
 */
export function noBundleFindings(sections: BuiltStretch[], bundles: Map<string, [number, number][]>, href: (s: BuiltStretch) => string, toleranceM = 0.5): CheckFinding[] {
  const out: CheckFinding[] = [];
  for (const s of sections) {
    if (!isBuilt(s)) continue;
    const covering = (bundles.get(s.routeId) ?? []).filter(([a, b]) => a < s.toChainageM && b > s.fromChainageM).sort((x, y) => x[0] - y[0]);
    let at = s.fromChainageM;
    let firstHole: [number, number] | null = null;
    let uncovered = 0;
    for (const [a, b] of covering) {
      if (a > at + toleranceM) {
        firstHole ??= [at, a];
        uncovered += a - at;
      }
      at = Math.max(at, b);
    }
    if (s.toChainageM > at + toleranceM) {
      firstHole ??= [at, s.toChainageM];
      uncovered += s.toChainageM - at;
    }
    if (!firstHole) continue;
    out.push({
      check: 'no_duct_bundle',
      routeId: s.routeId,
      routeRef: s.routeRef,
      fromChainageM: firstHole[0],
      toChainageM: firstHole[1],
      message:
        covering.length === 0
          ? `${s.routeRef} ${fmt(s.fromChainageM)}–${fmt(s.toChainageM)} m is built but has no duct bundle recorded.`
          : `${s.routeRef} ${fmt(s.fromChainageM)}–${fmt(s.toChainageM)} m: ${fmt(uncovered)} m built with no duct bundle recorded (first ${fmt(firstHole[0])}–${fmt(firstHole[1])} m).`,
      href: href(s),
      recordId: s.id,
    });
  }
  return out;
}
