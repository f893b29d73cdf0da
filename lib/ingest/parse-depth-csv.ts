import { parse } from 'csv-parse/sync';
import { guessByAliases } from './guess-columns';
import { DEPTH_LIMITS } from '@/lib/records/depth-schemas';
import { wallTimeToUtc } from '@/lib/records/zoned-time';
import { guessDelimiter } from './guess-delimiter';
import { datumWarning, makeTransformer } from './reproject';
import { resolveCrsName } from './resolve-crs';
import { checkSwap } from './survey-axes';
import { timeProblem, toUtcIso } from './utc-time';
import { positionProblem } from './validate-coords';
import { IngestError, type CrsResolver } from './types';

/**
 * Depth readings from a CSV: the same column check as survey uploads (header names guessed, or given;
 * every named column must be in the header; rows that cannot be read listed with their line numbers),
 * placed by position (lon/lat, or easting/northing with an EPSG code) or by route reference and chainage.
 * Depths are in metres. Nothing here touches the database: the service places the rows on routes.
 */

export interface DepthColumnMap {
  lon?: string;
  lat?: string;
  x?: string;
  y?: string;
  route?: string;
  chainage?: string;
  cover?: string;
  depth?: string;
  time?: string;
  note?: string;
}
export const DEPTH_COLUMN_KEYS = ['lon', 'lat', 'x', 'y', 'route', 'chainage', 'cover', 'depth', 'time', 'note'] as const;

/** Header spellings per column, compared after lower-casing and turning spaces, dots and dashes into _. */
const ALIASES: Record<keyof DepthColumnMap, string[]> = {
  lon: ['lon', 'long', 'longitude', 'lng'],
  lat: ['lat', 'latitude'],
  x: ['easting', 'east', 'e', 'x', 'rechtswert'],
  y: ['northing', 'north', 'n', 'y', 'hochwert'],
  route: ['route', 'route_ref', 'routeref', 'route_id', 'ref'],
  chainage: ['chainage', 'chainage_m', 'ch', 'station', 'stationing', 'distance', 'dist', 'along'],
  cover: ['cover', 'cover_m', 'cover_depth', 'cover_depth_m', 'coverdepth', 'depth_of_cover', 'doc', 'depth_cover'],
  depth: ['trench_depth', 'trench_depth_m', 'trenchdepth', 'depth', 'depth_m', 'slot_depth'],
  time: ['measured_at', 'datetime', 'date_time', 'timestamp', 'time', 'date'],
  note: ['note', 'notes', 'remark', 'remarks', 'comment', 'comments'],
};


/**
 * Map headers to columns by their usual names; each header used at most once.
 * `guessDepthColumns(['Route', 'Chainage', 'Cover'])` → `{ route: 'Route', chainage: 'Chainage', cover: 'Cover' }`
 */
export function guessDepthColumns(headers: string[]): DepthColumnMap {
  return guessByAliases(headers, ALIASES) as DepthColumnMap;
}

export type Placement = { kind: 'position'; lon: number; lat: number } | { kind: 'chainage'; routeRef: string; chainageM: number };

export interface DepthCsvRow {
  /** the file's line number (the header is line 1) */
  row: number;
  place: Placement;
  coverM: number | null;
  trenchDepthM: number | null;
  measuredAt: string | null;
  note: string;
}

export interface DepthCsvResult {
  columns: { map: DepthColumnMap; guessed: boolean; headers: string[] };
  placement: 'position' | 'chainage';
  /** 'EPSG:4326' for lon/lat, the given grid for easting/northing, null for route + chainage */
  sourceCrs: string | null;
  rows: DepthCsvRow[];
  /** each row that cannot be used, with its line number and the reason */
  problems: { row: number; message: string }[];
  warnings: string[];
}

export interface DepthCsvOptions {
  columns?: DepthColumnMap;
  /** 'EPSG:xxxx' of easting/northing columns */
  crs?: string;
  resolveCrs: CrsResolver;
  /** the project's zone: a time without an offset is read on the project's clock */
  timeZone: string;
  projectExtent?: [number, number, number, number] | null;
}

/**
 * Reads a depth CSV. Throws IngestError for what stops the whole file (unreadable CSV, no rows, a named
 * column missing from the header, no placement or no depth columns, easting/northing without an EPSG code,
 * swapped axes); returns per-row problems for the rest.
 *
 * @example
 * await parseDepthCsv('route,chainage,cover\nQN-101,20,0.45\n', { resolveCrs, timeZone: 'Europe/Berlin' });
 * // rows: [{ row: 2, place: { kind: 'chainage', routeRef: 'QN-101', chainageM: 20 }, coverM: 0.45, … }]
 */
