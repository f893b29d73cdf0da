import { localFrame, projectOntoLine } from './chainage';
import type { LonLat } from './types';

/**
 * Where p lies relative to a line: chainage of its nearest point, and signed offset (+ left of the line's
 * drawing direction, − right), the convention of matched fixes.
 *
 * signedOffset([[9.1, 52.1], [9.101, 52.1]], [9.1005, 52.10001]) → { chainageM: 34.3, offsetM: 1.11, distanceM: 1.11 }
 */
export function signedOffset(coords: LonLat[], p: LonLat): { chainageM: number; offsetM: number; distanceM: number } {
  const proj = projectOntoLine(coords, p);
  const a = coords[proj.segment];
  const b = coords[proj.segment + 1] ?? a;
  const f = localFrame(a);
  const [bx, by] = f.toXY(b);
  const [px, py] = f.toXY(p);
  return { chainageM: proj.chainageM, offsetM: bx * py - by * px < 0 ? -proj.distanceM : proj.distanceM, distanceM: proj.distanceM };
}

/**
 * The as-built line as offsets from its planned route, vertex by vertex in chainage order: the line the
 * offset-versus-chainage plot draws through the observations.
 *
 * offsetProfile(route.coords, section.coords) → [{ chainageM: 40, offsetM: 0.9 }, …]
 */
export function offsetProfile(route: LonLat[], line: LonLat[]): { chainageM: number; offsetM: number }[] {
  return line.map((p) => signedOffset(route, p)).map(({ chainageM, offsetM }) => ({ chainageM, offsetM })).sort((a, b) => a.chainageM - b.chainageM);
}
