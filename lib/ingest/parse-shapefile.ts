import './node-self';
import { parseDbf, parseShp } from 'shpjs';
import { decodeText } from './decode-text';
import { prjMismatch, prjToEpsg } from './prj-to-epsg';
import { readZip } from './read-zip';
import { datumWarning, makeTransformer } from './reproject';
import { resolveCode, resolveCrsName } from './resolve-crs';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { IngestError, type CrsDefinition, type IngestLimits, type ParseOptions, type ParsedFeature, type ParsedUpload, type Position } from './types';

export interface PartFile {
  name: string;
  bytes: Buffer;
}
export type Ext = 'shp' | 'shx' | 'dbf' | 'prj' | 'cpg';
export type ShapeSet = { base: string } & Partial<Record<Ext, PartFile>>;

export const SHAPEFILE_PART = /^(.*)\.(shp|shx|dbf|prj|cpg)$/i;

/** Group files into sets by name without extension; the name pairs the parts of one set. */
export function groupSets(files: PartFile[]): ShapeSet[] {
  const sets = new Map<string, ShapeSet>();
  for (const f of files) {
    const m = SHAPEFILE_PART.exec(f.name);
    if (!m) continue;
    const key = m[1].toLowerCase();
    const set = sets.get(key) ?? { base: m[1] };
    set[m[2].toLowerCase() as Ext] = f;
    sets.set(key, set);
  }
  return [...sets.values()];
}

export async function crsFor(set: ShapeSet, opts: ParseOptions): Promise<CrsDefinition> {
  if (opts.crs) return resolveCrsName(opts.crs, opts.resolveCrs);
  const label = `'${set.base}.shp'`;
  if (!set.prj) throw new IngestError('crs_required', `the shapefile ${label} has no readable .prj; send the EPSG code in the crs field`);
  const wkt = decodeText(set.prj.bytes).trim();
  const code = prjToEpsg(wkt);
  if (code === null) {
    throw new IngestError('crs_required', `the shapefile ${label} has no readable .prj (its coordinate system ${JSON.stringify(wkt.slice(0, 80))} names no EPSG code); send the EPSG code in the crs field`, { prj: wkt.slice(0, 500) });
  }
  const def = await resolveCode(code, opts.resolveCrs);
  const mismatch = prjMismatch(wkt, def);
  if (mismatch) {
    throw new IngestError('crs_required', `the .prj of ${label} is named like EPSG:${code} but does not match it (${mismatch}); send the EPSG code in the crs field`, { prj: wkt.slice(0, 500) });
  }
  return def;
}

export function attributeValue(v: unknown): unknown {
  if (v instanceof Date) {
    // parsedbf builds dates at local midnight: read them back in local time to keep the calendar day
    return Number.isNaN(v.getTime()) ? null : `${v.getFullYear()}-${String(v.getMonth() + 1).padStart(2, '0')}-${String(v.getDate()).padStart(2, '0')}`;
  }
  if (typeof v === 'string') return v.trim();
  if (typeof v === 'number' && Number.isNaN(v)) return null;
  return v;
}

/**
 * Parse shapefile sets (loose parts or the entries of a zip): PolyLine(Z) parts become lines,
 * Point(Z)/MultiPoint points, .dbf fields attributes. The CRS comes from `opts.crs`, else from the
 * .prj mapped to an EPSG code and checked against the catalogue; positions are reprojected with
 * proj4 from the catalogue's definition.
 *
 * @example
 * await parseShapefile([{ name: 'duct.shp', bytes }, { name: 'duct.shx', bytes }, { name: 'duct.dbf', bytes }, { name: 'duct.prj', bytes }], opts);
 */
