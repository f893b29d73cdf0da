import type { PlannedRouteInput, RouteGraph } from './types';

/** A position on a route: the route's index in the candidate index's route list, and metres along it. */
export interface RoutePosition {
  route: number;
  chainageM: number;
}

/**
 * The planned graph prepared for shortest paths: adjacency in flat arrays (CSR), each route's edges sorted
 * by chainage, and bounded Dijkstra results cached per source node.
 */
export interface RouteNetwork {
  /** graph edge indices of each route, by chainage; empty for routes the graph left out */
  routeEdges: number[][];
  edges: RouteGraph['edges'];
  adjStart: Int32Array;
  adjNode: Int32Array;
  adjLen: Float64Array;
  /** node → (bound searched, distances to every node settled within it) */
  cache: Map<number, { bound: number; dist: Map<number, number> }>;
  heapNode: number[];
  heapKey: number[];
}

// a walk seldom needs more than a few hundred source nodes; a full clear is cheaper than an LRU at this size
const CACHE_LIMIT = 4096;

/**
 * Prepares `graph` (built from the same routes, in any order) for routeDistanceM.
 * `makeRouteNetwork(buildRouteGraph(routes), routes).routeEdges[0]` → the edges of routes[0], by chainage
 */
export function makeRouteNetwork(graph: RouteGraph, routes: PlannedRouteInput[]): RouteNetwork {
  const byRef = new Map<string, number>();
  routes.forEach((r, i) => byRef.has(r.ref) || byRef.set(r.ref, i)); // the graph keeps the first of a duplicated ref
  const routeEdges = routes.map(() => [] as number[]);
  graph.edges.forEach((e, i) => {
    const k = byRef.get(e.ref);
    if (k !== undefined) routeEdges[k].push(i);
  });
  for (const list of routeEdges) list.sort((a, b) => graph.edges[a].fromChainageM - graph.edges[b].fromChainageM);
  const n = graph.nodes.length;
  const degree = new Int32Array(n + 1);
  for (const e of graph.edges) degree[e.fromNode]++, degree[e.toNode]++;
  const adjStart = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) adjStart[i + 1] = adjStart[i] + degree[i];
  const fill = adjStart.slice(0, n);
  const adjNode = new Int32Array(adjStart[n]);
  const adjLen = new Float64Array(adjStart[n]);
  for (const e of graph.edges) {
    (adjNode[fill[e.fromNode]] = e.toNode), (adjLen[fill[e.fromNode]++] = e.lengthM);
    (adjNode[fill[e.toNode]] = e.fromNode), (adjLen[fill[e.toNode]++] = e.lengthM);
  }
  return { routeEdges, edges: graph.edges, adjStart, adjNode, adjLen, cache: new Map(), heapNode: [], heapKey: [] };
}

/** The edge of `route` holding `chainageM` (binary search), or −1 when the route is not in the graph. */
function edgeAt(net: RouteNetwork, p: RoutePosition): number {
  const list = net.routeEdges[p.route];
  if (!list || list.length === 0) return -1;
  let [lo, hi] = [0, list.length - 1];
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (net.edges[list[mid]].fromChainageM <= p.chainageM) lo = mid;
    else hi = mid - 1;
  }
  return list[lo];
}

/** Dijkstra from `source`, settling nodes up to `bound` metres; a binary heap on the network's scratch arrays. */
function dijkstra(net: RouteNetwork, source: number, bound: number): Map<number, number> {
  const dist = new Map<number, number>([[source, 0]]);
  const settled = new Map<number, number>();
  const [hn, hk] = [net.heapNode, net.heapKey];
  hn.length = hk.length = 0;
  const push = (node: number, key: number) => {
    let i = hn.length;
    hn.push(node), hk.push(key);
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (hk[p] <= key) break;
      (hn[i] = hn[p]), (hk[i] = hk[p]), (i = p);
    }
    (hn[i] = node), (hk[i] = key);
  };
  const pop = () => {
    const node = hn[0];
    const [ln, lk] = [hn.pop()!, hk.pop()!];
    if (hn.length > 0) {
      let i = 0;
      for (;;) {
        let c = 2 * i + 1;
        if (c >= hn.length) break;
        if (c + 1 < hn.length && hk[c + 1] < hk[c]) c++;
        if (hk[c] >= lk) break;
        (hn[i] = hn[c]), (hk[i] = hk[c]), (i = c);
      }
      (hn[i] = ln), (hk[i] = lk);
    }
    return node;
  };
  push(source, 0);
  while (hn.length > 0) {
    const key = hk[0];
    const u = pop();
    if (settled.has(u)) continue;
    settled.set(u, key);
    for (let j = net.adjStart[u]; j < net.adjStart[u + 1]; j++) {
      const v = net.adjNode[j];
      const d = key + net.adjLen[j];
      if (d > bound || settled.has(v) || d >= (dist.get(v) ?? Infinity)) continue;
      dist.set(v, d);
      push(v, d);
    }
  }
  return settled;
}

/** Shortest distance between two nodes if it is ≤ bound, else Infinity; cached per source node. */
function nodeDistance(net: RouteNetwork, from: number, to: number, bound: number): number {
  if (from === to) return 0;
  let hit = net.cache.get(from);
  if (!hit || (hit.bound < bound && !hit.dist.has(to))) {
    if (net.cache.size >= CACHE_LIMIT) net.cache.clear();
    // searching twice as far as asked lets the next few queries from this node hit the cache
    const b = Math.max(bound, 2 * (hit?.bound ?? 0));
    hit = { bound: b, dist: dijkstra(net, from, b) };
    net.cache.set(from, hit);
  }
  const d = hit.dist.get(to);
  return d !== undefined && d <= bound ? d : Infinity;
}

/**
 * Network distance between two positions on the plan: |Δchainage| on one route; across routes the shortest
 * path over the graph from a's edge ends to b's edge ends. Paths longer than `boundM` count as unreachable
 * (Infinity), which keeps each search small.
 * `routeDistanceM(net, { route: 0, chainageM: 10 }, { route: 0, chainageM: 25 }, 100)` → 15
 */
export function routeDistanceM(net: RouteNetwork, a: RoutePosition, b: RoutePosition, boundM: number): number {
  if (a.route === b.route) {
    const d = Math.abs(a.chainageM - b.chainageM);
    return d <= boundM ? d : Infinity;
  }
  const [ea, eb] = [edgeAt(net, a), edgeAt(net, b)];
  if (ea < 0 || eb < 0) return Infinity;
  const [A, B] = [net.edges[ea], net.edges[eb]];
  const starts = [A.fromNode, Math.max(a.chainageM - A.fromChainageM, 0), A.toNode, Math.max(A.toChainageM - a.chainageM, 0)];
  const ends = [B.fromNode, Math.max(b.chainageM - B.fromChainageM, 0), B.toNode, Math.max(B.toChainageM - b.chainageM, 0)];
  let best = Infinity;
  for (let i = 0; i < 4; i += 2) {
    for (let j = 0; j < 4; j += 2) {
      const rest = Math.min(boundM, best) - starts[i + 1] - ends[j + 1];
      if (rest < 0) continue;
      const d = nodeDistance(net, starts[i], ends[j], rest);
      if (d !== Infinity) best = Math.min(best, starts[i + 1] + d + ends[j + 1]);
    }
  }
  return best <= boundM ? best : Infinity;
}
