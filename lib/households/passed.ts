import { distanceM } from '@/lib/matching/chainage';
import type { CrossingAttachment, Serving } from './serving';

/**
 * Passed, passed and approved, and why not, from the serving route of each address (serving.ts), the current
 * sections of the reconciliation and the road crossing records. Pure: the households service loads the rows.
 */

export const PASSED_DEFINITION = [
  'An address is passed when the built duct of the street route that serves it reaches the point in front of it, and, for an address across the street, a built road crossing carries the duct over to its side.',
  'Serving route: the design\'s assignment when the address import had one; otherwise the nearest street route of the plan along the address\'s own street (names compared without case, accents and abbreviations) within the serve distance (default 40 m); otherwise the nearest street route of any name within that distance.',
  'Foot point: the address projected onto its serving route. It is passed when a current built section of that route (as planned or deviating, never an unplanned stretch nor one not built) covers the foot point, or stops short of it by no more than the foot tolerance (default 2 m). Unplanned stretches pass nobody until an engineer promotes them.',
  'Side of the street: the trench runs along one side; an address on the other side is across. The side comes from the design when given, otherwise from the road crossings that start on the route (their far end lies across), otherwise from the addresses (the side whose houses lie further from the line is across).',
  'Across the street: it is passed only when a road crossing recorded as built serves it: the crossing record lists the address\'s key, or the crossing\'s end on the route lies within the crossing distance (default 30 m) of the address\'s foot point.',
  'Passed and approved: passed, and every section that passes it (and the crossing route\'s sections, if any) approved by an engineer.',
  'Households passed is the sum of the households (units) of the passed addresses: each dwelling of a multi-dwelling building counts once. Connected counts addresses with a drop recorded as installed.',
].join('\n\n');

/** A current section of the reconciliation, as the rule needs it. */
export interface SectionInput {
  id: string;
  plannedRouteRef: string | null;
  status: 'as_planned' | 'deviates' | 'unplanned' | 'not_built';
  fromChainageM: number;
  toChainageM: number;
  review: 'pending' | 'approved' | 'rejected' | 'acknowledged';
}

/** A road crossing's record (one per crossing route). */
export interface CrossingRecordInput {
  id: string;
  routeId: string;
  built: boolean;
  /** the address keys it serves, comma- or semicolon-separated, as recorded */
  addressRef: string | null;
}

export interface PassedSettings {
  crossingServeDistanceM: number;
  footToleranceM: number;
}

export interface PassedResult {
  addressId: string;
  passed: boolean;
  passedApproved: boolean;
  /** the road crossing record that serves an address across the street */
  viaCrossingId: string | null;
  /** how the crossing was found: it lists the address, or its end is near the foot point */
  viaCrossingBy: 'listed' | 'distance' | null;
  /** the sections that pass it */
  sectionIds: string[];
  notPassedReason: string | null;
}

const BUILT = new Set(['as_planned', 'deviates']);
const fmt = (m: number) => (m < 10 ? m.toFixed(1) : m.toFixed(0));

/** The keys a crossing record lists: split on commas and semicolons, trimmed, empty ones dropped. */
export function listedKeys(addressRef: string | null): string[] {
  return (addressRef ?? '').split(/[,;]/).map((k) => k.trim()).filter(Boolean);
}

/**
 * Whether each address is passed (see PASSED_DEFINITION), with the sections and crossing that pass it and,
 * when it is not, a short sentence why.
 */
