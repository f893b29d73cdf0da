// The change report of a handover revision against the previous issued one (issue 16), and the snapshot a
// revision stores for the next one to compare against. Pure.

export interface SectionSnap {
  id: string;
  route: string | null;
  from: number;
  to: number;
  status: string;
  /** a digest of the geometry's coordinates at 7 decimals */
  geom: string;
  /** duct metres by size, e.g. { "12/8": 120.5 } */
  ducts: Record<string, number>;
  /** depth readings on the section: count, min cover (m) */
  depth: { count: number; minCoverM: number | null };
}
export interface Snapshot {
  sections: SectionSnap[];
  /** address keys passed by the packaged sections */
  passed: string[];
}
export interface SectionChange {
  id: string;
  route: string | null;
  from: number;
  to: number;
  changed: ('geometry' | 'status' | 'ducts' | 'depth')[];
}
export interface ChangeReport {
  previousRevision: number | null;
  sectionsAdded: { id: string; route: string | null; from: number; to: number }[];
  sectionsRemoved: { id: string; route: string | null; from: number; to: number }[];
  sectionsChanged: SectionChange[];
  passedGained: string[];
  passedLost: string[];
}

const brief = (s: SectionSnap) => ({ id: s.id, route: s.route, from: s.from, to: s.to });
const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const bySection = (a: { route: string | null; from: number; id: string }, b: { route: string | null; from: number; id: string }) =>
  (a.route ?? '').localeCompare(b.route ?? '') || a.from - b.from || a.id.localeCompare(b.id);

export function changeReport(previous: { revision: number; snapshot: Snapshot } | null, current: Snapshot): ChangeReport {
  const prev = new Map((previous?.snapshot.sections ?? []).map((s) => [s.id, s]));
  const cur = new Map(current.sections.map((s) => [s.id, s]));
  const added = current.sections.filter((s) => !prev.has(s.id)).map(brief).sort(bySection);
  const removed = [...prev.values()].filter((s) => !cur.has(s.id)).map(brief).sort(bySection);
  const changed: SectionChange[] = [];
  for (const s of current.sections) {
    const p = prev.get(s.id);
    if (!p) continue;
    const what: SectionChange['changed'] = [];
    if (p.geom !== s.geom) what.push('geometry');
    if (p.status !== s.status) what.push('status');
    if (!same(p.ducts, s.ducts)) what.push('ducts');
    if (!same(p.depth, s.depth)) what.push('depth');
    if (what.length) changed.push({ ...brief(s), changed: what });
  }
  changed.sort(bySection);
  const pp = new Set(previous?.snapshot.passed ?? []);
  const cp = new Set(current.passed);
  return {
    previousRevision: previous?.revision ?? null,
    sectionsAdded: added,
    sectionsRemoved: removed,
    sectionsChanged: changed,
    passedGained: current.passed.filter((k) => !pp.has(k)).sort(),
    passedLost: [...pp].filter((k) => !cp.has(k)).sort(),
  };
}
