/**
 * The duct lookup's pure parts: which side of the route a point lies on, "could be this close", and the order
 * of the stretches. Distances are geodesic metres; the radius is the section's 95 % position radius.
 */

export type RouteSide = 'left' | 'right' | 'on';

/** Left or right of the route's direction from a signed offset (left positive, as `snapOnLine` gives it). */
export function sideOf(offsetM: number, onWithinM = 0.01): RouteSide {
  if (Math.abs(offsetM) <= onWithinM) return 'on';
  return offsetM > 0 ? 'left' : 'right';
}

/** The stretch relative to a picked address: on the address's side of the street or across it. */
export function relativeSide(stretch: RouteSide, address: RouteSide | null): 'same side as the address' | 'across' | null {
  if (address === null || stretch === 'on' || address === 'on') return null;
  return stretch === address ? 'same side as the address' : 'across';
}

/**
 * How close the ducts could really be, given the 95 % radius of their recorded position: max(0, distance −
 * radius). An unknown radius counts as 0 (the recorded distance stands, and the page says it is unknown).
 */
export function couldBeThisClose(distanceM: number, radiusM: number | null): number {
  return Math.max(0, distanceM - (radiusM ?? 0));
}

export type StretchOrder = 'distance' | 'could_be';

/** Nearest first by distance, or by "could be this close" (ties by distance, then id, so the order is stable). */
export function sortStretches<T extends { id: string; distanceM: number; radiusM: number | null }>(list: T[], by: StretchOrder = 'distance'): T[] {
  const key = (s: T) => (by === 'distance' ? s.distanceM : couldBeThisClose(s.distanceM, s.radiusM));
  return [...list].sort((a, b) => key(a) - key(b) || a.distanceM - b.distanceM || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}

/** The radius a lookup may ask for (m), and the default when it does not say. */
export const LOOKUP_MAX_RADIUS_M = 500;
