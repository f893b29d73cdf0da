import { distanceM } from './chainage';
import type { Fix } from './match-types';

export type Exclusion = { kind: 'time'; fromT: number; toT: number } | { kind: 'distance'; fromM: number; toM: number };

/**
 * Drops the fixes of a trace that fall in an excluded time range (epoch seconds) or distance range (metres
 * along the trace from its first fix), and splits the trace where it drops them, so no line bridges the gap.
 * `applyExclusions(trace, [{ kind: 'time', fromT, toT }])` → the pieces that remain.
 */
export function applyExclusions(trace: Fix[], exclusions: Exclusion[]): Fix[][] {
  if (exclusions.length === 0) return [trace];
  const along: number[] = [];
  for (let i = 0; i < trace.length; i++) along.push(i === 0 ? 0 : along[i - 1] + distanceM([trace[i - 1].lon, trace[i - 1].lat], [trace[i].lon, trace[i].lat]));
  const out: Fix[][] = [];
  let piece: Fix[] = [];
  trace.forEach((f, i) => {
    const excluded = exclusions.some((e) => (e.kind === 'time' ? f.t !== null && f.t >= e.fromT && f.t <= e.toT : along[i] >= e.fromM && along[i] <= e.toM));
    if (excluded) {
      if (piece.length) out.push(piece);
      piece = [];
    } else piece.push(f);
  });
  if (piece.length) out.push(piece);
  return out;
}