export async function parseShapefile(files: PartFile[], opts: ParseOptions): Promise<ParsedUpload> {
  const sets = groupSets(files);
  const incomplete = sets
    .map((s) => ({ s, missing: (['shp', 'shx', 'dbf'] as const).filter((e) => !s[e]) }))
    .filter((x) => x.missing.length > 0);
  if (sets.length === 0) throw new IngestError('missing_parts', 'no shapefile parts (.shp, .shx, .dbf) were found');
  if (incomplete.length) {
    const list = incomplete.map(({ s, missing }) => `'${s.base}' lacks ${missing.map((e) => '.' + e).join(', ')}`).join('; ');
    throw new IngestError('missing_parts', `the shapefile is incomplete: ${list}; send .shp, .shx and .dbf together (with .prj)`, {
      missing: incomplete.map(({ s, missing }) => ({ set: s.base, missing: missing.map((e) => '.' + e) })),
    });
  }

  const features: ParsedFeature[] = [];
  const warnings: string[] = [];
  const problems: RangeProblem[] = [];
  const crsUsed: string[] = [];

  for (const set of sets) {
    const def = await crsFor(set, opts);
    crsUsed.push(`EPSG:${def.srid}`);
    const dw = datumWarning(def);
    if (dw && !warnings.includes(dw)) warnings.push(dw);
    const toWgs84 = makeTransformer(def);
    let geoms: ReturnType<typeof parseShp>;
    let records: ReturnType<typeof parseDbf>;
    try {
      geoms = parseShp(set.shp!.bytes);
      records = parseDbf(set.dbf!.bytes, set.cpg ? decodeText(set.cpg.bytes).trim() : undefined);
    } catch (e) {
      throw new IngestError('malformed', `the shapefile '${set.base}' cannot be read: ${(e as Error).message}`);
    }
    if (records.length !== geoms.length) warnings.push(`'${set.base}': ${geoms.length} shapes but ${records.length} .dbf records`);

    geoms.forEach((g, i) => {
      const attributes = Object.fromEntries(Object.entries(records[i] ?? {}).map(([k, v]) => [k, attributeValue(v)]));
      const rawName = attributes.name ?? attributes.NAME ?? attributes.Name;
      const name = rawName === undefined || rawName === null || rawName === '' ? null : String(rawName);
      const label = `'${set.base}' record ${i + 1}`;
      const convert = (c: number[], where: string): Position => {
        const p = toWgs84(c[0], c[1], c.length >= 3 ? c[2] : null);
        const m = positionProblem(p[0], p[1]);
        if (m) problems.push({ where, lon: p[0], lat: p[1], message: `${m} (from EPSG:${def.srid} ${c[0]}, ${c[1]})` });
        return p;
      };
      if (!g) {
        warnings.push(`${label} has a null shape; skipped`);
        return;
      }
      if (g.type === 'LineString' || g.type === 'MultiLineString') {
        const parts = g.type === 'LineString' ? [g.coordinates] : g.coordinates;
        parts.forEach((part, pi) => {
          const where = parts.length > 1 ? `${label} part ${pi + 1}` : label;
          const coords = part.map((c, j) => convert(c, `${where} position ${j + 1}`));
          if (coords.length < 2) {
            warnings.push(`${where} has ${coords.length} point; skipped`);
            return;
          }
          features.push({ kind: 'line', name, coords, times: null, pointAttributes: null, attributes: parts.length > 1 ? { ...attributes, part: pi + 1 } : attributes });
        });
      } else if (g.type === 'Point' || g.type === 'MultiPoint') {
        const pts = g.type === 'Point' ? [g.coordinates] : g.coordinates;
        pts.forEach((c, pi) => {
          const coord = convert(c, pts.length > 1 ? `${label} point ${pi + 1}` : label);
          features.push({ kind: 'point', name, coord, time: null, attributes: pts.length > 1 ? { ...attributes, part: pi + 1 } : attributes });
        });
      } else {
        warnings.push(`${label} is a ${g.type}; only lines and points are read, so it was skipped`);
      }
    });
  }

  if (problems.length) throw outOfRange(problems);
  const distinct = [...new Set(crsUsed)];
  if (distinct.length > 1) warnings.push(`the shapefile sets use different coordinate systems (${distinct.join(', ')}); all were reprojected to WGS 84`);
  return { format: 'shapefile', sourceCrs: distinct[0], features, warnings };
}

/**
 * Parse a zipped shapefile: every .shp/.shx/.dbf/.prj/.cpg set in the archive.
 *
 * @example
 * await parseZippedShapefile(zipBytes, opts);
 */
export async function parseZippedShapefile(bytes: Buffer, opts: ParseOptions & { limits: IngestLimits }): Promise<ParsedUpload> {
  const entries = await readZip(bytes, opts.limits, (n) => SHAPEFILE_PART.test(n));
  return parseShapefile(entries, opts);
}