export function computePassed(
  addresses: { id: string; key: string }[],
  servings: Serving[],
  sections: SectionInput[],
  crossingRoutes: CrossingAttachment[],
  records: CrossingRecordInput[],
  settings: PassedSettings,
): PassedResult[] {
  const tol = settings.footToleranceM;
  const builtByRef = new Map<string, SectionInput[]>();
  for (const s of sections) {
    if (!s.plannedRouteRef || !BUILT.has(s.status)) continue;
    const list = builtByRef.get(s.plannedRouteRef) ?? [];
    list.push(s);
    builtByRef.set(s.plannedRouteRef, list);
  }
  const recordByRoute = new Map(records.map((r) => [r.routeId, r]));
  const attachedTo = new Map<string, CrossingAttachment[]>();
  for (const c of crossingRoutes) {
    const list = attachedTo.get(c.streetRouteId) ?? [];
    list.push(c);
    attachedTo.set(c.streetRouteId, list);
  }
  const attachmentByRoute = new Map(crossingRoutes.map((c) => [c.crossingRouteId, c]));
  // a crossing's record lists keys: by key, the records that list it
  const listing = new Map<string, CrossingRecordInput[]>();
  for (const r of records) for (const k of listedKeys(r.addressRef)) listing.set(k, [...(listing.get(k) ?? []), r]);
  const keyOf = new Map(addresses.map((a) => [a.id, a.key]));

  return servings.map((sv): PassedResult => {
    const out: PassedResult = { addressId: sv.addressId, passed: false, passedApproved: false, viaCrossingId: null, viaCrossingBy: null, sectionIds: [], notPassedReason: null };
    if (!sv.routeId || sv.footChainageM === null) {
      out.notPassedReason = sv.reason ?? 'No serving route.';
      return out;
    }
    const ref = sv.routeRef!;
    const foot = sv.footChainageM;
    const built = builtByRef.get(ref) ?? [];
    const covering = built.filter((s) => s.fromChainageM - tol <= foot && foot <= s.toChainageM + tol);
    if (!covering.length) {
      if (!built.length) {
        out.notPassedReason = `Nothing of ${ref} is built yet.`;
      } else {
        let gap = Infinity;
        let short = true;
        for (const s of built) {
          const g = foot < s.fromChainageM ? s.fromChainageM - foot : foot - s.toChainageM;
          if (g < gap) { gap = g; short = foot > s.toChainageM; }
        }
        out.notPassedReason = short
          ? `The built stretch of ${ref} ends ${fmt(gap)} m short of the foot point (at ${fmt(foot)} m; tolerance ${fmt(tol)} m).`
          : `The built stretch of ${ref} starts ${fmt(gap)} m beyond the foot point (at ${fmt(foot)} m; tolerance ${fmt(tol)} m).`;
      }
      return out;
    }
    out.sectionIds = covering.map((s) => s.id);
    let approved = covering.every((s) => s.review === 'approved');

    if (sv.side === 'across') {
      const key = keyOf.get(sv.addressId) ?? '';
      // the record's word first: a built crossing that lists the address
      const listed = (listing.get(key) ?? []).filter((r) => r.built);
      let via: CrossingRecordInput | null = null;
      let by: PassedResult['viaCrossingBy'] = null;
      if (listed.length) {
        // of several, the one off the serving route, then the nearest to the foot point
        const score = (r: CrossingRecordInput) => {
          const a = attachmentByRoute.get(r.routeId);
          return (a?.streetRouteId === sv.routeId ? 0 : 1e9) + (a && sv.foot ? distanceM(a.nearEnd, sv.foot) : 1e8);
        };
        via = [...listed].sort((x, y) => score(x) - score(y))[0];
        by = 'listed';
      } else {
        let best = Infinity;
        let nearestPlanned: { ref: string; d: number; recorded: boolean } | null = null;
        for (const c of attachedTo.get(sv.routeId) ?? []) {
          const d = distanceM(c.nearEnd, sv.foot!);
          if (d > settings.crossingServeDistanceM) continue;
          const rec = recordByRoute.get(c.crossingRouteId);
          if (rec?.built) {
            if (d < best) { best = d; via = rec; by = 'distance'; }
          } else if (!nearestPlanned || d < nearestPlanned.d) {
            nearestPlanned = { ref: c.crossingRouteRef, d, recorded: !!rec };
          }
        }
        if (!via) {
          const dist = fmt(settings.crossingServeDistanceM);
          out.notPassedReason = nearestPlanned
            ? `Across the street: road crossing ${nearestPlanned.ref} (${fmt(nearestPlanned.d)} m away) is ${nearestPlanned.recorded ? 'recorded as not built' : 'planned but not built yet'}.`
            : `Across the street and no built road crossing within ${dist} m.`;
          out.sectionIds = [];
          return out;
        }
      }
      out.viaCrossingId = via!.id;
      out.viaCrossingBy = by;
      // the crossing route's own sections, if the reconciliation has any, must be approved too
      const a = attachmentByRoute.get(via!.routeId);
      const crossingSections = a ? sections.filter((s) => s.plannedRouteRef === a.crossingRouteRef && BUILT.has(s.status)) : [];
      out.sectionIds.push(...crossingSections.map((s) => s.id));
      approved = approved && crossingSections.every((s) => s.review === 'approved');
    }
    out.passed = true;
    out.passedApproved = approved;
    return out;
  });
}

/** The figures of a day: addresses, households and those passed and connected (removed addresses are left out by the caller). */
export function householdFigures(rows: { units: number; served: boolean; passed: boolean; passedApproved: boolean; connected: boolean }[]) {
  const f = { addresses: 0, households: 0, householdsServed: 0, addressesPassed: 0, householdsPassed: 0, householdsPassedApproved: 0, addressesConnected: 0, householdsConnected: 0 };
  for (const r of rows) {
    f.addresses++;
    f.households += r.units;
    if (r.served) f.householdsServed += r.units;
    if (r.passed) { f.addressesPassed++; f.householdsPassed += r.units; }
    if (r.passedApproved) f.householdsPassedApproved += r.units;
    if (r.connected) { f.addressesConnected++; f.householdsConnected += r.units; }
  }
  return f;
}
