import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { buildRouteGraph } from '@/lib/matching/route-graph';
import type { LonLat, PlannedRouteInput, RouteGraph } from '@/lib/matching/types';

// Scenarios are laid out in metres east/north of a point in Berlin with GeographicLib's direct problem
// [computed, GeographicLib], so offsets such as "0.3 m beside the route" are true ground distances.
const WGS84 = geodesic.Geodesic.WGS84;
const O: LonLat = [13.405, 52.52];

function geo(x: number, y: number): LonLat {
  const e = WGS84.Direct(O[1], O[0], 90, x);
  const n = WGS84.Direct(e.lat2!, e.lon2!, 0, y);
  return [n.lon2!, n.lat2!];
}

const route = (ref: string, pts: [number, number][]): PlannedRouteInput => ({ ref, street: null, ducts: null, kind: 'street', coords: pts.map(([x, y]) => geo(x, y)) });
const kinds = (g: RouteGraph) => g.diagnostics.map((d) => [d.kind, d.refs]);
const edgesOf = (g: RouteGraph, ref: string) => g.edges.filter((e) => e.ref === ref);
const metres = (a: LonLat, b: LonLat) => WGS84.Inverse(a[1], a[0], b[1], b[0]).s12!;

describe('buildRouteGraph', () => {
  it('joins a small grid of streets, with a T-junction splitting the through street', () => {
    const g = buildRouteGraph([
      route('H1a', [[0, 0], [100, 0]]),
      route('H1b', [[100, 0], [200, 0]]),
      route('H2', [[0, 100], [50, 100], [200, 100]]),
      route('V1', [[0, 0], [0, 100]]),
      route('V2', [[100, 0], [100, 100]]), // ends on the interior of H2
      route('V3', [[200, 0], [200, 100]]),
    ]);
    expect(kinds(g)).toEqual([]);
    expect(g.nodes).toHaveLength(6);
    expect(g.edges).toHaveLength(7);
    const h2 = edgesOf(g, 'H2');
    expect(h2).toHaveLength(2);
    // the split sits where V2 ends, measured along H2 on the ellipsoid
    const split = metres(geo(0, 100), geo(50, 100)) + metres(geo(50, 100), geo(100, 100));
    expect(Math.abs(h2[0].toChainageM - split)).toBeLessThan(0.001);
    expect(h2[1].fromChainageM).toBe(h2[0].toChainageM);
    expect(h2[0].toNode).toBe(h2[1].fromNode);
    const t = g.nodes[h2[0].toNode];
    expect(t.routes.map((r) => r.ref).sort()).toEqual(['H2', 'V2']);
    // ids follow input order: node 0 is the first route's start, shared with V1's start
    expect(g.nodes[0].routes).toEqual([
      { ref: 'H1a', chainageM: 0 },
      { ref: 'V1', chainageM: 0 },
    ]);
    const junction = g.nodes[1];
    expect(junction.routes.map((r) => r.ref)).toEqual(['H1a', 'H1b', 'V2']);
    for (const e of g.edges) expect(e.lengthM).toBeCloseTo(e.toChainageM - e.fromChainageM, 9);
  });

  it('keeps the two sides of a street 6 m apart apart, joined only by a crossing', () => {
    const g = buildRouteGraph([route('N', [[0, 3], [80, 3]]), route('S', [[0, -3], [80, -3]]), route('X', [[40, 3], [40, -3]])]);
    expect(g.nodes).toHaveLength(6);
    expect(g.edges).toHaveLength(5);
    expect(edgesOf(g, 'N')).toHaveLength(2);
    expect(edgesOf(g, 'S')).toHaveLength(2);
    expect(kinds(g)).toEqual([
      ['dangling_end', ['N']],
      ['dangling_end', ['N']],
      ['dangling_end', ['S']],
      ['dangling_end', ['S']],
    ]);
    expect(g.diagnostics[0].message).toBe('N ends without joining another route (at its start)');
    // no node holds both sides
    for (const n of g.nodes) expect(n.routes.map((r) => r.ref)).not.toEqual(expect.arrayContaining(['N', 'S']));
  });

  it('does not report a road crossing\'s house end, but still reports a street end and a crossing that joins nothing', () => {
    // one trench along the north side of a street (N, joined to W at its west end); crossings are sawn from
    // it to the houses across the road, the way the demo plan draws them: each crossing joins N at one end,
    // and its other end, at the house, meets nothing by design
    const crossing = (ref: string, pts: [number, number][]): PlannedRouteInput => ({ ...route(ref, pts), kind: 'crossing' });
    const g = buildRouteGraph([
      route('W', [[0, -20], [0, 3]]),
      route('N', [[0, 3], [120, 3]]),
      crossing('X1', [[30, 3], [30, -6]]), // drawn from the trench to the house
      crossing('X2', [[70, -6], [70, 3]]), // drawn from the house to the trench
      crossing('X3', [[120, 3], [128, -6]]), // from the street's far end
      crossing('XL', [[200, 3], [200, -6]]), // joins nothing: a real problem
      route('S', [[50, 3], [50, 40]]), // a spur street ending in a field: a real dangling end
    ]);
    // the trench end at (120, 3) carries X3, so it is joined; W's south end and S's north end dangle
    expect(kinds(g)).toEqual([
      ['dangling_end', ['W']],
      ['dangling_end', ['XL']],
      ['dangling_end', ['XL']],
      ['dangling_end', ['S']],
    ]);
    expect(g.diagnostics.map((d) => d.message)).toEqual([
      'W ends without joining another route (at its start)',
      'XL ends without joining another route (at its start)',
      'XL ends without joining another route (at its end)',
      'S ends without joining another route (at its end)',
    ]);
    // the same plan with the crossings typed as streets lists every house end: the rule keys on the kind
    const untyped = buildRouteGraph([
      route('W', [[0, -20], [0, 3]]),
      route('N', [[0, 3], [120, 3]]),
      route('X1', [[30, 3], [30, -6]]),
      route('X2', [[70, -6], [70, 3]]),
      route('X3', [[120, 3], [128, -6]]),
    ]);
    expect(kinds(untyped)).toEqual([
      ['dangling_end', ['W']],
      ['dangling_end', ['X1']],
      ['dangling_end', ['X2']],
      ['dangling_end', ['X3']],
    ]);
  });

  it('joins an end 0.3 m from another route onto its interior, but not one 0.6 m away', () => {
    // B is one geodesic due east; the foot at 50 m is reached by a perpendicular offset from it
    const start = O;
    const end = WGS84.Direct(O[1], O[0], 90, 120);
    const foot = WGS84.Direct(O[1], O[0], 90, 50);
    const beside = (d: number): LonLat => {
      const p = WGS84.Direct(foot.lat2!, foot.lon2!, foot.azi2! - 90, d);
      return [p.lon2!, p.lat2!];
    };
    const b: PlannedRouteInput = { ref: 'B', street: 'Lindenweg', ducts: '7x14mm', kind: 'street', coords: [start, [end.lon2!, end.lat2!]] };
    const a = (d: number): PlannedRouteInput => ({ ref: 'A', street: null, ducts: null, kind: 'street', coords: [beside(30), beside(d)] });

    const near = buildRouteGraph([b, a(0.3)]);
    expect(near.nodes).toHaveLength(4);
    expect(near.edges).toHaveLength(3);
    const [b1, b2] = edgesOf(near, 'B');
    expect(Math.abs(b1.toChainageM - 50)).toBeLessThan(0.001);
    expect(b2.fromNode).toBe(b1.toNode);
    expect(edgesOf(near, 'A')[0].toNode).toBe(b1.toNode);
    expect(kinds(near)).toEqual([
      ['dangling_end', ['B']],
      ['dangling_end', ['B']],
      ['dangling_end', ['A']],
    ]);

    const far = buildRouteGraph([b, a(0.6)]);
    expect(far.nodes).toHaveLength(4);
    expect(far.edges).toHaveLength(2);
    expect(kinds(far)).toHaveLength(4);
  });

  it('joins an end beside the end of another route onto that end instead of cutting a sliver edge', () => {
    // C ends 0.4 m beside B, 0.4 m from B's start: 0.57 m from B's start, so only the foot is within snap
    const g = buildRouteGraph([route('B', [[0, 0], [100, 0]]), route('C', [[0.4, 40], [0.4, 0.4]])]);
    expect(g.edges.map((e) => e.ref)).toEqual(['B', 'C']);
    expect(g.nodes).toHaveLength(3);
    expect(g.nodes[0].routes).toEqual([
      { ref: 'B', chainageM: 0 },
      { ref: 'C', chainageM: g.edges[1].toChainageM },
    ]);
    expect(kinds(g)).toEqual([
      ['dangling_end', ['B']],
      ['dangling_end', ['C']],
    ]);
  });

  it('reports a duplicate drawn the other way round and 0.2 m off', () => {
    const pts: [number, number][] = [[0, 0], [30, 5], [60, 5]];
    const g = buildRouteGraph([route('D1', pts), route('D2', pts.map(([x, y]) => [x, y + 0.2] as [number, number]).reverse())]);
    expect(kinds(g)).toEqual([['duplicate', ['D1', 'D2']]]);
    expect(g.nodes).toHaveLength(2);
    expect(g.edges).toHaveLength(2);
    expect(metres(g.diagnostics[0].position, geo(30, 5))).toBeLessThan(10);
  });

  it('reports two routes running together over 20 m as an overlap, not a duplicate', () => {
    const g = buildRouteGraph([route('O1', [[0, 0], [100, 0]]), route('O2', [[30, -30], [40, 0.2], [60, 0.2], [70, -30]])]);
    expect(kinds(g)).toEqual([
      ['overlap', ['O1', 'O2']],
      ['dangling_end', ['O1']],
      ['dangling_end', ['O1']],
      ['dangling_end', ['O2']],
      ['dangling_end', ['O2']],
    ]);
    // O1 lies within 0.5 m of O2 from x = 39.41 to 60.59: the shared 20 m, plus 0.5 m / sin 71.7° at each
    // end where O2 comes in and leaves at 71.7° (rise 30.2 m over 10 m) [computed by hand]
    expect(g.diagnostics[0].message).toBe('O1 and O2 run within 0.5 m of each other for 21.2 m');
    expect(metres(g.diagnostics[0].position, geo(50, 0))).toBeLessThan(1);
    expect(g.nodes).toHaveLength(4);
    expect(g.edges).toHaveLength(2);
  });

  it('leaves zero-length routes out of the graph and says why', () => {
    const p = geo(10, 10);
    const g = buildRouteGraph([
      { ref: 'Z1', street: null, ducts: null, kind: 'crossing', coords: [p, p] },
      route('Z2', [[10, 10], [10.005, 10]]),
      { ref: 'Z3', street: null, ducts: null, kind: 'street', coords: [] },
      route('R', [[0, 0], [50, 0]]),
    ]);
    expect(kinds(g)).toEqual([
      ['zero_length', ['Z1']],
      ['zero_length', ['Z2']],
      ['zero_length', ['Z3']],
      ['dangling_end', ['R']],
      ['dangling_end', ['R']],
    ]);
    expect(g.diagnostics[0].message).toBe('Z1 has fewer than 2 distinct positions; it is left out of the graph');
    expect(g.diagnostics[1].message).toBe('Z2 is 0.005 m long; it is left out of the graph');
    expect(g.nodes).toHaveLength(2);
    expect(g.edges.map((e) => e.ref)).toEqual(['R']);
  });

  it('reports a repeated ref once and keeps only its first route', () => {
    const g = buildRouteGraph([route('R-1', [[0, 0], [50, 0]]), route('R-2', [[50, 0], [50, 50]]), route('R-1', [[0, 20], [50, 20]]), route('R-1', [[0, 40], [50, 40]])]);
    expect(kinds(g).slice(0, 1)).toEqual([['duplicate_ref', ['R-1']]]);
    expect(g.diagnostics[0].message).toBe('R-1 appears 3 times in the plan; only the first is in the graph');
    expect(kinds(g).slice(1)).toEqual([
      ['dangling_end', ['R-1']],
      ['dangling_end', ['R-2']],
    ]);
    expect(g.nodes).toHaveLength(3);
    expect(g.edges).toHaveLength(2);
  });

  it('builds a generated 2,000-route network with the expected nodes, edges and dead ends', () => {
    // a 32 × 32 grid of 100 m blocks, every block side its own five-vertex route (1,984 routes), plus 16
    // cul-de-sacs leaving a block side at a T-junction and ending 30 m into the block
    const n = 32;
    const routes: PlannedRouteInput[] = [];
    const side = (ref: string, x0: number, y0: number, dx: number, dy: number) =>
      routes.push(route(ref, [0, 0.25, 0.5, 0.75, 1].map((t) => [x0 + t * dx, y0 + t * dy] as [number, number])));
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (i + 1 < n) side(`E-${i}-${j}`, i * 100, j * 100, 100, 0);
        if (j + 1 < n) side(`N-${i}-${j}`, i * 100, j * 100, 0, 100);
      }
    }
    for (let k = 0; k < 16; k++) routes.push(route(`C-${k}`, [[k * 200 + 37, 300], [k * 200 + 37, 330]]));
    expect(routes).toHaveLength(2000);

    const g = buildRouteGraph(routes);
    expect(g.nodes).toHaveLength(n * n + 32);
    expect(g.edges).toHaveLength(1984 + 32);
    expect(kinds(g)).toEqual(Array.from({ length: 16 }, (_, k) => ['dangling_end', [`C-${k}`]]));
    // every split block side is split at 37 m
    for (let k = 0; k < 16; k++) {
      const host = edgesOf(g, `E-${2 * k}-3`);
      expect(host).toHaveLength(2);
      expect(Math.abs(host[0].toChainageM - metres(geo(k * 200, 300), geo(k * 200 + 37, 300)))).toBeLessThan(0.001);
    }
    // the same input gives the same graph, ids included
    expect(buildRouteGraph(routes)).toEqual(g);
  });

  it('returns an empty graph for an empty plan', () => {
    expect(buildRouteGraph([])).toEqual({ nodes: [], edges: [], diagnostics: [] });
  });
});
