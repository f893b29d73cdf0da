import type { PlannedRouteInput, RouteGraph } from './types';

/**
 * The planned graph prepared for shortest paths: adjacency in flat arrays (CSR), each route's edges sorted
 * by chainage, and bounded Dijkstra results cached per source node.
 */
export interface RouteNetwork {
  /**
   * graph edge indices of each route, by chainage, flat: route k's are routeEdgeList[routeEdgeStart[k] …
   * routeEdgeStart[k + 1] − 1], none for routes the graph left out; with each edge's chainages, so that the
   * hot lookups read no objects
   */
  routeEdgeStart: Int32Array;
  routeEdgeList: Int32Array;
  edgeFrom: Float64Array;
  edgeTo: Float64Array;
  /** each edge's from and to node */
  edgeFromNode: Int32Array;
  edgeToNode: Int32Array;
  /**
   * 1 for a node only one edge meets (a crossing's far end): a path between two edges never runs through
   * it, since leaving it means going back along its one edge
   */
  deadEnd: Uint8Array;
  edges: RouteGraph['edges'];
  adjStart: Int32Array;
  adjNode: Int32Array;
  adjLen: Float64Array;
  /**
   * per source node: the bound searched (−1: not searched), and where in the pool its search's settled
   * nodes lie (sorted by id, with their distances); `cached` counts the sources held
   */
  sourceBound: Float64Array;
  sourceStart: Int32Array;
  sourceCount: Int32Array;
  poolNode: Int32Array;
  poolDist: Float64Array;
  poolUsed: number;
  cached: number;
  /** Dijkstra's scratch, stamped per search: tentative distances, and whether a node is settled */
  seen: Int32Array;
  done: Int32Array;
  tentative: Float64Array;
  settledOrder: Int32Array;
  searches: number;
  /**
   * Edge pairs, direct-mapped (a slot per hash of the pair, the newest pair wins it), 8 numbers a slot so
   * that one probe reads one cache line: edge A, edge B, the bound the distances hold to, then the node
   * distances from A's from/to node to B's from/to node, each exact where ≤ the bound, Infinity beyond,
   * NaN until first needed.
   * Consecutive fixes mostly share their candidates' edges, so a transition is one probe, not four searches.
   */
  pairMask: number;
  pairs: Float64Array;
  /**
   * Node pairs, direct-mapped like the edge pairs: from, to (keys, 2 a slot), and what is known of their
   * distance, which stays true whatever the caches forget: the exact distance (≥ 0), or −1 with the bound
   * it is known to exceed. One probe instead of a binary search in the source's settled nodes.
   */
  nodeMask: number;
  nodeKeys: Int32Array;
  nodeDist: Float64Array;
  nodeBound: Float64Array;
  /** Dijkstra's binary heap (lazy deletion: at most one entry per relaxation, so 2 × edges + 1 slots) */
  heapNode: Int32Array;
  heapKey: Float64Array;
  /** where positionDistanceInto writes its answer ([0]), and a spare slot for a caller's bound ([1]) */
  distance: Float64Array;
}

// a walk seldom needs more than a few hundred source nodes; a full clear is cheaper than an LRU at this size
const CACHE_LIMIT = 4096;
// …and at most this many settled nodes in all (≈ 6 MB), cleared as a whole like the sources
const POOL_LIMIT = 1 << 19;
// the smallest bound a pair's distances are found to: most transitions ask for ~70 m (4 × a 1 Hz step + 50)
const PAIR_MIN_BOUND_M = 128;

/**
 * Prepares `graph` (built from the same routes, in any order) for network distances (positionDistanceInto).
 * `edgeAtChainage(makeRouteNetwork(buildRouteGraph(routes), routes), 0, 0)` → the first edge of routes[0]
 */
