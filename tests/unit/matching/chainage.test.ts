import geodesic from 'geographiclib-geodesic';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { cumulativeChainage, lineLengthM, pathLengthM, pointAtChainage, projectOntoLine } from '@/lib/matching/chainage';
import type { LonLat } from '@/lib/matching/types';
import { mulberry32 } from '@/lib/records/seeded-random';

afterAll(() => closeDb());

const WGS84 = geodesic.Geodesic.WGS84;

// a deterministic generator, so a failure names the same polyline every run
const rng = mulberry32;

/** A street-like polyline near `origin`: n vertices, 20–200 m apart, turning by up to ±60°. */
function streetLine(origin: LonLat, n: number, seed: number): LonLat[] {
  const r = rng(seed);
  const out: LonLat[] = [origin];
  let heading = r() * 360;
  for (let i = 1; i < n; i++) {
    heading += (r() - 0.5) * 120;
    const [lon, lat] = out[i - 1];
    const step = WGS84.Direct(lat, lon, heading, 20 + r() * 180);
    out.push([step.lon2!, step.lat2!]);
  }
  return out;
}

const CITIES: [string, LonLat][] = [
  ['Berlin', [13.405, 52.52]],
  ['Wellington', [174.7762, -41.2865]],
  ['Quito', [-78.4678, -0.1807]],
  ['Tromsø', [18.9553, 69.6492]],
];

/** PostGIS geography length on the WGS 84 spheroid, an independent producer. */
async function postgisLengthM(coords: LonLat[]): Promise<number> {
  const { rows } = await getDb().raw<{ rows: { m: number }[] }>('select ST_Length(ST_GeomFromGeoJSON(?)::geography) as m', [
    JSON.stringify({ type: 'LineString', coordinates: coords }),
  ]);
  return rows[0].m;
}

describe('lineLengthM', () => {
  it('reproduces the GeographicLib inverse example', () => {
    // GeographicLib documentation example [published]: WGS 84 inverse (−41.32, 174.81) → (40.96, −5.50),
    // s12 = 19 959 679.26735382 m
    expect(Math.abs(lineLengthM([[174.81, -41.32], [-5.5, 40.96]]) - 19_959_679.26735382)).toBeLessThan(0.001);
  });

  it('pathLengthM, the uncached sum, is the same number as lineLengthM and as GeographicLib\'s segment distances summed in order', () => {
    for (const [i, [, origin]] of CITIES.entries()) {
      const coords = streetLine(origin, 3 + i * 7, 200 + i);
      let sum = 0;
      for (let k = 1; k < coords.length; k++) sum += WGS84.Inverse(coords[k - 1][1], coords[k - 1][0], coords[k][1], coords[k][0]).s12!;
      expect(pathLengthM(coords)).toBe(sum);
      expect(pathLengthM(coords)).toBe(lineLengthM(coords));
    }
    expect(pathLengthM([])).toBe(0);
    expect(pathLengthM([[13.4, 52.5]])).toBe(0);
  });

  it('gives 1° of longitude on the equator', () => {
    // WGS 84 1° of longitude on the equator = 111 319.4908 m [computed, GeographicLib] (a·π/180)
    expect(Math.abs(lineLengthM([[0, 0], [1, 0]]) - 111_319.4908)).toBeLessThan(0.001);
  });

  it('agrees with PostGIS on generated city-scale polylines within 1 mm per km', async () => {
    for (const [i, [name, origin]] of CITIES.entries()) {
      const coords = streetLine(origin, 8 + i * 5, 100 + i);
      const ours = lineLengthM(coords);
      // PostGIS geography length on the WGS 84 spheroid, an independent producer
      const theirs = await postgisLengthM(coords);
      expect(ours, name).toBeGreaterThan(100);
      expect(Math.abs(ours - theirs), name).toBeLessThan((0.001 * ours) / 1000);
    }
  });

  it('is 0 for fewer than two positions', () => {
    expect(lineLengthM([])).toBe(0);
    expect(lineLengthM([[13.4, 52.5]])).toBe(0);
  });
});

describe('cumulativeChainage', () => {
  it('matches the PostGIS length of every prefix of the line', async () => {
    const coords = streetLine(CITIES[0][1], 7, 7);
    const cum = cumulativeChainage(coords);
    expect(cum[0]).toBe(0);
    for (let k = 1; k < coords.length; k++) {
      // PostGIS geography length on the WGS 84 spheroid, an independent producer
      const theirs = await postgisLengthM(coords.slice(0, k + 1));
      expect(Math.abs(cum[k] - theirs)).toBeLessThan(0.001);
    }
    expect(cum[cum.length - 1]).toBe(lineLengthM(coords));
  });
});

