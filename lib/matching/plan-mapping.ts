import type { ParsedFeature } from '@/lib/ingest/types';
import type { LonLat, PlannedRouteInput, RouteKind } from './types';

/** Which attribute of the design holds which value. */
export interface PlanMapping {
  ref?: string;
  street?: string;
  ducts?: string;
  kind?: string;
}

// common names in design exports, most specific first; compared case-insensitively
const CANDIDATES: Record<keyof PlanMapping, string[]> = {
  ref: ['route_id', 'routeid', 'route_ref', 'ref', 'route', 'trench_id', 'section', 'id', 'name'],
  street: ['street', 'street_name', 'road', 'road_name', 'strasse', 'straße', 'address'],
  ducts: ['ducts', 'bundle', 'duct_bundle', 'microducts', 'duct', 'ducts_planned', 'cable'],
  kind: ['kind', 'type', 'route_type', 'category', 'class'],
};

/**
 * Guesses the mapping from the attribute names present, e.g.
 * `guessPlanMapping(['Route_ID', 'Street', 'Bundle'])` → `{ ref: 'Route_ID', street: 'Street', ducts: 'Bundle' }`.
 */
export function guessPlanMapping(keys: string[]): PlanMapping {
  const lower = new Map(keys.map((k) => [k.toLowerCase(), k]));
  const out: PlanMapping = {};
  const used = new Set<string>();
  for (const field of ['ref', 'street', 'ducts', 'kind'] as const) {
    for (const c of CANDIDATES[field]) {
      const k = lower.get(c);
      if (k && !used.has(k)) {
        out[field] = k;
        used.add(k);
        break;
      }
    }
  }
  return out;
}

const CROSSING = /cross|querung|kreuzung|traverse|hausanschluss|drop/i;

/** A design's word for the line type, read as street route or road crossing: 'Road crossing' → 'crossing'. */
export function kindFrom(value: unknown): RouteKind {
  return typeof value === 'string' && CROSSING.test(value) ? 'crossing' : 'street';
}

const text = (v: unknown): string | null => (v === null || v === undefined || String(v).trim() === '' ? null : String(v).trim());

/**
 * Turns parsed design features into planned routes with the mapping; points are not routes and are
 * reported. A line without a reference gets a numbered one, with a warning, because a revision cannot
 * follow it.
 */
export function toPlannedRoutes(features: ParsedFeature[], mapping: PlanMapping): { routes: PlannedRouteInput[]; warnings: string[] } {
  const routes: PlannedRouteInput[] = [];
  const warnings: string[] = [];
  let points = 0;
  let unnamed = 0;
  for (const [i, f] of features.entries()) {
    if (f.kind === 'point') {
      points++;
      continue;
    }
    const attrs: Record<string, unknown> = { name: f.name, ...f.attributes };
    let ref = mapping.ref ? text(attrs[mapping.ref]) : null;
    if (!ref) {
      unnamed++;
      ref = `line-${i + 1}`;
    }
    routes.push({
      ref,
      street: mapping.street ? text(attrs[mapping.street]) : null,
      ducts: mapping.ducts ? text(attrs[mapping.ducts]) : null,
      kind: mapping.kind ? kindFrom(attrs[mapping.kind]) : 'street',
      coords: f.coords.map((c) => [c[0], c[1]] as LonLat),
    });
  }
  if (points) warnings.push(`${points} point feature(s) are not routes and were left out of the plan`);
  if (unnamed) warnings.push(`${unnamed} line(s) have no route reference${mapping.ref ? ` in '${mapping.ref}'` : ''}; they were numbered line-N, which a revised design cannot follow`);
  return { routes, warnings };
}

/** The attribute names present on the lines, for guessing and for the mapping form. */
export function attributeKeys(features: ParsedFeature[]): string[] {
  const keys = new Set<string>();
  for (const f of features) if (f.kind === 'line') for (const k of Object.keys(f.attributes)) keys.add(k);
  if (features.some((f) => f.kind === 'line' && f.name)) keys.add('name');
  return [...keys];
}
