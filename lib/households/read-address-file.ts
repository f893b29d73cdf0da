import { parse as parseCsv } from 'csv-parse/sync';
import { parseDbf, parseShp } from 'shpjs';
import '@/lib/ingest/node-self';
import { decodeText } from '@/lib/ingest/decode-text';
import { detectFormat } from '@/lib/ingest/detect-format';
import { guessDelimiter } from '@/lib/ingest/guess-delimiter';
import { parseJson, sourceCrs } from '@/lib/ingest/parse-geojson';
import { attributeValue, crsFor, groupSets, SHAPEFILE_PART } from '@/lib/ingest/parse-shapefile';
import { readZip } from '@/lib/ingest/read-zip';
import { datumWarning, makeTransformer } from '@/lib/ingest/reproject';
import { resolveCrsName } from '@/lib/ingest/resolve-crs';
import { projectedGood } from '@/lib/ingest/survey-axes';
import { IngestError, type CrsDefinition, type CrsResolver, type IngestLimits } from '@/lib/ingest/types';
import type { AddressMapping, Positioner, SourceRow } from './address-mapping';

/**
 * Reads an address register file into rows of values by column: a CSV (the header names the columns; the
 * position is in lon/lat or x/y columns), GeoJSON Point features (properties are the columns), or a zipped
 * shapefile of points (.dbf fields are the columns, the .prj gives the CRS). Row numbers are as the person
 * sees them: the CSV's line (the header is row 1), the feature's index + 1.
 */

export type AddressFileFormat = 'csv' | 'geojson' | 'shapefile';

export interface AddressFile {
  format: AddressFileFormat;
  /** the columns in file order (CSV header, GeoJSON property names, .dbf fields) */
  columns: string[];
  rows: SourceRow[];
  /** GeoJSON and shapefile: the CRS of the points; CSV: undefined (it depends on the mapped columns) */
  geometryCrs?: CrsDefinition;
  warnings: string[];
}

export interface ReadOptions {
  resolveCrs: CrsResolver;
  limits: IngestLimits;
  /** the crs field: for a shapefile or GeoJSON it overrides the file's own */
  crs?: string;
}

const FORMATS = 'a CSV (lon/lat or x/y columns), GeoJSON points or a zipped shapefile of points';

export async function readAddressFile(file: { name: string; bytes: Buffer }, opts: ReadOptions): Promise<AddressFile> {
  let detected: ReturnType<typeof detectFormat>;
  try {
    detected = detectFormat([file]);
  } catch (err) {
    // a CSV of its header alone reads as no format at all: say what it is
    const lines = err instanceof IngestError && err.code === 'unknown_format' ? decodeText(file.bytes).split(/\r?\n/).filter((l) => l.trim() !== '') : [];
    if (lines.length === 1 && guessDelimiter(lines[0])) throw new IngestError('empty_file', `'${file.name}' is a CSV with a header but no rows`);
    throw err;
  }
  if (detected.container === 'loose') {
    throw new IngestError('unsupported_format', `'${file.name}' is one part of a shapefile; zip the .shp, .shx, .dbf and .prj together and send the zip`);
  }
  if (detected.format === 'gpx' || detected.format === 'kml' || detected.format === 'kmz') {
    throw new IngestError('unsupported_format', `'${file.name}' is a ${detected.format.toUpperCase()} file; the address register is imported from ${FORMATS}`);
  }
  if (detected.container === 'zip') return readShapefile(detected.file.bytes, opts);
  if (detected.format === 'geojson') return readGeoJson(detected.text, opts);
  return readCsv(detected.text);
}

