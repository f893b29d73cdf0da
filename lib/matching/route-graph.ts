import Flatbush from 'flatbush';
import { chainageAtFraction, frameScale, frameXY, lineLengthM, pointAtChainage, type XY } from './chainage';
import { coverage } from './coverage';
import type { Diagnostic, GraphEdge, GraphNode, LonLat, PlannedRouteInput, RouteGraph } from './types';

// at the default 0.5 m snap a right-angle crossing is within snapM for exactly 1 m: the millimetre keeps it out
const OVERLAP_M = 1.001;

interface Route {
  input: PlannedRouteInput;
  xy: XY[];
  lengthM: number;
  nodeAt: [number, number];
}

/**
 * Union–find over endpoint indices; a join keeps the smaller index as root, which keeps ids stable.
 * (A class, not closures made per graph: V8 keeps a method's optimised code from graph to graph.)
 */
class UnionFind {
  readonly parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(i: number): number {
    let root = i;
    while (this.parent[root] !== root) root = this.parent[root];
    // path compression, as the recursive form does: every node on the way points at the root
    while (this.parent[i] !== root) {
      const next = this.parent[i];
      this.parent[i] = root;
      i = next;
    }
    return root;
  }
  union(a: number, b: number): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra !== rb) this.parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }
}

/** Nearest point of a planar polyline to p: its distance, how far along (of how long) it lies, and on which segment at which fraction. */
function nearestPlanar(xy: XY[], p: XY): { distance: number; along: number; length: number; segment: number; t: number } {
  const px = p[0];
  const py = p[1];
  let distance = Infinity;
  let along = 0;
  let base = 0;
  let segment = 0;
  let fraction = 0;
  for (let i = 0; i + 1 < xy.length; i++) {
    const ax = xy[i][0];
    const ay = xy[i][1];
    const dx = xy[i + 1][0] - ax;
    const dy = xy[i + 1][1] - ay;
    const l2 = dx * dx + dy * dy;
    const t = l2 > 0 ? Math.min(Math.max(((px - ax) * dx + (py - ay) * dy) / l2, 0), 1) : 0;
    const d = Math.hypot(ax + t * dx - px, ay + t * dy - py);
    if (d < distance) (distance = d), (along = base + t * Math.sqrt(l2)), (segment = i), (fraction = t);
    base += Math.sqrt(l2);
  }
  return { distance, along, length: base, segment, t: fraction };
}

/** duplicate: each line within snapM of the other everywhere; overlap: both run within snapM of each other for > 1 m. */
function pairDiagnostics(rs: Route[], index: Flatbush, segRoute: number[], snapM: number): Diagnostic[] {
  const out: Diagnostic[] = [];
  rs.forEach((a, i) => {
    const partners = new Set<number>();
    for (let s = 0; s + 1 < a.xy.length; s++) {
      const [p, q] = [a.xy[s], a.xy[s + 1]];
      for (const hit of index.search(Math.min(p[0], q[0]) - snapM, Math.min(p[1], q[1]) - snapM, Math.max(p[0], q[0]) + snapM, Math.max(p[1], q[1]) + snapM)) {
        if (segRoute[hit] > i) partners.add(segRoute[hit]);
      }
    }
    for (const j of [...partners].sort((x, y) => x - y)) {
      const b = rs[j];
      const [ab, ba] = [coverage(a.xy, b.xy, snapM), coverage(b.xy, a.xy, snapM)];
      const refs = [a.input.ref, b.input.ref];
      // planar chainage stands in for the geodesic one: a pointer for the eye, off by far less than snapM
      const where = pointAtChainage(a.input.coords, (ab.firstM + ab.lastM) / 2);
      if (ab.full && ba.full) {
        out.push({ kind: 'duplicate', refs, position: where, message: `${refs[0]} and ${refs[1]} have the same geometry (within ${snapM} m)` });
      } else if (Math.min(ab.coveredM, ba.coveredM) > OVERLAP_M) {
        const m = Math.min(ab.coveredM, ba.coveredM).toFixed(1);
        out.push({ kind: 'overlap', refs, position: where, message: `${refs[0]} and ${refs[1]} run within ${snapM} m of each other for ${m} m` });
      }
    }
  });
  return out;
}

/** whether the line has at least two distinct positions */
const twoPositions = (coords: LonLat[]) => coords.some((c) => c[0] !== coords[0][0] || c[1] !== coords[0][1]);