export async function parseDepthCsv(text: string, opts: DepthCsvOptions): Promise<DepthCsvResult> {
  const clean = text.replace(/^\uFEFF/, '');
  const firstLine = clean.split(/\r?\n/).find((l) => l.trim() !== '') ?? '';
  const delimiter = guessDelimiter(firstLine) ?? ',';
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(clean, { delimiter, relax_column_count: true, skip_empty_lines: true, trim: true, info: true }) as unknown as typeof records;
  } catch (e) {
    const line = (e as { lines?: number }).lines;
    throw new IngestError('malformed', `the CSV cannot be read${line ? ` at line ${line}` : ''}: ${(e as Error).message}`, { line });
  }
  if (records.length === 0) throw new IngestError('empty_file', 'the CSV has no lines');
  const headers = records[0].record;
  const data = records.slice(1);
  if (data.length === 0) throw new IngestError('empty_file', 'the CSV has a header but no rows');

  const guessed = !opts.columns;
  const map: DepthColumnMap = opts.columns ? { ...opts.columns } : guessDepthColumns(headers);
  for (const [key, h] of Object.entries(map)) {
    if (h !== undefined && !headers.includes(h)) throw new IngestError('malformed', `column '${h}' given for ${key} is not in the CSV header (${headers.join(', ')})`);
  }
  const geographic = map.lon !== undefined && map.lat !== undefined;
  const projected = map.x !== undefined && map.y !== undefined;
  const byChainage = map.route !== undefined && map.chainage !== undefined;
  if (!geographic && !projected && !byChainage) {
    throw new IngestError('malformed', `no placement columns were found in the header (${headers.join(', ')}); name them in the columns field: lon and lat, x and y (easting, northing), or route and chainage`, { columns: { map, guessed, headers } });
  }
  if (map.cover === undefined && map.depth === undefined) {
    throw new IngestError('malformed', `no depth column was found in the header (${headers.join(', ')}); name the cover column (surface to the top of the uppermost duct) or the trench depth column`, { columns: { map, guessed, headers } });
  }
  // one way of placing the rows: a position beats route + chainage; easting/northing beat lon/lat only with a grid given
  const mode: 'lonlat' | 'xy' | 'chainage' = projected && (!geographic || opts.crs) ? 'xy' : geographic ? 'lonlat' : 'chainage';
  for (const k of mode === 'xy' ? (['lon', 'lat', 'route', 'chainage'] as const) : mode === 'lonlat' ? (['x', 'y', 'route', 'chainage'] as const) : (['lon', 'lat', 'x', 'y'] as const)) delete map[k];
  const columns = { map, guessed, headers };
  const warnings: string[] = [];
  if (mode === 'xy' && !opts.crs) {
    throw new IngestError('crs_required', `the CSV has easting/northing columns ('${map.x}', '${map.y}'); send the EPSG code of their coordinate system in the crs field`, { columns });
  }

  const index = Object.fromEntries(Object.entries(map).map(([k, h]) => [k, headers.indexOf(h as string)])) as Partial<Record<keyof DepthColumnMap, number>>;
  const num = (s: string): number => {
    const t = delimiter !== ',' && /^[-+]?\d+,\d+$/.test(s) ? s.replace(',', '.') : s;
    return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
  };
  const problems: { row: number; message: string }[] = [];
  type Raw = { row: number; a: number; b: number; routeRef: string; coverM: number | null; trenchDepthM: number | null; measuredAt: string | null; note: string };
  const raws: Raw[] = [];
  for (const { record, info } of data) {
    const line = info.lines;
    if (record.length !== headers.length) {
      problems.push({ row: line, message: `row ${line} has ${record.length} columns, the header has ${headers.length}` });
      continue;
    }
    const get = (key: keyof DepthColumnMap) => (index[key] === undefined ? '' : (record[index[key]!] ?? ''));
    const wrong: string[] = [];
    const depthOf = (key: 'cover' | 'depth', what: string, lim: { min: number; max: number }): number | null => {
      const s = get(key);
      if (s === '') return null;
      const v = num(s);
      if (Number.isNaN(v)) wrong.push(`${what} '${s}' is not a number`);
      else if (v < lim.min || v > lim.max) wrong.push(`${what} ${s} m is outside ${lim.min}–${lim.max} m (depths are in metres)`);
      else return v;
      return null;
    };
    let a = Number.NaN;
    let b = Number.NaN;
    let routeRef = '';
    if (mode === 'chainage') {
      routeRef = get('route');
      a = num(get('chainage'));
      if (routeRef === '') wrong.push('no route');
      if (Number.isNaN(a)) wrong.push(`chainage '${get('chainage')}' is not a number`);
      else if (a < 0) wrong.push(`chainage ${get('chainage')} is below 0`);
    } else {
      const [ka, kb] = mode === 'xy' ? (['x', 'y'] as const) : (['lon', 'lat'] as const);
      a = num(get(ka));
      b = num(get(kb));
      if (Number.isNaN(a)) wrong.push(`${ka === 'x' ? 'easting' : 'longitude'} '${get(ka)}' is not a number`);
      if (Number.isNaN(b)) wrong.push(`${kb === 'y' ? 'northing' : 'latitude'} '${get(kb)}' is not a number`);
    }
    const coverM = depthOf('cover', 'cover', DEPTH_LIMITS.coverM);
    const trenchDepthM = depthOf('depth', 'trench depth', DEPTH_LIMITS.trenchDepthM);
    const coverGiven = get('cover') !== '';
    const depthGiven = get('depth') !== '';
    if (!coverGiven && !depthGiven) wrong.push('neither cover nor trench depth is given');
    if (coverM !== null && trenchDepthM !== null && coverM > trenchDepthM) wrong.push(`cover ${coverM} m is more than the trench depth ${trenchDepthM} m`);
    let measuredAt: string | null = null;
    const t = get('time');
    if (t !== '') {
      const why = timeProblem(t);
      measuredAt = why ? null : /(Z|[+-]\d{2}:?\d{2})$/i.test(t) ? toUtcIso(t) : wallTimeToUtc(t.replace(/(:\d{2}:\d{2})\.\d+$/, '$1'), opts.timeZone);
      if (why) wrong.push(`time '${t}' names a day or time that does not exist (${why})`);
      else if (measuredAt === null) wrong.push(`time '${t}' is not a date and time (write it as YYYY-MM-DD HH:MM)`);
    }
    if (wrong.length) problems.push({ row: line, message: `row ${line}: ${wrong.join(', ')}` });
    else raws.push({ row: line, a, b, routeRef, coverM, trenchDepthM, measuredAt, note: get('note').slice(0, 1000) });
  }

  let rows: DepthCsvRow[];
  let sourceCrs: string | null = null;
  if (mode === 'chainage') {
    rows = raws.map((r) => ({ row: r.row, place: { kind: 'chainage', routeRef: r.routeRef, chainageM: r.a }, coverM: r.coverM, trenchDepthM: r.trenchDepthM, measuredAt: r.measuredAt, note: r.note }));
  } else {
    let lonlat: [number, number][];
    if (mode === 'xy') {
      const def = await resolveCrsName(opts.crs!, opts.resolveCrs);
      sourceCrs = `EPSG:${def.srid}`;
      const dw = datumWarning(def);
      if (dw) warnings.push(dw);
      const toWgs84 = makeTransformer(def);
      const conv = (xy: [number, number][]) => ({ source: xy, lonlat: xy.map(([x, y]) => toWgs84(x, y)) });
      checkSwap({ kind: 'projected', def, asIs: conv(raws.map((r) => [r.a, r.b])), swapped: conv(raws.map((r) => [r.b, r.a])), extent: opts.projectExtent ?? null, columns: [map.x!, map.y!], rows: raws.map((r) => r.row) });
      lonlat = raws.map((r) => toWgs84(r.a, r.b).slice(0, 2) as [number, number]);
    } else {
      sourceCrs = 'EPSG:4326';
      const pairs = (swap: boolean) => raws.map((r) => (swap ? [r.b, r.a] : [r.a, r.b]) as [number, number]);
      checkSwap({ kind: 'geographic', asIs: { source: pairs(false), lonlat: pairs(false) }, swapped: { source: pairs(true), lonlat: pairs(true) }, extent: opts.projectExtent ?? null, columns: [map.lon!, map.lat!], rows: raws.map((r) => r.row) });
      lonlat = pairs(false);
    }
    rows = [];
    raws.forEach((r, i) => {
      const [lon, lat] = lonlat[i];
      const why = positionProblem(lon, lat);
      if (why) problems.push({ row: r.row, message: `row ${r.row}: ${why}` });
      else rows.push({ row: r.row, place: { kind: 'position', lon, lat }, coverM: r.coverM, trenchDepthM: r.trenchDepthM, measuredAt: r.measuredAt, note: r.note });
    });
  }
  problems.sort((x, y) => x.row - y.row);
  if (guessed) warnings.push(`columns were guessed from the header: ${Object.entries(map).map(([k, h]) => `${k}='${h}'`).join(', ')}; send columns to set them explicitly`);
  return { columns, placement: mode === 'chainage' ? 'chainage' : 'position', sourceCrs, rows, problems, warnings };
}