function readCsv(text: string): AddressFile {
  const firstLine = text.replace(/^\uFEFF/, '').split(/\r?\n/).find((l) => l.trim() !== '') ?? '';
  const delimiter = guessDelimiter(firstLine) ?? ',';
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parseCsv(text, { delimiter, relax_column_count: true, skip_empty_lines: true, trim: true, bom: true, info: true }) as unknown as typeof records;
  } catch (e) {
    const line = (e as { lines?: number }).lines;
    throw new IngestError('malformed', `the CSV cannot be read${line ? ` at line ${line}` : ''}: ${(e as Error).message}`, { line });
  }
  if (records.length === 0) throw new IngestError('empty_file', 'the CSV has no lines');
  const columns = records[0].record;
  const blank = columns.findIndex((c) => c === '');
  if (blank >= 0) throw new IngestError('malformed', `the CSV header has an empty column name (column ${blank + 1}); name every column`);
  const twice = columns.find((c, i) => columns.indexOf(c) !== i);
  if (twice) throw new IngestError('malformed', `the CSV header names the column '${twice}' twice; name every column once`);
  if (records.length === 1) throw new IngestError('empty_file', 'the CSV has a header but no rows');
  const rows: SourceRow[] = records.slice(1).map(({ record, info }) => ({
    row: info.lines,
    values: Object.fromEntries(columns.map((c, i) => [c, record[i] ?? ''])),
    ...(record.length !== columns.length ? { problem: `the row has ${record.length} cells, the header has ${columns.length}` } : {}),
  }));
  return { format: 'csv', columns, rows, warnings: [] };
}

function columnsOf(rows: SourceRow[]): string[] {
  const out = new Set<string>();
  for (const r of rows) for (const k of Object.keys(r.values)) out.add(k);
  return [...out];
}

/** Refuses a file with no points at all: it holds lines or polygons, or nothing. */
function assertPoints(rows: SourceRow[], what: string): void {
  if (rows.length === 0) throw new IngestError('empty_file', `the ${what} holds no features`);
  if (rows.some((r) => r.point)) return;
  const kinds = [...new Set(rows.map((r) => r.geometryType ?? 'no geometry'))];
  throw new IngestError('unsupported_format', `the ${what} holds ${kinds.join(', ')} features and no points; an address register is one point per address`, { geometryTypes: kinds });
}

const onePoint = (g: { type?: string; coordinates?: unknown } | null | undefined): [number, number] | null => {
  if (!g) return null;
  const c = g.type === 'Point' ? g.coordinates : g.type === 'MultiPoint' && Array.isArray(g.coordinates) && g.coordinates.length === 1 ? g.coordinates[0] : null;
  return Array.isArray(c) && c.length >= 2 && typeof c[0] === 'number' && typeof c[1] === 'number' ? [c[0], c[1]] : null;
};

async function readGeoJson(text: string, opts: ReadOptions): Promise<AddressFile> {
  const root = parseJson(text) as Record<string, unknown>;
  if (!root || typeof root !== 'object' || Array.isArray(root)) throw new IngestError('malformed', 'the GeoJSON root is not an object');
  let list: { type?: string; geometry?: { type?: string; coordinates?: unknown } | null; properties?: Record<string, unknown> | null }[];
  if (root.type === 'FeatureCollection' && Array.isArray(root.features)) list = root.features as typeof list;
  else if (root.type === 'Feature') list = [root as (typeof list)[number]];
  else throw new IngestError('malformed', `the GeoJSON root has type ${JSON.stringify(root.type)}; an address register is a FeatureCollection of Point features`);
  const warnings: string[] = [];
  const def = (await sourceCrs(root, { crs: opts.crs, resolveCrs: opts.resolveCrs, limits: opts.limits }, warnings)) ?? WGS84;
  const rows: SourceRow[] = list.map((f, i) => {
    const point = onePoint(f?.geometry);
    const props = f && typeof f.properties === 'object' && f.properties !== null && !Array.isArray(f.properties) ? f.properties : {};
    return { row: i + 1, values: props, point, ...(point ? {} : f?.geometry?.type ? { geometryType: f.geometry.type } : {}) };
  });
  assertPoints(rows, 'GeoJSON');
  return { format: 'geojson', columns: columnsOf(rows), rows, geometryCrs: def, warnings };
}

