import { guessByAliases } from '@/lib/ingest/guess-columns';

/**
 * The address register's import mapping: which column (CSV header, GeoJSON property, .dbf field) holds which
 * value, its guess from the usual names, and applying it to the file's rows, row by row, with a specific
 * reason for every row that cannot be used. Pure: the caller reads the file and hands over the rows and the
 * coordinate transformation.
 */

export const ADDRESS_FIELDS = [
  'key', 'street', 'number', 'postcode', 'locality', 'units', 'buildingType', 'lon', 'lat', 'x', 'y', 'route', 'side', 'connected',
] as const;
export type AddressField = (typeof ADDRESS_FIELDS)[number];

/** Column names per field; every one optional. */
export type AddressMapping = Partial<Record<AddressField, string>>;

/** The fields whose values come from columns, not from a point geometry. */
const COORDINATE_FIELDS: AddressField[] = ['lon', 'lat', 'x', 'y'];

/** Usual names per field, compared after lower-casing and turning spaces, dots and dashes into underscores. */
const ALIASES: Record<AddressField, readonly string[]> = {
  key: ['key', 'address_key', 'address_id', 'addr_id', 'uprn', 'premises_id', 'premise_id', 'property_id', 'id', 'ref', 'fid'],
  street: ['street', 'street_name', 'streetname', 'road', 'road_name', 'thoroughfare', 'str'],
  number: ['number', 'house_number', 'housenumber', 'house_no', 'houseno', 'no', 'nr', 'num', 'building_number', 'housenr', 'addr_housenumber'],
  postcode: ['postcode', 'post_code', 'postal_code', 'postalcode', 'zip', 'zipcode', 'zip_code', 'plz', 'addr_postcode'],
  locality: ['locality', 'town', 'city', 'village', 'place', 'settlement', 'district', 'addr_city'],
  units: ['units', 'households', 'dwellings', 'premises', 'unit_count', 'units_count', 'homes', 'hh'],
  buildingType: ['building_type', 'buildingtype', 'type', 'building', 'use', 'category', 'class'],
  lon: ['lon', 'long', 'longitude', 'lng'],
  lat: ['lat', 'latitude'],
  x: ['x', 'easting', 'east', 'e'],
  y: ['y', 'northing', 'north', 'n'],
  route: ['route', 'route_ref', 'route_id', 'serving_route', 'design_route'],
  side: ['side', 'route_side', 'design_side', 'street_side'],
  connected: ['connected', 'drop_installed', 'installed', 'connection', 'is_connected'],
};

export interface MappingGuess {
  mapping: AddressMapping;
  /** the fields the guess filled */
  guessed: AddressField[];
}

/**
 * Guesses the mapping from the columns' names; fields the caller gave are kept and not reported as guessed.
 * With `geometry` (GeoJSON, shapefile) the position comes from the points, so no coordinate column is guessed.
 *
 * @example
 * guessAddressMapping(['UPRN', 'Street', 'House No', 'Lon', 'Lat'], {}, false).mapping
 * // { key: 'UPRN', street: 'Street', number: 'House No', lon: 'Lon', lat: 'Lat' }
 */
export function guessAddressMapping(columns: string[], given: AddressMapping, geometry: boolean): MappingGuess {
  const fields = ADDRESS_FIELDS.filter((f) => given[f] === undefined && !(geometry && COORDINATE_FIELDS.includes(f)));
  const taken = new Set(Object.values(given).filter(Boolean) as string[]);
  const aliases = Object.fromEntries(fields.map((f) => [f, ALIASES[f]])) as Record<AddressField, readonly string[]>;
  const guess = guessByAliases(columns.filter((c) => !taken.has(c)), aliases);
  const mapping: AddressMapping = {};
  for (const f of ADDRESS_FIELDS) {
    const v = given[f] ?? guess[f];
    if (v) mapping[f] = v;
  }
  return { mapping, guessed: fields.filter((f) => guess[f] !== undefined) };
}

/**
 * The problems of a mapping for a file with these columns, or none: a column that is not in the file, no
 * key, no position (lon+lat or x+y, unless the file has point geometry), half a pair.
 */
export function mappingProblems(mapping: AddressMapping, columns: string[], geometry: boolean): { path: string; message: string }[] {
  const out: { path: string; message: string }[] = [];
  const list = columns.map((c) => `'${c}'`).join(', ') || 'none';
  for (const f of ADDRESS_FIELDS) {
    const c = mapping[f];
    if (c !== undefined && !columns.includes(c)) out.push({ path: `mapping.${f}`, message: `The file has no column '${c}'; it has ${list}.` });
  }
  if (!mapping.key) out.push({ path: 'mapping.key', message: `No column is mapped to key (the register's own identifier of each address); the file has ${list}.` });
  if (!geometry) {
    for (const [a, b] of [['lon', 'lat'], ['x', 'y']] as const) {
      if (Boolean(mapping[a]) !== Boolean(mapping[b])) out.push({ path: `mapping.${mapping[a] ? b : a}`, message: `${a} and ${b} go together: map both columns or neither.` });
    }
    if (!(mapping.lon && mapping.lat) && !(mapping.x && mapping.y)) {
      out.push({ path: 'mapping.lon', message: `No position columns are mapped: map lon and lat (WGS 84 degrees) or x and y (easting and northing, with the crs field); the file has ${list}.` });
    }
  }
  return out;
}

