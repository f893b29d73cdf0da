import type { SectionDraft } from './section-types';
import type { LonLat } from './types';

export interface ExistingSection {
  id: string;
  ref: string | null;
  fromChainageM: number;
  toChainageM: number;
  coords: LonLat[];
  status: string;
}

export interface SectionIdentity {
  /** the draft takes over this existing id, or gets a new one */
  keepId: string | null;
  /** for a new id: the existing section it came from (split, extension) */
  derivedFrom: string | null;
  /** the geometry or status differs from what the kept section had */
  changed: boolean;
}

const M_PER_DEG = 111_320;

function bbox(c: LonLat[]): [number, number, number, number] {
  let [w, s, e, n] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const [x, y] of c) [w, s, e, n] = [Math.min(w, x), Math.min(s, y), Math.max(e, x), Math.max(n, y)];
  return [w, s, e, n];
}

/** How much two stretches share: along the route by chainage, or for unplanned ones by their boxes (grown 5 m). */
function overlap(a: { ref: string | null; fromChainageM: number; toChainageM: number; coords: LonLat[] }, b: ExistingSection): number {
  if (a.ref !== b.ref) return 0;
  if (a.ref !== null) return Math.max(0, Math.min(a.toChainageM, b.toChainageM) - Math.max(a.fromChainageM, b.fromChainageM));
  const pad = 5 / M_PER_DEG;
  const [aw, as, ae, an] = bbox(a.coords);
  const [bw, bs, be, bn] = bbox(b.coords);
  const dx = Math.min(ae, be) + pad - (Math.max(aw, bw) - pad);
  const dy = Math.min(an, bn) + pad - (Math.max(as, bs) - pad);
  return dx > 0 && dy > 0 ? Math.max(dx, dy) * M_PER_DEG : 0;
}

/** Two lines are the same when they have as many vertices and none moved more than `tolM` (equirectangular metres). */
export function sameLine(a: LonLat[], b: LonLat[], tolM = 0.05): boolean {
  if (a.length !== b.length) return false;
  return a.every(([x, y], i) => {
    const k = Math.cos((y * Math.PI) / 180);
    return Math.hypot((x - b[i][0]) * M_PER_DEG * k, (y - b[i][1]) * M_PER_DEG) <= tolM;
  });
}

/**
 * Which new drafts are the same stretches as existing sections, so ids last across re-runs: a draft keeps
 * the id of the existing section it shares at least half of (the larger's length) with, each id at most
 * once, best overlaps first; any other draft gets a new id linked to the section it overlaps most.
 */
export function matchSections(drafts: SectionDraft[], existing: ExistingSection[]): SectionIdentity[] {
  const pairs: { d: number; e: number; shared: number }[] = [];
  drafts.forEach((d, di) =>
    existing.forEach((e, ei) => {
      const shared = overlap(d, e);
      if (shared > 0) pairs.push({ d: di, e: ei, shared });
    }),
  );
  pairs.sort((x, y) => y.shared - x.shared || x.d - y.d || x.e - y.e);
  const out: SectionIdentity[] = drafts.map(() => ({ keepId: null, derivedFrom: null, changed: true }));
  const taken = new Set<number>();
  for (const p of pairs) {
    const d = drafts[p.d];
    const e = existing[p.e];
    const len = Math.max(d.toChainageM - d.fromChainageM, e.toChainageM - e.fromChainageM);
    if (out[p.d].keepId || taken.has(p.e) || p.shared < 0.5 * len) continue;
    taken.add(p.e);
    out[p.d] = { keepId: e.id, derivedFrom: null, changed: d.status !== e.status || !sameLine(d.coords, e.coords) };
  }
  for (const p of pairs) if (!out[p.d].keepId && !out[p.d].derivedFrom) out[p.d].derivedFrom = existing[p.e].id;
  return out;
}
