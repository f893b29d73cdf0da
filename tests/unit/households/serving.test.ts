import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { computePassed, listedKeys } from '@/lib/households/passed';
import { findServing, type ServingAddressInput, type ServingRouteInput } from '@/lib/households/serving';

const G = geodesic.Geodesic.WGS84;
const origin: [number, number] = [7.1, 50.7];
/** `east` m east and `north` m north of the origin [computed with geographiclib-geodesic]. */
function at(east: number, north: number): [number, number] {
  const a = G.Direct(origin[1], origin[0], 90, east);
  const b = G.Direct(a.lat2!, a.lon2!, 0, north);
  return [b.lon2!, b.lat2!];
}
const street = (id: string, name: string | null, pts: [number, number][], kind: 'street' | 'crossing' = 'street'): ServingRouteInput => ({ id, ref: id, street: name, kind, coords: pts.map(([e, n]) => at(e, n)), removed: false });
const address = (id: string, name: string, e: number, n: number, extra: Partial<ServingAddressInput> = {}): ServingAddressInput => {
  const [lon, lat] = at(e, n);
  return { id, key: id, street: name, lon, lat, designRouteRef: null, designSide: null, ...extra };
};

describe('serving route and side', () => {
  it('without crossings, takes the side whose houses lie further from the line as across; the design side wins', () => {
    const routes = [street('R', 'Elm Row', [[0, 0], [100, 0]])];
    const addrs = [address('n1', 'Elm Row', 10, 4), address('n2', 'Elm Row', 30, 5), address('s1', 'Elm Row', 20, -14), address('s2', 'Elm Row', 50, -12, { designSide: 'route' })];
    const { servings, across } = findServing(addrs, routes, { serveDistanceM: 40 });
    expect(across.get('R')).toEqual({ sign: -1, by: 'addresses' });
    expect(servings.map((s) => [s.addressId, s.side, s.sideBy])).toEqual([['n1', 'route', 'addresses'], ['n2', 'route', 'addresses'], ['s1', 'across', 'addresses'], ['s2', 'route', 'design']]);
  });

  it('with addresses on one side only and no crossings, everyone is on the route side', () => {
    const { servings } = findServing([address('a', 'Elm Row', 10, 8), address('b', 'Elm Row', 40, 9)], [street('R', 'Elm Row', [[0, 0], [100, 0]])], { serveDistanceM: 40 });
    expect(servings.map((s) => [s.side, s.sideBy])).toEqual([['route', 'default'], ['route', 'default']]);
  });

  it('follows the design\'s route even when another is nearer, falls back to the nearest of any name, and says why none', () => {
    const routes = [street('A', 'Oak Lane', [[0, 0], [100, 0]]), street('B', 'Birch Lane', [[0, 30], [100, 30]])];
    const out = findServing([
      address('d', 'Oak Lane', 50, 25, { designRouteRef: 'A' }),
      address('x', 'Unknown Way', 50, 20),
      address('far', 'Oak Lane', 50, 200),
      address('gone', 'Oak Lane', 50, 200, { designRouteRef: 'Z' }),
    ], routes, { serveDistanceM: 40 }).servings;
    expect([out[0].routeRef, out[0].by]).toEqual(['A', 'design']);
    expect(out[0].distanceM!).toBeCloseTo(25, 1);
    expect([out[1].routeRef, out[1].by]).toEqual(['B', 'nearest']);
    expect(out[2].reason).toBe('No street route within 40 m.');
    expect(out[3].reason).toBe("The design's route Z is not in the current plan, and no street route lies within 40 m.");
  });

  it('reads the listed keys of a crossing record with commas and semicolons', () => {
    expect(listedKeys(' A1, A2;A3 ;; ')).toEqual(['A1', 'A2', 'A3']);
    expect(listedKeys(null)).toEqual([]);
  });

  it('a built crossing route\'s own sections must be approved for passed and approved', () => {
    const routes = [street('S', 'Elm Row', [[0, 0], [100, 0]]), street('X', null, [[50, 0], [50, -9]], 'crossing')];
    const addrs = [address('a', 'Elm Row', 52, -12)];
    const { servings, crossings } = findServing(addrs, routes, { serveDistanceM: 40 });
    expect(servings[0].side).toBe('across');
    const sections = [
      { id: 's1', plannedRouteRef: 'S', status: 'as_planned' as const, fromChainageM: 0, toChainageM: 100, review: 'approved' as const },
      { id: 'x1', plannedRouteRef: 'X', status: 'as_planned' as const, fromChainageM: 0, toChainageM: 9, review: 'pending' as const },
    ];
    const [p] = computePassed(addrs, servings, sections, crossings, [{ id: 'rec', routeId: 'X', built: true, addressRef: null }], { crossingServeDistanceM: 30, footToleranceM: 2 });
    expect([p.passed, p.passedApproved, p.viaCrossingId, p.viaCrossingBy]).toEqual([true, false, 'rec', 'distance']);
    const [q] = computePassed(addrs, servings, sections.map((s) => ({ ...s, review: 'approved' as const })), crossings, [{ id: 'rec', routeId: 'X', built: true, addressRef: null }], { crossingServeDistanceM: 30, footToleranceM: 2 });
    expect(q.passedApproved).toBe(true);
  });

  it('scales: 100,000 addresses among 2,000 street routes in seconds, each tied to its own street', () => {
    const routes: ServingRouteInput[] = [];
    // a 40 × 50 grid of 100 m blocks: east–west streets E0..E39, north–south streets N0..N49
    for (let i = 0; i < 40; i++) for (let j = 0; j < 25; j++) routes.push(street(`E${i}-${j}`, `East ${i}`, [[j * 200, i * 100], [j * 200 + 200, i * 100]]));
    for (let j = 0; j < 50; j++) for (let i = 0; i < 20; i++) routes.push(street(`N${j}-${i}`, `North ${j}`, [[j * 100, i * 200], [j * 100, i * 200 + 200]]));
    const addrs: ServingAddressInput[] = [];
    for (let k = 0; k < 100_000; k++) {
      const i = k % 40;
      const e = (k * 37) % 4900 + 5;
      addrs.push(address(`a${k}`, `East ${i}`, e, i * 100 + (k % 2 ? 8 : -8)));
    }
    const t0 = performance.now();
    const { servings } = findServing(addrs, routes, { serveDistanceM: 40 });
    const s = (performance.now() - t0) / 1000;
    expect(servings.every((v, k) => v.by === 'street' && v.routeRef!.startsWith(`E${k % 40}-`))).toBe(true);
    expect(s).toBeLessThan(30);
  }, 60_000);
});