/** How a row's position is read: its own values → WGS 84, or why not. */
export interface Positioner {
  /** 'lonlat' reads the lon/lat columns, 'xy' the x/y columns, 'geometry' the row's point */
  source: 'lonlat' | 'xy' | 'geometry';
  /** e.g. 'EPSG:27700 (OSGB 1936 / British National Grid)' */
  crsLabel: string;
  /** the two coordinates' names for messages: ['longitude', 'latitude'], ['easting', 'northing'] */
  axes: [string, string];
  /** source coordinates → [lon, lat] in WGS 84 */
  toWgs84: (a: number, b: number) => [number, number];
  /** whether the source coordinates lie in the area the CRS is meant for */
  inArea: (a: number, b: number, lonlat: [number, number]) => boolean;
}

/** One row of the file as read: its number as the person sees it and its values by column. */
export interface SourceRow {
  /** CSV: the file's line (the header is row 1); GeoJSON and shapefile: the feature's index + 1 */
  row: number;
  values: Record<string, unknown>;
  /** the feature's point in the file's CRS; null for a feature without a point; undefined for CSV */
  point?: [number, number] | null;
  /** what the feature is when it is not a point ('LineString'); undefined when it has no geometry */
  geometryType?: string;
  /** why the row cannot be read at all (a CSV row with more or fewer cells than the header) */
  problem?: string;
}

export type Side = 'route' | 'across';

/** An address's values as the import stores them; fields the mapping leaves out are undefined. */
export interface AddressValues {
  row: number;
  key: string;
  lon: number;
  lat: number;
  street?: string;
  number?: string;
  postcode?: string;
  locality?: string;
  units?: number;
  buildingType?: string;
  designRouteRef?: string | null;
  designSide?: Side | null;
  connected?: boolean;
}

export interface RowError {
  row: number;
  /** the key when the row has one */
  key?: string;
  message: string;
}

const SIDE_WORDS: Record<string, Side> = {
  route: 'route', route_side: 'route', same: 'route', same_side: 'route', near: 'route', near_side: 'route',
  across: 'across', opposite: 'across', opposite_side: 'across', far: 'across', far_side: 'across',
};
export const SIDE_ACCEPTED = 'route, route_side, same, same_side, near, near_side (the route\'s side) or across, opposite, opposite_side, far, far_side (across the street), or empty';

const YES = new Set(['yes', 'true', '1', 'y', 'x']);
const NO = new Set(['no', 'false', '0', 'n', '']);
export const CONNECTED_ACCEPTED = 'yes, no, true, false, 1, 0, y, n, x (yes) or empty (no)';

/** A cell as text: trimmed, null/undefined as ''. */
export function cellText(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  return String(v).trim();
}

/** A coordinate cell as a number, or NaN: numbers as written, a decimal comma accepted. */
export function coordinateNumber(v: unknown): number {
  if (typeof v === 'number') return v;
  const t = cellText(v).replace(/^([-+]?\d+),(\d+)$/, '$1.$2');
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
}

/** A side as written → 'route' | 'across', null for empty, undefined when not recognised. */
export function parseSide(v: unknown): Side | null | undefined {
  const t = cellText(v).toLowerCase().replace(/[\s-]+/g, '_');
  if (t === '') return null;
  return SIDE_WORDS[t];
}

/** A connected flag as written → boolean, undefined when not recognised. */
export function parseConnected(v: unknown): boolean | undefined {
  const t = cellText(v).toLowerCase();
  if (YES.has(t)) return true;
  if (NO.has(t)) return false;
  return undefined;
}

/** Units (households in the building): a whole number from 1 to 10000; empty is 1. */
export function parseUnits(v: unknown): number | string {
  const t = cellText(v);
  if (t === '') return 1;
  const n = /^[-+]?\d+(\.0+)?$/.test(t) ? Number(t) : Number.NaN;
  if (!Number.isInteger(n) || n < 1) return `units '${t}' is not a whole number of 1 or more`;
  if (n > 10000) return `units ${n} is more than 10000`;
  return n;
}

/**
 * Applies the mapping to every row: the rows that can be stored as addresses, and for every other row its
 * number and each reason it cannot (missing key, a key the file already had, missing or unreadable
 * coordinates, a position outside the coordinate system's area, units, side or connected not readable).
 *
 * @example
 * applyAddressMapping([{ row: 2, values: { id: 'A1', lon: '-1.5', lat: '52.1' } }], { key: 'id', lon: 'lon', lat: 'lat' }, wgs84)
 * // { values: [{ row: 2, key: 'A1', lon: -1.5, lat: 52.1 }], errors: [] }
 */