export function makeRouteNetwork(graph: RouteGraph, routes: PlannedRouteInput[]): RouteNetwork {
  const byRef = new Map<string, number>();
  routes.forEach((r, i) => byRef.has(r.ref) || byRef.set(r.ref, i)); // the graph keeps the first of a duplicated ref
  // (plain loops: this runs once a reconciliation, mostly before V8 has optimised it, and a typed array's
  // `from` with a mapping function is several times slower there than a loop)
  const E = graph.edges.length;
  const edgeFrom = new Float64Array(E);
  const edgeTo = new Float64Array(E);
  const edgeFromNode = new Int32Array(E);
  const edgeToNode = new Int32Array(E);
  // each route's edges by chainage: counted, placed, then each route's run sorted
  const edgeRoute = new Int32Array(E);
  const routeEdgeStart = new Int32Array(routes.length + 1);
  for (let i = 0; i < E; i++) {
    const e = graph.edges[i];
    (edgeFrom[i] = e.fromChainageM), (edgeTo[i] = e.toChainageM), (edgeFromNode[i] = e.fromNode), (edgeToNode[i] = e.toNode);
    const k = byRef.get(e.ref);
    edgeRoute[i] = k === undefined ? -1 : k;
    if (k !== undefined) routeEdgeStart[k + 1]++;
  }
  for (let k = 0; k < routes.length; k++) routeEdgeStart[k + 1] += routeEdgeStart[k];
  const routeEdgeList = new Int32Array(routeEdgeStart[routes.length]);
  const placedSoFar = routeEdgeStart.slice(0, routes.length);
  for (let i = 0; i < E; i++) if (edgeRoute[i] >= 0) routeEdgeList[placedSoFar[edgeRoute[i]]++] = i;
  for (let k = 0; k < routes.length; k++) {
    // a stable insertion sort by from-chainage: a route has a handful of edges, mostly in order already
    for (let a = routeEdgeStart[k] + 1; a < routeEdgeStart[k + 1]; a++) {
      const e = routeEdgeList[a];
      let b = a;
      for (; b > routeEdgeStart[k] && edgeFrom[routeEdgeList[b - 1]] > edgeFrom[e]; b--) routeEdgeList[b] = routeEdgeList[b - 1];
      routeEdgeList[b] = e;
    }
  }
  const n = graph.nodes.length;
  const degree = new Int32Array(n + 1);
  for (let i = 0; i < E; i++) degree[edgeFromNode[i]]++, degree[edgeToNode[i]]++;
  const adjStart = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) adjStart[i + 1] = adjStart[i] + degree[i];
  const deadEnd = new Uint8Array(n);
  for (let i = 0; i < n; i++) deadEnd[i] = degree[i] === 1 ? 1 : 0;
  const fill = adjStart.slice(0, n);
  const adjNode = new Int32Array(adjStart[n]);
  const adjLen = new Float64Array(adjStart[n]);
  for (let i = 0; i < E; i++) {
    const a = edgeFromNode[i];
    const b = edgeToNode[i];
    const length = graph.edges[i].lengthM;
    (adjNode[fill[a]] = b), (adjLen[fill[a]++] = length);
    (adjNode[fill[b]] = a), (adjLen[fill[b]++] = length);
  }
  // about 32 slots an edge, at most 16,384 (1 MB of edge pairs, 0.4 MB of node pairs): a walk's neighbourhood
  // stays in them. On bench:match's 3,907 edges, 4,096 to 131,072 slots match equally fast, and a small
  // table stays in the processor's cache
  const slots = Math.min(1 << 14, Math.max(256, 2 ** Math.ceil(Math.log2(32 * graph.edges.length + 1))));
  return {
    routeEdgeStart, routeEdgeList, edgeFrom, edgeTo, edgeFromNode, edgeToNode, deadEnd, edges: graph.edges, adjStart, adjNode, adjLen,
    sourceBound: new Float64Array(n).fill(-1), sourceStart: new Int32Array(n), sourceCount: new Int32Array(n),
    poolNode: new Int32Array(1024), poolDist: new Float64Array(1024), poolUsed: 0, cached: 0,
    seen: new Int32Array(n), done: new Int32Array(n), tentative: new Float64Array(n), settledOrder: new Int32Array(n), searches: 0,
    pairMask: slots - 1, pairs: new Float64Array(8 * slots).fill(-1),
    nodeMask: slots - 1, nodeKeys: new Int32Array(2 * slots).fill(-1), nodeDist: new Float64Array(slots), nodeBound: new Float64Array(slots),
    heapNode: new Int32Array(2 * graph.edges.length + 1), heapKey: new Float64Array(2 * graph.edges.length + 1),
    distance: new Float64Array(2),
  };
}

