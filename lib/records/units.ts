/** Exact conversion factors (1959 international yard and pound agreement, NIST). */
export const METRES_PER_INCH = 0.0254;
export const METRES_PER_FOOT = 0.3048;

export type UnitSystem = 'metric' | 'imperial';

/**
 * A short length for people: depths and offsets. Metric in metres, imperial in inches below 2 ft, else feet.
 * `formatLength(0.48, 'metric') === '0.48 m'`, `formatLength(0.48, 'imperial') === '18.9 in'`
 */
export function formatLength(metres: number, system: UnitSystem): string {
  if (system === 'metric') return `${metres.toFixed(2)} m`;
  const inches = metres / METRES_PER_INCH;
  if (Math.abs(inches) < 24) return `${inches.toFixed(1)} in`;
  return `${(metres / METRES_PER_FOOT).toFixed(1)} ft`;
}
