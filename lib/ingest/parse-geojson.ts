import type { Feature, Geometry, GeoJsonProperties } from 'geojson';
import { datumWarning, makeTransformer, type ToWgs84 } from './reproject';
import { epsgCode, resolveCode, resolveCrsName } from './resolve-crs';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { IngestError, type CrsDefinition, type ParseOptions, type ParsedFeature, type ParsedUpload, type Position } from './types';
import { badTimesError, timesToUtc, timeToUtc, type BadTime } from './utc-time';

const GEOMETRY_TYPES = new Set(['Point', 'MultiPoint', 'LineString', 'MultiLineString', 'Polygon', 'MultiPolygon', 'GeometryCollection']);

export function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const pos = /position (\d+)/.exec(msg);
    const offset = pos ? Number(pos[1]) : text.length;
    const before = text.slice(0, offset);
    const line = before.split('\n').length;
    const column = offset - before.lastIndexOf('\n');
    throw new IngestError('malformed', `the GeoJSON is not valid JSON at line ${line}, column ${column}: ${msg}`, { line, column, offset });
  }
}

/** The legacy (2008) `crs` member: 'name' with an EPSG URN or code, or the old 'EPSG' type. */
function legacyCrs(root: Record<string, unknown>): number | null | 'unreadable' {
  const crs = root.crs as { type?: string; properties?: { name?: string; code?: number | string } } | undefined | null;
  if (!crs) return null;
  if (crs.type === 'name' && typeof crs.properties?.name === 'string') return epsgCode(crs.properties.name) ?? 'unreadable';
  if (crs.type?.toUpperCase() === 'EPSG' && crs.properties?.code !== undefined) return Number(crs.properties.code) || 'unreadable';
  return 'unreadable';
}

function isNumberArray(a: unknown, min: number): a is number[] {
  return Array.isArray(a) && a.length >= min && a.every((v) => typeof v === 'number' && Number.isFinite(v));
}

export async function sourceCrs(root: Record<string, unknown>, opts: ParseOptions, warnings: string[]): Promise<CrsDefinition | null> {
  const legacy = legacyCrs(root);
  if (opts.crs) {
    const def = await resolveCrsName(opts.crs, opts.resolveCrs);
    if (typeof legacy === 'number' && legacy !== def.srid) warnings.push(`the file's crs member says EPSG:${legacy}; EPSG:${def.srid} from the request was used`);
    return def;
  }
  if (legacy === 'unreadable') {
    throw new IngestError('crs_required', `the GeoJSON has a crs member that names no EPSG code (${JSON.stringify(root.crs)}); send the EPSG code in the crs field`);
  }
  if (legacy === null || legacy === 4326) return null;
  return resolveCode(legacy, opts.resolveCrs);
}

/**
 * Parse RFC 7946 GeoJSON: a FeatureCollection, a bare Feature or a bare geometry.
 *
 * Lines and points are read (multi-geometries split into one feature per part), polygons are
 * skipped with a warning; a legacy `crs` member, or `opts.crs`, makes the coordinates be
 * reprojected to WGS 84.
 *
 * @example
 * await parseGeoJson('{"type":"LineString","coordinates":[[13.4,52.5],[13.5,52.6]]}', opts);
 * // { format: 'geojson', sourceCrs: 'EPSG:4326', features: [{ kind: 'line', coords: [[13.4, 52.5], [13.5, 52.6]], … }], … }
 */