async function readShapefile(bytes: Buffer, opts: ReadOptions): Promise<AddressFile> {
  const entries = await readZip(bytes, opts.limits, (n) => SHAPEFILE_PART.test(n) && !n.startsWith('__MACOSX/'));
  const sets = groupSets(entries);
  if (sets.length === 0) throw new IngestError('missing_parts', 'the zip holds no shapefile parts (.shp, .shx, .dbf)');
  if (sets.length > 1) throw new IngestError('malformed', `the zip holds ${sets.length} shapefiles (${sets.map((s) => s.base).join(', ')}); send the address points as one shapefile`);
  const set = sets[0];
  const missing = (['shp', 'shx', 'dbf'] as const).filter((e) => !set[e]);
  if (missing.length) throw new IngestError('missing_parts', `the shapefile '${set.base}' lacks ${missing.map((e) => '.' + e).join(', ')}; zip .shp, .shx and .dbf together (with .prj)`);
  const def = await crsFor(set, { crs: opts.crs, resolveCrs: opts.resolveCrs, limits: opts.limits });
  let geoms: ReturnType<typeof parseShp>;
  let records: ReturnType<typeof parseDbf>;
  try {
    geoms = parseShp(set.shp!.bytes);
    records = parseDbf(set.dbf!.bytes, set.cpg ? decodeText(set.cpg.bytes).trim() : undefined);
  } catch (e) {
    throw new IngestError('malformed', `the shapefile '${set.base}' cannot be read: ${(e as Error).message}`);
  }
  const rows: SourceRow[] = geoms.map((g, i) => {
    const values = Object.fromEntries(Object.entries(records[i] ?? {}).map(([k, v]) => [k, attributeValue(v)]));
    const point = onePoint(g as { type?: string; coordinates?: unknown } | null);
    return { row: i + 1, values, point, ...(point ? {} : g ? { geometryType: g.type } : {}) };
  });
  assertPoints(rows, 'shapefile');
  const warnings = records.length !== geoms.length ? [`'${set.base}': ${geoms.length} shapes but ${records.length} .dbf records`] : [];
  return { format: 'shapefile', columns: columnsOf(rows), rows, geometryCrs: def, warnings };
}

const WGS84: CrsDefinition = { srid: 4326, name: 'WGS 84', proj4: '+proj=longlat +datum=WGS84 +no_defs' };

const label = (def: CrsDefinition) => `EPSG:${def.srid} (${def.name})`;

function positionerFor(def: CrsDefinition, source: Positioner['source']): Positioner {
  const toWgs84 = makeTransformer(def);
  const geographic = /\+proj=(longlat|latlong)\b/.test(def.proj4);
  const good = geographic ? null : projectedGood(def);
  return {
    source,
    crsLabel: label(def),
    axes: geographic ? ['longitude', 'latitude'] : ['easting', 'northing'],
    toWgs84: (a, b) => {
      const p = toWgs84(a, b);
      return [p[0], p[1]];
    },
    inArea: (a, b, ll) => (good ? good(ll, [a, b]) : true),
  };
}

/**
 * How the rows' positions are read with this mapping: the points of a GeoJSON or shapefile in its CRS, else
 * the x/y columns in the crs field's CRS (when mapped and a crs is given, or when no lon/lat is mapped), else
 * the lon/lat columns as WGS 84. Returns the positioner, the CRS used ('EPSG:nnnn') and its datum warning.
 * Throws 'crs_required' for x/y columns without a crs.
 */
export async function positionerForFile(file: AddressFile, mapping: AddressMapping, opts: ReadOptions): Promise<{ positioner: Positioner; crs: string; warning: string | null }> {
  if (file.geometryCrs) {
    const def = file.geometryCrs;
    return { positioner: positionerFor(def, 'geometry'), crs: `EPSG:${def.srid}`, warning: datumWarning(def) };
  }
  const xy = Boolean(mapping.x && mapping.y);
  const lonlat = Boolean(mapping.lon && mapping.lat);
  if (xy && (opts.crs || !lonlat)) {
    if (!opts.crs) {
      throw new IngestError('crs_required', `the CSV has easting/northing columns ('${mapping.x}', '${mapping.y}'); give the EPSG code of their coordinate system in the crs field (for example 27700 for the British National Grid)`);
    }
    const def = await resolveCrsName(opts.crs, opts.resolveCrs);
    return { positioner: positionerFor(def, 'xy'), crs: `EPSG:${def.srid}`, warning: datumWarning(def) };
  }
  return { positioner: positionerFor(WGS84, 'lonlat'), crs: 'EPSG:4326', warning: null };
}
