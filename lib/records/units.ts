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

// ---- conversions both ways (stored metric; shown and typed in the person's or project's system) ----
// Exact definitions, NIST SP 811 (2008), appendix B: 1 in = 0.0254 m, 1 ft = 0.3048 m exactly;
// t/°F = 1.8 · t/°C + 32 (and back: t/°C = (t/°F − 32) / 1.8).

export const mmToIn = (mm: number): number => mm / 25.4;
export const inToMm = (inches: number): number => inches * 25.4;
export const mToFt = (m: number): number => m / METRES_PER_FOOT;
export const ftToM = (ft: number): number => ft * METRES_PER_FOOT;
export const cToF = (c: number): number => c * 1.8 + 32;
export const fToC = (f: number): number => (f - 32) / 1.8;

/** The quantities a record has, each with its stored (metric) unit and the imperial one shown instead. */
export const QUANTITIES = {
  /** depths, covers, clearances, thicknesses: stored m, shown m or in */
  depth: { metric: 'm', imperial: 'in', toImperial: (m: number) => m / METRES_PER_INCH, fromImperial: (i: number) => i * METRES_PER_INCH, digits: { metric: 2, imperial: 1 } },
  /** duct diameters and slot widths: stored mm, shown mm or in */
  small: { metric: 'mm', imperial: 'in', toImperial: mmToIn, fromImperial: inToMm, digits: { metric: 1, imperial: 2 } },
  /** chainages, lengths, production: stored m, shown m or ft */
  length: { metric: 'm', imperial: 'ft', toImperial: mToFt, fromImperial: ftToM, digits: { metric: 1, imperial: 1 } },
  /** laying temperatures: stored °C, shown °C or °F */
  temperature: { metric: '°C', imperial: '°F', toImperial: cToF, fromImperial: fToC, digits: { metric: 0, imperial: 0 } },
  /** a temperature difference (a tolerance): 1 °C of difference is 1.8 °F, no offset */
  temperatureDifference: { metric: '°C', imperial: '°F', toImperial: (c: number) => c * 1.8, fromImperial: (f: number) => f / 1.8, digits: { metric: 0, imperial: 0 } },
} as const;
export type Quantity = keyof typeof QUANTITIES;

/** A stored (metric) value in the shown system, as a number: `toShown(0.48, 'depth', 'imperial')` → 18.897… */
export function toShown(value: number, q: Quantity, system: UnitSystem): number {
  return system === 'metric' ? value : QUANTITIES[q].toImperial(value);
}

/** A typed value in the shown system back to the stored metric one. */
export function fromShown(value: number, q: Quantity, system: UnitSystem): number {
  return system === 'metric' ? value : QUANTITIES[q].fromImperial(value);
}

/** The unit a quantity is shown and typed in. */
export function unitOf(q: Quantity, system: UnitSystem): string {
  return QUANTITIES[q][system];
}

/**
 * A stored value for people, with its unit; null (not measured) is "—".
 * `formatQuantity(0.48, 'depth', 'imperial')` → "18.9 in"; `formatQuantity(195, 'temperature', 'imperial')` → "383 °F".
 */
export function formatQuantity(value: number | null | undefined, q: Quantity, system: UnitSystem): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const shown = toShown(value, q, system);
  const unit = unitOf(q, system);
  return `${shown.toFixed(QUANTITIES[q].digits[system])} ${unit}`;
}

/** The system a person sees: their own choice, else the project's. */
export function shownSystem(personChoice: UnitSystem | null | undefined, projectSystem: UnitSystem): UnitSystem {
  return personChoice ?? projectSystem;
}