/**
 * The routes that go into the graph: the first of each ref, with at least two distinct positions and 1 cm of
 * length; a diagnostic for each left out.
 */
function validRoutes(routes: PlannedRouteInput[], diagnostics: Diagnostic[]): { input: PlannedRouteInput; lengthM: number }[] {
  const count = new Map<string, number>();
  for (const r of routes) count.set(r.ref, (count.get(r.ref) ?? 0) + 1);
  const kept = new Map<string, PlannedRouteInput>();
  for (const r of routes) {
    if (!kept.has(r.ref)) kept.set(r.ref, r);
    else if (count.get(r.ref)! > 1) {
      const message = `${r.ref} appears ${count.get(r.ref)} times in the plan; only the first is in the graph`;
      diagnostics.push({ kind: 'duplicate_ref', refs: [r.ref], position: r.coords[0] ?? [0, 0], message });
      count.set(r.ref, 0); // once per ref
    }
  }
  const valid: { input: PlannedRouteInput; lengthM: number }[] = [];
  for (const r of kept.values()) {
    const two = twoPositions(r.coords);
    const lengthM = two ? lineLengthM(r.coords) : 0;
    if (two && lengthM >= 0.01) valid.push({ input: r, lengthM });
    else {
      const why = !two ? 'has fewer than 2 distinct positions' : `is ${lengthM.toFixed(3)} m long`;
      diagnostics.push({ kind: 'zero_length', refs: [r.ref], position: r.coords[0] ?? [0, 0], message: `${r.ref} ${why}; it is left out of the graph` });
    }
  }
  return valid;
}

/** The routes in one equirectangular frame about the centre of their extent. */
function inFrame(valid: { input: PlannedRouteInput; lengthM: number }[]): Route[] {
  let minLon = Infinity;
  let minLat = Infinity;
  let maxLon = -Infinity;
  let maxLat = -Infinity;
  for (const r of valid) {
    for (const c of r.input.coords) (minLon = Math.min(minLon, c[0])), (minLat = Math.min(minLat, c[1])), (maxLon = Math.max(maxLon, c[0])), (maxLat = Math.max(maxLat, c[1]));
  }
  const frame = frameScale([(minLon + maxLon) / 2, (minLat + maxLat) / 2]);
  // (arrays pushed to, not made by `map`: the kind of array `map` makes depends on whether V8 runs it
  // optimised, and the phases after this, optimised for one kind, would be thrown back by the other)
  const rs: Route[] = [];
  for (const { input, lengthM } of valid) {
    const xy: XY[] = [];
    for (const c of input.coords) xy.push(frameXY(frame, c));
    rs.push({ input, xy, lengthM, nodeAt: [-1, -1] });
  }
  return rs;
}

/** A route's start (e = 2k) or end (e = 2k + 1) as given. */
const endLonLat = (rs: Route[], e: number): LonLat => (e % 2 === 0 ? rs[e >> 1].input.coords[0] : rs[e >> 1].input.coords[rs[e >> 1].input.coords.length - 1]);

// buildRouteGraph's phases are functions of their own: V8 optimises a small function's loops quickly and
// keeps the code from graph to graph, where one large function would run them unoptimised while it compiles

/** One flatbush index over every segment of the routes; segment ids map back through segRoute/segStart. */
function segmentIndex(rs: Route[]): { index: Flatbush; segRoute: number[] } {
  const segRoute: number[] = [];
  const segStart: number[] = [];
  for (let k = 0; k < rs.length; k++) for (let i = 0; i + 1 < rs[k].xy.length; i++) segRoute.push(k), segStart.push(i);
  const index = new Flatbush(segRoute.length);
  for (let s = 0; s < segRoute.length; s++) {
    const p = rs[segRoute[s]].xy[segStart[s]];
    const q = rs[segRoute[s]].xy[segStart[s] + 1];
    index.add(Math.min(p[0], q[0]), Math.min(p[1], q[1]), Math.max(p[0], q[0]), Math.max(p[1], q[1]));
  }
  index.finish();
  return { index, segRoute };
}

/**
 * Joins the endpoints within snapM of each other in `uf`, and an endpoint near another route's end onto that
 * end; returns the endpoints that land on another route's interior (T-junctions), with where on it.
 */