export function applyAddressMapping(rows: SourceRow[], mapping: AddressMapping, pos: Positioner): { values: AddressValues[]; errors: RowError[] } {
  const values: AddressValues[] = [];
  const errors: RowError[] = [];
  const firstRowOfKey = new Map<string, number>();
  const get = (r: SourceRow, f: AddressField) => (mapping[f] === undefined ? undefined : r.values[mapping[f]!]);
  const text = (r: SourceRow, f: AddressField) => (mapping[f] === undefined ? undefined : cellText(get(r, f)));

  for (const r of rows) {
    const reasons: string[] = r.problem ? [r.problem] : [];
    const key = cellText(get(r, 'key'));
    if (key === '') reasons.push(`no key (column '${mapping.key}' is empty)`);
    else if (firstRowOfKey.has(key)) reasons.push(`key '${key}' is also on row ${firstRowOfKey.get(key)}: a key may appear once in the file`);
    else firstRowOfKey.set(key, r.row);

    let lonlat: [number, number] | null = null;
    if (pos.source === 'geometry') {
      if (!r.point) reasons.push(`the feature is ${r.geometryType ? `a ${r.geometryType}` : 'without a geometry'}, not a point`);
      else lonlat = position(r.point[0], r.point[1], pos, reasons);
    } else {
      const [fa, fb] = pos.source === 'lonlat' ? (['lon', 'lat'] as const) : (['x', 'y'] as const);
      const names = pos.axes;
      const ta = cellText(get(r, fa));
      const tb = cellText(get(r, fb));
      const a = coordinateNumber(ta);
      const b = coordinateNumber(tb);
      const bad = [
        ta === '' ? `${names[0]} ('${mapping[fa]}') is empty` : Number.isNaN(a) ? `${names[0]} '${ta}' is not a number` : null,
        tb === '' ? `${names[1]} ('${mapping[fb]}') is empty` : Number.isNaN(b) ? `${names[1]} '${tb}' is not a number` : null,
      ].filter((x): x is string => x !== null);
      if (bad.length) reasons.push(...bad);
      else lonlat = position(a, b, pos, reasons);
    }

    const units = mapping.units === undefined ? undefined : parseUnits(get(r, 'units'));
    if (typeof units === 'string') reasons.push(units);
    const side = mapping.side === undefined ? undefined : parseSide(get(r, 'side'));
    if (mapping.side !== undefined && side === undefined) reasons.push(`side '${cellText(get(r, 'side'))}' is not recognised; accepted: ${SIDE_ACCEPTED}`);
    const connected = mapping.connected === undefined ? undefined : parseConnected(get(r, 'connected'));
    if (mapping.connected !== undefined && connected === undefined) {
      reasons.push(`connected '${cellText(get(r, 'connected'))}' is not recognised; accepted: ${CONNECTED_ACCEPTED}`);
    }

    if (reasons.length) {
      errors.push({ row: r.row, ...(key ? { key } : {}), message: reasons.join('; ') });
      continue;
    }
    const route = text(r, 'route');
    const v: AddressValues = { row: r.row, key, lon: lonlat![0], lat: lonlat![1] };
    if (mapping.street !== undefined) v.street = text(r, 'street')!;
    if (mapping.number !== undefined) v.number = text(r, 'number')!;
    if (mapping.postcode !== undefined) v.postcode = text(r, 'postcode')!;
    if (mapping.locality !== undefined) v.locality = text(r, 'locality')!;
    if (mapping.buildingType !== undefined) v.buildingType = text(r, 'buildingType')!;
    if (units !== undefined) v.units = units as number;
    if (route !== undefined) v.designRouteRef = route === '' ? null : route;
    if (side !== undefined) v.designSide = side;
    if (connected !== undefined) v.connected = connected;
    values.push(v);
  }
  return { values, errors };
}

function position(a: number, b: number, pos: Positioner, reasons: string[]): [number, number] | null {
  const [na, nb] = pos.axes;
  if (!Number.isFinite(a) || !Number.isFinite(b)) {
    reasons.push(`the position (${a}, ${b}) is not a finite number`);
    return null;
  }
  const ll = pos.toWgs84(a, b);
  const rangeBad = !Number.isFinite(ll[0]) || !Number.isFinite(ll[1]) || Math.abs(ll[1]) > 90 || Math.abs(ll[0]) > 180;
  if (pos.axes[0] === 'longitude' && rangeBad) {
    reasons.push(Math.abs(b) > 90 ? `latitude ${b} is beyond ±90` : `longitude ${a} is beyond ±180`);
    return null;
  }
  if (rangeBad || !pos.inArea(a, b, ll)) {
    reasons.push(`${na} ${a}, ${nb} ${b} lies outside the area of ${pos.crsLabel}`);
    return null;
  }
  return ll;
}