describe('pointAtChainage', () => {
  it('puts the point on the segment geodesic at the asked distance (PostGIS spheroid distances)', async () => {
    const coords = streetLine(CITIES[1][1], 6, 11);
    const cum = cumulativeChainage(coords);
    for (const frac of [0.1, 0.37, 0.5, 0.81, 0.99]) {
      const c = frac * cum[cum.length - 1];
      const i = cum.findIndex((v, k) => v <= c && c < cum[k + 1]);
      const p = pointAtChainage(coords, c);
      // on the geodesic from vertex i to i+1 exactly when the two spheroid distances add up to the segment
      const { rows } = await getDb().raw<{ rows: { a: number; b: number }[] }>(
        `select ST_Distance(ST_MakePoint(?, ?)::geography, ST_MakePoint(?, ?)::geography) as a,
                ST_Distance(ST_MakePoint(?, ?)::geography, ST_MakePoint(?, ?)::geography) as b`,
        [...coords[i], ...p, ...p, ...coords[i + 1]],
      );
      expect(Math.abs(rows[0].a - (c - cum[i]))).toBeLessThan(0.001);
      expect(Math.abs(rows[0].b - (cum[i + 1] - c))).toBeLessThan(0.001);
    }
  });

  it('clamps to the ends', () => {
    const coords: LonLat[] = [[13.4, 52.5], [13.401, 52.5], [13.401, 52.501]];
    expect(pointAtChainage(coords, -5)).toEqual(coords[0]);
    expect(pointAtChainage(coords, 1e6)).toEqual(coords[2]);
    expect(pointAtChainage([[1, 2]], 10)).toEqual([1, 2]);
  });
});

/**
 * Brute-force truth for the nearest point: sample every segment's geodesic (GeographicLib InverseLine)
 * every 0.5 m, then the best stretch again every 0.1 mm. The sampled minimum overestimates the distance by
 * at most δ²/2d, far below a micrometre here.
 */
function bruteNearest(coords: LonLat[], p: LonLat): { chainageM: number; distanceM: number } {
  const dist = (q: { lat2?: number; lon2?: number }) => WGS84.Inverse(q.lat2!, q.lon2!, p[1], p[0]).s12!;
  let best = { chainageM: 0, distanceM: Infinity, seg: 0, s: 0 };
  let base = 0;
  for (let i = 0; i + 1 < coords.length; i++) {
    const line = WGS84.InverseLine(coords[i][1], coords[i][0], coords[i + 1][1], coords[i + 1][0]);
    for (let s = 0; s <= line.s13 + 0.5; s += 0.5) {
      const d = dist(line.Position(Math.min(s, line.s13)));
      if (d < best.distanceM) best = { chainageM: base + Math.min(s, line.s13), distanceM: d, seg: i, s: Math.min(s, line.s13) };
    }
    base += line.s13;
  }
  const [a, b] = [coords[best.seg], coords[best.seg + 1]];
  const line = WGS84.InverseLine(a[1], a[0], b[1], b[0]);
  const segBase = best.chainageM - best.s;
  let fine = { chainageM: best.chainageM, distanceM: best.distanceM };
  for (let s = Math.max(best.s - 0.6, 0); s <= Math.min(best.s + 0.6, line.s13); s += 1e-4) {
    const d = dist(line.Position(s));
    if (d < fine.distanceM) fine = { chainageM: segBase + s, distanceM: d };
  }
  return fine;
}

describe('projectOntoLine', () => {
  it('agrees with brute-force dense geodesic sampling to 0.1 mm in distance and 5 mm in chainage', () => {
    for (const [i, [name, origin]] of CITIES.entries()) {
      const coords = streetLine(origin, 5, 300 + i);
      const r = rng(900 + i);
      const cum = cumulativeChainage(coords);
      for (let k = 0; k < 3; k++) {
        // a point up to 150 m off a random place on the line
        const on = pointAtChainage(coords, r() * cum[cum.length - 1]);
        const off = WGS84.Direct(on[1], on[0], r() * 360, r() * 150);
        const p: LonLat = [off.lon2!, off.lat2!];
        const ours = projectOntoLine(coords, p);
        const truth = bruteNearest(coords, p);
        expect(Math.abs(ours.distanceM - truth.distanceM), name).toBeLessThan(1e-4);
        expect(Math.abs(ours.chainageM - truth.chainageM), name).toBeLessThan(0.005);
        // the reported point is on the line at the reported chainage, and at the reported distance from p
        const at = pointAtChainage(coords, ours.chainageM);
        expect(WGS84.Inverse(at[1], at[0], ours.point[1], ours.point[0]).s12!).toBeLessThan(1e-6);
        expect(Math.abs(WGS84.Inverse(p[1], p[0], ours.point[1], ours.point[0]).s12! - ours.distanceM)).toBeLessThan(1e-6);
        expect(ours.chainageM).toBeGreaterThanOrEqual(cum[ours.segment] - 1e-9);
        expect(ours.chainageM).toBeLessThanOrEqual(cum[ours.segment + 1] + 1e-9);
      }
    }
  });

  it('clamps to the nearest end or corner', () => {
    const coords: LonLat[] = [[13.4, 52.5], [13.401, 52.5], [13.401, 52.501]];
    const before = projectOntoLine(coords, [13.3995, 52.5]);
    expect(before.chainageM).toBe(0);
    expect(before.segment).toBe(0);
    // outside the corner: the corner itself is nearest
    const corner = projectOntoLine(coords, [13.4013, 52.4998]);
    expect(Math.abs(corner.chainageM - cumulativeChainage(coords)[1])).toBeLessThan(1e-6);
    expect(Math.abs(corner.distanceM - lineLengthM([[13.401, 52.5], [13.4013, 52.4998]]))).toBeLessThan(1e-6);
  });

  it('finds a point lying on the line at distance 0', () => {
    const coords = streetLine(CITIES[2][1], 4, 5);
    const c = 0.6 * lineLengthM(coords);
    const p = projectOntoLine(coords, pointAtChainage(coords, c));
    expect(p.distanceM).toBeLessThan(1e-6);
    expect(Math.abs(p.chainageM - c)).toBeLessThan(1e-6);
  });
});
