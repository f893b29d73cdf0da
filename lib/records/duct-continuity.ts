import { bundleSummary, sizeText } from './duct-spec';

/**
 * Duct continuity along a route. A microduct laid in the trench keeps its colour, its position in the
 * bundle and its size from one installed stretch to the next, unless a joint or connector is recorded
 * where the stretches meet: a change anywhere else means the records disagree with what lies in the
 * ground (or a coupling nobody recorded), and the cable blown in later meets it. Each connector is also
 * a place where blowing slows: fewer is better, so they are counted per route and per duct.
 */

export interface ContinuityDuct {
  position: number;
  colourPosition: number | null;
  colourLabel: string | null;
  outerMm: number;
  innerMm: number | null;
}

export interface ContinuityBundle {
  id: string;
  fromChainageM: number;
  toChainageM: number;
  ducts: ContinuityDuct[];
}

export interface ContinuityJoint {
  id: string;
  chainageM: number;
  kind: 'joint' | 'connector';
  /** the duct positions it joins */
  positions: number[];
}

export type DuctChangeKind = 'colour' | 'size' | 'ends' | 'starts';

export interface DuctChange {
  position: number;
  kind: DuctChangeKind;
  before: string | null;
  after: string | null;
}

/** A boundary between two installed stretches where some duct changes with no joint recorded for it. */
export interface ContinuityBreak {
  /** where the earlier stretch ends and the later one starts (equal when they meet) */
  fromChainageM: number;
  toChainageM: number;
  beforeBundleId: string;
  afterBundleId: string;
  changes: DuctChange[];
  message: string;
}

/** How far (m) a joint may lie from the boundary and still count for it: a chainage typed from a tape. */
export const JOINT_TOLERANCE_M = 1;

const colourOf = (d: ContinuityDuct | undefined) => (d ? (d.colourLabel ?? 'no colour recorded') : null);
const sizeOf = (d: ContinuityDuct) => sizeText(d.outerMm, d.innerMm);
/** Plan sizes without an inner diameter match any inner; recorded ones must agree. */
const sameSize = (a: ContinuityDuct, b: ContinuityDuct) => a.outerMm === b.outerMm && (a.innerMm === null || b.innerMm === null || a.innerMm === b.innerMm);
const m1 = (m: number) => `${m.toFixed(1)} m`;

function describeChange(c: DuctChange): string {
  switch (c.kind) {
    case 'colour':
      return `duct ${c.position} is ${c.before} before and ${c.after} after`;
    case 'size':
      return `duct ${c.position} changes from ${c.before} to ${c.after}`;
    case 'ends':
      return `duct ${c.position} (${c.before}) ends`;
    case 'starts':
      return `duct ${c.position} (${c.after}) starts`;
  }
}

/** What changes from bundle a to bundle b, position by position (colour before size: one change per duct). */
export function ductChanges(a: ContinuityDuct[], b: ContinuityDuct[]): DuctChange[] {
  const byA = new Map(a.map((d) => [d.position, d]));
  const byB = new Map(b.map((d) => [d.position, d]));
  const positions = [...new Set([...byA.keys(), ...byB.keys()])].sort((x, y) => x - y);
  const out: DuctChange[] = [];
  for (const p of positions) {
    const da = byA.get(p);
    const db = byB.get(p);
    if (da && !db) out.push({ position: p, kind: 'ends', before: colourOf(da), after: null });
    else if (!da && db) out.push({ position: p, kind: 'starts', before: null, after: colourOf(db) });
    else if (da && db && da.colourPosition !== db.colourPosition) out.push({ position: p, kind: 'colour', before: colourOf(da), after: colourOf(db) });
    else if (da && db && !sameSize(da, db)) out.push({ position: p, kind: 'size', before: sizeOf(da), after: sizeOf(db) });
  }
  return out;
}

/**
 * The breaks along one route: installed bundles in chainage order, each compared with the next; a duct
 * that changes is excused by a joint within JOINT_TOLERANCE_M of the boundary that names its position.
 */