/**
 * The graph edge of `route` holding `chainageM` (binary search), or −1 when the route is not in the graph.
 * `edgeAtChainage(net, 0, 12.5)` → the index in net.edges of routes[0]'s edge around 12.5 m
 */
export function edgeAtChainage(net: RouteNetwork, route: number, chainageM: number): number {
  if (!(route >= 0 && route < net.routeEdgeStart.length - 1)) return -1;
  const list = net.routeEdgeList;
  let lo = net.routeEdgeStart[route];
  let hi = net.routeEdgeStart[route + 1] - 1;
  if (hi < lo) return -1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (net.edgeFrom[list[mid]] <= chainageM) lo = mid;
    else hi = mid - 1;
  }
  return list[lo];
}

/**
 * Dijkstra from `source`, settling nodes up to `bound` metres; a binary heap on the network's scratch arrays.
 * Returns how many nodes it settled, in net.settledOrder, their distances in net.tentative.
 */
function dijkstra(net: RouteNetwork, source: number, bound: number): number {
  const run = ++net.searches;
  const { seen, done, tentative, settledOrder, adjStart, adjNode, adjLen } = net;
  const hn = net.heapNode;
  const hk = net.heapKey;
  let size = 0;
  const push = (node: number, key: number) => {
    let i = size++;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (hk[p] <= key) break;
      (hn[i] = hn[p]), (hk[i] = hk[p]), (i = p);
    }
    (hn[i] = node), (hk[i] = key);
  };
  const pop = () => {
    const node = hn[0];
    size--;
    if (size > 0) {
      const ln = hn[size];
      const lk = hk[size];
      let i = 0;
      for (;;) {
        let c = 2 * i + 1;
        if (c >= size) break;
        if (c + 1 < size && hk[c + 1] < hk[c]) c++;
        if (hk[c] >= lk) break;
        (hn[i] = hn[c]), (hk[i] = hk[c]), (i = c);
      }
      (hn[i] = ln), (hk[i] = lk);
    }
    return node;
  };
  (seen[source] = run), (tentative[source] = 0);
  push(source, 0);
  let settled = 0;
  while (size > 0) {
    const key = hk[0];
    const u = pop();
    if (done[u] === run) continue;
    (done[u] = run), (tentative[u] = key), (settledOrder[settled++] = u);
    for (let j = adjStart[u]; j < adjStart[u + 1]; j++) {
      const v = adjNode[j];
      const d = key + adjLen[j];
      if (d > bound || done[v] === run || (seen[v] === run && d >= tentative[v])) continue;
      (seen[v] = run), (tentative[v] = d);
      push(v, d);
    }
  }
  return settled;
}

/** The distance to `to` settled by the cached search from `from`, or −1 (binary search by node id). */
function cachedDistance(net: RouteNetwork, from: number, to: number): number {
  const nodes = net.poolNode;
  let lo = net.sourceStart[from];
  let hi = lo + net.sourceCount[from] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (nodes[mid] < to) lo = mid + 1;
    else if (nodes[mid] > to) hi = mid - 1;
    else return net.poolDist[mid];
  }
  return -1;
}

/** Forgets every cached search (a closure over net inside nodeDistanceInto would allocate a context a call). */
function clearSources(net: RouteNetwork): void {
  net.sourceBound.fill(-1);
  net.cached = 0;
  net.poolUsed = 0;
}

/**
 * Shortest distance between two nodes if it is ≤ the bound net.pairs[boundAt], else Infinity, cached per
 * source node, written to net.pairs[at], the pair's slot: no number crosses the call (V8 boxes a number
 * passed to or returned from a call it does not inline, an allocation each).
 */