function endpointJoins(rs: Route[], index: Flatbush, segRoute: number[], snapM: number, uf: UnionFind): { e: number; route: number; chainageM: number; distanceM: number }[] {
  // endpoint e = 2k (start of route k) or 2k + 1 (its end), its position in the frame in columns
  const endX = new Float64Array(rs.length * 2);
  const endY = new Float64Array(rs.length * 2);
  for (let k = 0; k < rs.length; k++) {
    const xy = rs[k].xy;
    (endX[2 * k] = xy[0][0]), (endY[2 * k] = xy[0][1]), (endX[2 * k + 1] = xy[xy.length - 1][0]), (endY[2 * k + 1] = xy[xy.length - 1][1]);
  }
  const hits: { e: number; route: number; chainageM: number; distanceM: number }[] = [];
  for (let e = 0; e < rs.length * 2; e++) {
    const x = endX[e];
    const y = endY[e];
    // the routes with a segment in reach, once each, in the index's order
    const candidates = new Set<number>();
    for (const seg of index.search(x - snapM, y - snapM, x + snapM, y + snapM)) candidates.add(segRoute[seg]);
    for (const k of candidates) {
      const other = rs[k];
      for (let f = 2 * k; f <= 2 * k + 1; f++) {
        if (f !== e && Math.hypot(endX[f] - x, endY[f] - y) <= snapM) uf.union(e, f);
      }
      if (k === e >> 1) continue;
      const foot = nearestPlanar(other.xy, [x, y]);
      if (foot.distance > snapM) continue;
      // a foot within snapM of the other route's end joins that end: no sliver edges shorter than snapM
      if (foot.along <= snapM || foot.along >= foot.length - snapM) {
        uf.union(e, 2 * foot.along < foot.length ? 2 * k : 2 * k + 1);
        continue;
      }
      // the candidate search's arithmetic: geodesic chainage at the vertices, the planar fraction within the
      // segment (≪ 1 mm off on a city's segments); a geodesic projection here cost 15 µs a junction
      hits.push({ e, route: k, chainageM: chainageAtFraction(other.input.coords, foot.segment, foot.t), distanceM: foot.distance });
    }
  }
  return hits;
}

/** Each route's T-junction hits by chainage; several endpoints snapping onto one route at (nearly) one place are joined in `uf`: one junction. */
function junctionSplits(routes: number, hits: { e: number; route: number; chainageM: number; distanceM: number }[], snapM: number, uf: UnionFind): { chainageM: number; e: number; distanceM: number }[][] {
  const splits: { chainageM: number; e: number; distanceM: number }[][] = [];
  for (let k = 0; k < routes; k++) splits.push([]);
  for (const h of hits) splits[h.route].push(h);
  for (const list of splits) {
    list.sort((a, b) => a.chainageM - b.chainageM || a.distanceM - b.distanceM);
    for (let i = 1; i < list.length; i++) if (list[i].chainageM - list[i - 1].chainageM <= snapM) uf.union(list[i - 1].e, list[i].e);
  }
  return splits;
}

/** One node per set of joined endpoints, at their mean position, listing each route end at it; sets each route's nodeAt. */
function graphNodes(rs: Route[], uf: UnionFind): { nodes: GraphNode[]; nodeOf: Map<number, number> } {
  const nodeOf = new Map<number, number>();
  const nodes: GraphNode[] = [];
  const members: number[][] = [];
  for (let e = 0; e < rs.length * 2; e++) {
    const root = uf.find(e);
    if (!nodeOf.has(root)) {
      nodeOf.set(root, nodes.length);
      nodes.push({ id: nodes.length, position: [0, 0], routes: [] });
      members.push([]);
    }
    const id = nodeOf.get(root)!;
    members[id].push(e);
    rs[e >> 1].nodeAt[e % 2] = id;
    nodes[id].routes.push({ ref: rs[e >> 1].input.ref, chainageM: e % 2 === 0 ? 0 : rs[e >> 1].lengthM });
  }
  for (let id = 0; id < nodes.length; id++) {
    let lon = 0;
    let lat = 0;
    for (const e of members[id]) (lon += endLonLat(rs, e)[0]), (lat += endLonLat(rs, e)[1]);
    nodes[id].position = [lon / members[id].length, lat / members[id].length];
  }
  return { nodes, nodeOf };
}