export function continuityBreaks(bundles: ContinuityBundle[], joints: ContinuityJoint[], toleranceM = JOINT_TOLERANCE_M): ContinuityBreak[] {
  const ordered = [...bundles].sort((x, y) => x.fromChainageM - y.fromChainageM || x.toChainageM - y.toChainageM);
  const out: ContinuityBreak[] = [];
  for (let i = 1; i < ordered.length; i++) {
    const a = ordered[i - 1];
    const b = ordered[i];
    const lo = Math.min(a.toChainageM, b.fromChainageM);
    const hi = Math.max(a.toChainageM, b.fromChainageM);
    const here = joints.filter((j) => j.chainageM >= lo - toleranceM && j.chainageM <= hi + toleranceM);
    const joined = new Set(here.flatMap((j) => j.positions));
    const changes = ductChanges(a.ducts, b.ducts).filter((c) => !joined.has(c.position));
    if (changes.length === 0) continue;
    const where = lo === hi ? `At ${m1(lo)}` : `Between ${m1(lo)} and ${m1(hi)}`;
    out.push({
      fromChainageM: lo,
      toChainageM: hi,
      beforeBundleId: a.id,
      afterBundleId: b.id,
      changes,
      message: `${where}: ${changes.map(describeChange).join('; ')}, with no joint or connector recorded there.`,
    });
  }
  return out;
}

export interface ConnectorCount {
  /** joint records of kind 'connector' and 'joint' */
  connectors: number;
  joints: number;
  /** per duct position, how many joints or connectors it passes through */
  perDuct: { position: number; count: number }[];
  /** the most any one duct passes through: what the cable blown into it meets */
  worstDuct: number;
}

/** Connectors and joints on a route, and per duct. */
export function countConnectors(joints: ContinuityJoint[]): ConnectorCount {
  const per = new Map<number, number>();
  for (const j of joints) for (const p of new Set(j.positions)) per.set(p, (per.get(p) ?? 0) + 1);
  const perDuct = [...per.entries()].sort((a, b) => a[0] - b[0]).map(([position, count]) => ({ position, count }));
  return {
    connectors: joints.filter((j) => j.kind === 'connector').length,
    joints: joints.filter((j) => j.kind === 'joint').length,
    perDuct,
    worstDuct: perDuct.reduce((n, d) => Math.max(n, d.count), 0),
  };
}

export interface PlannedLike {
  fromChainageM: number;
  toChainageM: number;
  ducts: { outerMm: number; innerMm: number | null }[];
}

export interface AgainstPlan {
  status: 'matches' | 'differs' | 'no_plan';
  planned: string | null;
  installed: string;
  countDiffers: boolean;
  sizesDiffer: boolean;
  message: string;
}

const sizeKey = (d: { outerMm: number; innerMm: number | null }) => `${d.outerMm}`;
const fullKey = (d: { outerMm: number; innerMm: number | null }) => `${d.outerMm}/${d.innerMm}`;

/**
 * An installed stretch against the planned bundle(s) it overlaps (the one overlapping most): the number of
 * ducts and their sizes (as multisets; inner diameters only compared where the plan gives them).
 */
export function installedAgainstPlanned(installed: PlannedLike, planned: PlannedLike[]): AgainstPlan {
  const inst = bundleSummary(installed.ducts);
  const overlap = (p: PlannedLike) => Math.min(p.toChainageM, installed.toChainageM) - Math.max(p.fromChainageM, installed.fromChainageM);
  const best = planned.filter((p) => overlap(p) > 0).sort((x, y) => overlap(y) - overlap(x))[0];
  if (!best) return { status: 'no_plan', planned: null, installed: inst, countDiffers: false, sizesDiffer: false, message: 'The plan gives no ducts here.' };
  const plan = bundleSummary(best.ducts);
  const countDiffers = best.ducts.length !== installed.ducts.length;
  const planHasInner = best.ducts.every((d) => d.innerMm !== null);
  const key = planHasInner ? fullKey : sizeKey;
  const kinds = (ds: { outerMm: number; innerMm: number | null }[]) => [...new Set(ds.map(key))].sort().join(',');
  const sorted = (ds: { outerMm: number; innerMm: number | null }[]) => ds.map(key).sort().join(',');
  // with the counts equal, the sizes must pair up one for one; with them different, the same sizes must be used
  const sizesDiffer = kinds(best.ducts) !== kinds(installed.ducts) || (!countDiffers && sorted(best.ducts) !== sorted(installed.ducts));
  const parts: string[] = [];
  if (countDiffers) parts.push(`${installed.ducts.length} ducts laid where the plan has ${best.ducts.length}`);
  if (sizesDiffer) parts.push(`sizes ${inst} against the plan's ${plan}`);
  return {
    status: parts.length ? 'differs' : 'matches',
    planned: plan,
    installed: inst,
    countDiffers,
    sizesDiffer,
    message: parts.length ? `${parts.join('; ')}.` : 'As planned.',
  };
}