function nodeDistanceInto(net: RouteNetwork, from: number, to: number, boundAt: number, at: number): void {
  const bound = net.pairs[boundAt];
  if (from === to) {
    net.pairs[at] = 0;
    return;
  }
  const slot = (Math.imul(from, 0x9e3779b1) ^ to) & net.nodeMask;
  if (net.nodeKeys[2 * slot] === from && net.nodeKeys[2 * slot + 1] === to) {
    const known = net.nodeDist[slot];
    if (known >= 0 || net.nodeBound[slot] >= bound) {
      net.pairs[at] = known >= 0 && known <= bound ? known : Infinity;
      return;
    }
  }
  const searched = net.sourceBound[from];
  let d = searched < 0 ? -1 : cachedDistance(net, from, to);
  if (searched < 0 || (searched < bound && d < 0)) {
    if (net.cached >= CACHE_LIMIT) clearSources(net);
    // searching twice as far as asked lets the next few queries from this node hit the cache
    const b = Math.max(bound, 2 * Math.max(searched, 0));
    const n = dijkstra(net, from, b);
    // the pool is bounded in entries too: in a dense network a search settles hundreds of nodes
    if (net.poolUsed > 0 && net.poolUsed + n > POOL_LIMIT) clearSources(net);
    if (net.sourceBound[from] < 0) net.cached++;
    if (net.poolUsed + n > net.poolNode.length) {
      const size = Math.max(net.poolUsed + n, 2 * net.poolNode.length);
      const [nodes, dist] = [new Int32Array(size), new Float64Array(size)];
      nodes.set(net.poolNode.subarray(0, net.poolUsed)), dist.set(net.poolDist.subarray(0, net.poolUsed));
      [net.poolNode, net.poolDist] = [nodes, dist];
    }
    // a new search from a node supersedes its old one, which stays in the pool until the next clear
    const first = net.poolUsed;
    const sortedNodes = net.poolNode.subarray(first, first + n);
    sortedNodes.set(net.settledOrder.subarray(0, n));
    sortedNodes.sort();
    for (let i = 0; i < n; i++) net.poolDist[first + i] = net.tentative[sortedNodes[i]];
    (net.poolUsed += n), (net.sourceBound[from] = b), (net.sourceStart[from] = first), (net.sourceCount[from] = n);
    d = cachedDistance(net, from, to);
  }
  (net.nodeKeys[2 * slot] = from), (net.nodeKeys[2 * slot + 1] = to), (net.nodeDist[slot] = d), (net.nodeBound[slot] = net.sourceBound[from]);
  net.pairs[at] = d >= 0 && d <= bound ? d : Infinity;
}

/**
 * Where in net.pairs the end-node distances of ea and eb start, valid for queries bounded by `boundM`.
 * A new pair's distances start as NaN, found when a path first needs them (pairDistance): a leg longer
 * than the bound rules most of them out.
 */
function pairSlot(net: RouteNetwork, ea: number, eb: number, boundM: number): number {
  const P = net.pairs;
  const h = ((Math.imul(ea, 0x9e3779b1) ^ eb) & net.pairMask) << 3;
  if (P[h] === ea && P[h + 1] === eb) {
    if (P[h + 2] >= boundM) return h;
    // a longer bound: the distances found stay exact, only those beyond the old bound are looked for again
    P[h + 2] = Math.max(boundM, 2 * P[h + 2]);
    for (let w = 3; w < 7; w++) if (P[h + w] === Infinity) P[h + w] = NaN;
    return h;
  }
  (P[h] = ea), (P[h + 1] = eb), (P[h + 2] = Math.max(boundM, PAIR_MIN_BOUND_M));
  P[h + 3] = P[h + 4] = P[h + 5] = P[h + 6] = NaN;
  return h;
}