/** Each route's edges, cut at its T-junctions (one cut per node, the nearest endpoint's); adds the cuts to their nodes' lists. */
function graphEdges(rs: Route[], splits: { chainageM: number; e: number; distanceM: number }[][], nodes: GraphNode[], nodeOf: Map<number, number>, uf: UnionFind): GraphEdge[] {
  const edges: GraphEdge[] = [];
  for (let k = 0; k < rs.length; k++) {
    const r = rs[k];
    const cuts = [{ chainageM: 0, node: r.nodeAt[0] }];
    const byNode = new Map<number, { chainageM: number; distanceM: number }>();
    for (const h of splits[k]) {
      const id = nodeOf.get(uf.find(h.e))!;
      const prev = byNode.get(id);
      if (!prev || h.distanceM < prev.distanceM) byNode.set(id, h);
    }
    for (const [node, h] of [...byNode].sort((a, b) => a[1].chainageM - b[1].chainageM)) {
      cuts.push({ chainageM: h.chainageM, node });
      nodes[node].routes.push({ ref: r.input.ref, chainageM: h.chainageM });
    }
    cuts.push({ chainageM: r.lengthM, node: r.nodeAt[1] });
    for (let i = 1; i < cuts.length; i++) {
      const a = cuts[i - 1];
      const b = cuts[i];
      edges.push({ ref: r.input.ref, fromNode: a.node, toNode: b.node, fromChainageM: a.chainageM, toChainageM: b.chainageM, lengthM: b.chainageM - a.chainageM });
    }
  }
  return edges;
}

/**
 * A diagnostic for each route end that meets no other route. A road crossing joined at one end is left out:
 * its other end is at the house (or the property line) across the street, where nothing else is planned to
 * join. A crossing that joins nothing at either end is reported at both.
 */
function danglingEnds(rs: Route[], nodes: GraphNode[]): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (let e = 0; e < rs.length * 2; e++) {
    const node = nodes[rs[e >> 1].nodeAt[e % 2]];
    if (node.routes.length > 1) continue;
    if (rs[e >> 1].input.kind === 'crossing' && nodes[rs[e >> 1].nodeAt[1 - (e % 2)]].routes.length > 1) continue;
    const ref = rs[e >> 1].input.ref;
    out.push({ kind: 'dangling_end', refs: [ref], position: node.position, message: `${ref} ends without joining another route (at its ${e % 2 === 0 ? 'start' : 'end'})` });
  }
  return out;
}

/**
 * Joins the planned routes into a graph. Endpoints within `snapM` of each other become one node; an
 * endpoint within `snapM` of another route's interior splits that route there (a T-junction). Every
 * problem is a diagnostic, never an exception.
 *
 * Snap and overlap decisions are planar, in one equirectangular frame about the network's centre: at
 * city scale (10 km across) its scale error stays under 0.1 %, i.e. < 0.5 mm on a 0.5 m snap. Chainages
 * and lengths are geodesic (a T-junction's within its segment by the planar fraction, as the candidate
 * search interpolates: well under 1 mm off). Route crossings without an endpoint are not junctions (a road crossing is
 * drawn as its own route ending on both streets). `pairChecks: false` leaves out the duplicate and overlap
 * diagnostics (a pairwise comparison of lines), which a reconciliation does not report.
 * `buildRouteGraph([{ ref: 'A', coords: [[0, 0], [0.001, 0]], … }]).edges` → `[{ ref: 'A', fromNode: 0, toNode: 1, … }]`
 */
export function buildRouteGraph(routes: PlannedRouteInput[], opts: { snapM?: number; pairChecks?: boolean } = {}): RouteGraph {
  const snapM = opts.snapM ?? 0.5;
  const diagnostics: Diagnostic[] = [];
  const valid = validRoutes(routes, diagnostics);
  if (valid.length === 0) return { nodes: [], edges: [], diagnostics };
  const rs = inFrame(valid);

  const { index, segRoute } = segmentIndex(rs);
  const uf = new UnionFind(rs.length * 2);
  const hits = endpointJoins(rs, index, segRoute, snapM, uf);
  const splits = junctionSplits(rs.length, hits, snapM, uf);

  const { nodes, nodeOf } = graphNodes(rs, uf);
  const edges = graphEdges(rs, splits, nodes, nodeOf, uf);

  // duplicated and overlapping lines are for the engineer's import report; the matcher only needs the graph
  if (opts.pairChecks !== false) diagnostics.push(...pairDiagnostics(rs, index, segRoute, snapM));
  for (const d of danglingEnds(rs, nodes)) diagnostics.push(d);
  return { nodes, edges, diagnostics };
}