export async function parseGeoJson(text: string, opts: ParseOptions): Promise<ParsedUpload> {
  const root = parseJson(text) as Record<string, unknown>;
  if (!root || typeof root !== 'object' || Array.isArray(root)) throw new IngestError('malformed', 'the GeoJSON root is not an object');
  let list: Feature<Geometry | null>[];
  if (root.type === 'FeatureCollection' && Array.isArray(root.features)) list = root.features as Feature<Geometry | null>[];
  else if (root.type === 'Feature') list = [root as unknown as Feature<Geometry | null>];
  else if (GEOMETRY_TYPES.has(root.type as string)) list = [{ type: 'Feature', geometry: root as unknown as Geometry, properties: {} }];
  else throw new IngestError('malformed', `the GeoJSON root has type ${JSON.stringify(root.type)}; expected FeatureCollection, Feature or a geometry`);

  const warnings: string[] = [];
  const def = await sourceCrs(root, opts, warnings);
  const toWgs84: ToWgs84 = def ? makeTransformer(def) : (x, y, z) => (z == null ? [x, y] : [x, y, z]);
  if (def) {
    const w = datumWarning(def);
    if (w) warnings.push(w);
  }

  const features: ParsedFeature[] = [];
  const problems: RangeProblem[] = [];
  const broken: string[] = [];
  const badTimes: BadTime[] = [];

  list.forEach((f, index) => {
    const props: Record<string, unknown> = { ...((f?.properties ?? {}) as NonNullable<GeoJsonProperties>) };
    const rawName = props.name ?? props.Name ?? props.NAME ?? f?.id;
    const name = rawName === undefined || rawName === null || rawName === '' ? null : String(rawName);
    const label = `feature ${index + 1}${name ? ` '${name}'` : ''}`;
    const rawTimes = (props.coordinateProperties as { times?: unknown } | undefined)?.times;
    delete props.coordinateProperties;
    const geoms = ((g: Geometry | null | undefined): Geometry[] => {
      const out: Geometry[] = [];
      const walk = (x: Geometry | null | undefined) => (x?.type === 'GeometryCollection' ? x.geometries.forEach(walk) : x && out.push(x));
      walk(g);
      return out;
    })(f?.geometry);
    if (geoms.length === 0) warnings.push(`${label} has no geometry; skipped`);

    const convert = (c: unknown, where: string): Position | null => {
      if (!isNumberArray(c, 2)) {
        broken.push(`${where}: ${JSON.stringify(c)?.slice(0, 60)} is not a position`);
        return null;
      }
      const p = toWgs84(c[0], c[1], c.length >= 3 ? c[2] : null);
      const m = positionProblem(p[0], p[1]);
      if (m) problems.push({ where, lon: p[0], lat: p[1], message: def ? `${m} (after reprojection from EPSG:${def.srid})` : m });
      return p;
    };

    const partsOf = (g: Geometry): unknown[] | null => {
      const c = (g as { coordinates?: unknown }).coordinates;
      if (!Array.isArray(c)) return null;
      return g.type.startsWith('Multi') ? c : [c];
    };
    const total = geoms.reduce((n, g) => n + (partsOf(g)?.length ?? 1), 0);
    let partNo = 0;
    for (const g of geoms) {
      if (g.type === 'Polygon' || g.type === 'MultiPolygon') {
        warnings.push(`${label} is a ${g.type}; only lines and points are read, so it was skipped`);
        partNo += partsOf(g)?.length ?? 1;
        continue;
      }
      const ps = partsOf(g);
      if (!ps) {
        broken.push(`${label}: ${g.type} has no coordinates array`);
        continue;
      }
      for (const part of ps) {
        partNo++;
        const attributes = total > 1 ? { ...props, part: partNo } : props;
        const where = total > 1 ? `${label} part ${partNo}` : label;
        if (g.type === 'Point' || g.type === 'MultiPoint') {
          const coord = convert(part, where);
          if (coord) features.push({ kind: 'point', name, coord, time: timeToUtc(props.time, `${where} property time`, badTimes), attributes });
          continue;
        }
        if (!Array.isArray(part)) {
          broken.push(`${where}: coordinates are not an array of positions`);
          continue;
        }
        const coords = part.map((c, j) => convert(c, `${where} position ${j + 1}`)).filter((c): c is Position => c !== null);
        if (coords.length < 2) {
          warnings.push(`${where} has ${coords.length} position${coords.length === 1 ? '' : 's'}; skipped`);
          continue;
        }
        const times = Array.isArray(rawTimes) && total === 1 && rawTimes.length === coords.length ? timesToUtc(rawTimes, where, badTimes) : null;
        features.push({ kind: 'line', name, coords, times, pointAttributes: null, attributes });
      }
    }
  });

  if (broken.length) {
    throw new IngestError('malformed', `${broken.length} geometr${broken.length === 1 ? 'y has' : 'ies have'} unreadable coordinates: ${broken[0]}`, { count: broken.length, problems: broken.slice(0, 50) });
  }
  if (problems.length) throw outOfRange(problems);
  if (badTimes.length) throw badTimesError(badTimes);
  return { format: 'geojson', sourceCrs: `EPSG:${def?.srid ?? 4326}`, features, warnings };
}