/** Node distance `which` (0: from–from, 1: from–to, 2: to–from, 3: to–to) of the pair in slot h, found if not yet in net.pairs[h + 3 + which]. */
function pairDistance(net: RouteNetwork, h: number, which: number): void {
  const P = net.pairs;
  if (P[h + 3 + which] !== P[h + 3 + which]) {
    const a = P[h];
    const b = P[h + 1];
    nodeDistanceInto(net, which < 2 ? net.edgeFromNode[a] : net.edgeToNode[a], which % 2 === 0 ? net.edgeFromNode[b] : net.edgeToNode[b], h + 2, h + 3 + which);
  }
}

/**
 * Network distance between positions x and y of `p` (their edges and legs found by locatePositions):
 * |Δchainage| on one route; across routes the shortest path over the graph from x's edge ends to y's edge
 * ends. Paths longer than bounds[b] count as unreachable (Infinity), which keeps each search small. Written to
 * net.distance[0], for the matcher's hot loops: it asks with indices and reads the answer from a column, so
 * that no number crosses a call (V8 boxes a number passed to or returned from a call it does not inline, an
 * allocation each).
 */
export function positionDistanceInto(net: RouteNetwork, p: PositionColumns, x: number, y: number, bounds: Float64Array, b: number): void {
  const boundM = bounds[b];
  if (p.route[x] === p.route[y]) {
    const d = Math.abs(p.chainage[x] - p.chainage[y]);
    net.distance[0] = d <= boundM ? d : Infinity;
    return;
  }
  const ea = p.edge[x];
  const eb = p.edge[y];
  if (ea < 0 || eb < 0) {
    net.distance[0] = Infinity;
    return;
  }
  const h = pairSlot(net, ea, eb, boundM);
  const P = net.pairs;
  const a0 = p.leg0[x];
  const a1 = p.leg1[x];
  const b0 = p.leg0[y];
  const b1 = p.leg1[y];
  // the four paths leg → node distance → leg (0: from–from, 1: from–to, 2: to–from, 3: to–to); a node
  // distance is looked for only when its path can still be the shortest under the bound (it is exact up
  // to the rest). One loop, not a helper a path: a number a helper returns would be boxed.
  // a path through a dead end (x's or y's) is never the shortest: the edge's other end is nearer along it
  const dead = net.deadEnd;
  const deadFromA = dead[net.edgeFromNode[ea]];
  const deadToA = dead[net.edgeToNode[ea]];
  const deadFromB = dead[net.edgeFromNode[eb]];
  const deadToB = dead[net.edgeToNode[eb]];
  let best = Infinity;
  for (let which = 0; which < 4; which++) {
    if ((which < 2 ? deadFromA : deadToA) + (which % 2 === 0 ? deadFromB : deadToB) > 0) continue;
    const start = which < 2 ? a0 : a1;
    const end = which % 2 === 0 ? b0 : b1;
    const rest = Math.min(boundM, best) - start - end;
    if (rest < 0) continue;
    pairDistance(net, h, which);
    const d = P[h + 3 + which];
    if (d <= rest) best = Math.min(best, start + d + end);
  }
  net.distance[0] = best <= boundM ? best : Infinity;
}

/** Positions on the plan in flat columns with their edges (edgeAtChainage) and legs to the edge's ends: a trace's candidates. */
export interface PositionColumns {
  route: Int32Array;
  chainage: Float64Array;
  /** −1 where the route is not in the graph */
  edge: Int32Array;
  leg0: Float64Array;
  leg1: Float64Array;
}

/**
 * Fills in the edge and legs of positions from … to − 1 of `p` from their route and chainage.
 * `locatePositions(net, cols, 0, cols.route.length)` → cols.edge, cols.leg0, cols.leg1 set for every position
 */
export function locatePositions(net: RouteNetwork, p: PositionColumns, from: number, to: number): void {
  for (let c = from; c < to; c++) {
    const e = (p.edge[c] = edgeAtChainage(net, p.route[c], p.chainage[c]));
    if (e < 0) continue;
    // how far the position lies from the edge's from node and to node along the route: a path's first and last legs
    p.leg0[c] = Math.max(p.chainage[c] - net.edgeFrom[e], 0);
    p.leg1[c] = Math.max(net.edgeTo[e] - p.chainage[c], 0);
  }
}
