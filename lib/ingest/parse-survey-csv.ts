import { parse } from 'csv-parse/sync';
import { guessByAliases } from './guess-columns';
import { guessDelimiter } from './guess-delimiter';
import { datumWarning, makeTransformer } from './reproject';
import { resolveCrsName } from './resolve-crs';
import { checkSwap, type Oriented } from './survey-axes';
import { buildFeatures, type Row } from './survey-features';
import { timeProblem } from './utc-time';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { IngestError, type ColumnMap, type ParseOptions, type ParsedUpload, type Position } from './types';

/** Header spellings per column, compared after lower-casing and dropping spaces, dots and dashes. */
const ALIASES: Record<keyof ColumnMap, string[]> = {
  id: ['pt', 'point', 'id', 'name', 'pointid', 'point_id', 'pt_id', 'ptid', 'pointname', 'pointno', 'pno', 'station'],
  x: ['easting', 'east', 'e', 'x', 'rechtswert'],
  y: ['northing', 'north', 'n', 'y', 'hochwert'],
  z: ['height', 'elev', 'elevation', 'z', 'h', 'alt', 'altitude', 'ortho_height', 'orthometric_height', 'ellipsoidal_height'],
  lat: ['lat', 'latitude'],
  lon: ['lon', 'long', 'longitude', 'lng'],
  code: ['code', 'desc', 'description', 'feature', 'feature_code', 'featurecode'],
  line: ['line', 'line_id', 'lineid', 'string', 'string_id', 'stringid'],
  date: ['datetime', 'date_time', 'timestamp', 'date', 'time'],
  fix: ['fix', 'solution', 'fix_type', 'solution_type', 'status'],
  rmsH: ['rms_h', 'hrms', 'h_rms', 'sigma_h', 'hsdv', 'h_prec'],
  rmsV: ['rms_v', 'vrms', 'v_rms', 'sigma_v', 'vsdv', 'v_prec'],
  depth: ['depth', 'cover', 'cover_m', 'cover_depth', 'depth_m', 'doc'],
};

/**
 * Map headers to columns by their usual names; each header is used at most once.
 *
 * @example
 * guessColumns(['Pt', 'Easting', 'Northing', 'Elev', 'Code']); // { id: 'Pt', x: 'Easting', y: 'Northing', z: 'Elev', code: 'Code' }
 */
export function guessColumns(headers: string[]): ColumnMap {
  return guessByAliases(headers, ALIASES) as ColumnMap;
}


interface BadRow {
  row: number;
  message: string;
}

/**
 * Parse a survey CSV (GNSS rover or total station export).
 *
 * Lines are formed in file order by this rule: with a line column, rows sharing a non-empty line
 * id form a line and rows with an empty line id stay points; without one, rows sharing a code form
 * a line when the code has ≥ 2 rows, and the other rows stay points. A line id or code with one
 * row stays a point. Row numbers in messages are the file's line numbers (the header is line 1).
 *
 * @example
 * await parseSurveyCsv('pt,e,n,h,line\n1,500000,5700000,98.2,L1\n2,500010,5700000,98.1,L1\n', { crs: 'EPSG:25832', resolveCrs, limits });
 * // one line 'L1' with two positions in WGS 84
 */
export async function parseSurveyCsv(text: string, opts: ParseOptions): Promise<ParsedUpload> {
  const firstLine = text.replace(/^\uFEFF/, '').split(/\r?\n/).find((l) => l.trim() !== '') ?? '';
  const delimiter = guessDelimiter(firstLine) ?? ',';
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, { delimiter, relax_column_count: true, skip_empty_lines: true, trim: true, bom: true, info: true }) as unknown as typeof records;
  } catch (e) {
    const line = (e as { lines?: number }).lines;
    throw new IngestError('malformed', `the CSV cannot be read${line ? ` at line ${line}` : ''}: ${(e as Error).message}`, { line });
  }
  if (records.length === 0) throw new IngestError('empty_file', 'the CSV has no lines');
  const headers = records[0].record;
  const data = records.slice(1);
  if (data.length === 0) throw new IngestError('empty_file', 'the CSV has a header but no rows');

  const warnings: string[] = [];
  const guessed = !opts.columns;
  const map: ColumnMap = opts.columns ? { ...opts.columns } : guessColumns(headers);
  for (const [key, h] of Object.entries(map)) {
    if (h !== undefined && !headers.includes(h)) {
      throw new IngestError('malformed', `column '${h}' given for ${key} is not in the CSV header (${headers.join(', ')})`);
    }
  }
  const projected = map.x !== undefined && map.y !== undefined;
  const geographic = map.lat !== undefined && map.lon !== undefined;
  if (!projected && !geographic) {
    throw new IngestError('malformed', `no coordinate columns were found in the header (${headers.join(', ')}); name them in the columns field: x and y (easting, northing) or lat and lon`);
  }
  const useXY = projected && (!geographic || Boolean(opts.crs));
  // a rover may export both: the pair not used must not show up in the reported mapping
  for (const k of useXY ? (['lat', 'lon'] as const) : (['x', 'y'] as const)) delete map[k];
  if (guessed) {
    const desc = Object.entries(map).map(([k, h]) => `${k}='${h}'`).join(', ');
    warnings.push(`columns were guessed from the header: ${desc}; send columns to set them explicitly`);
  }

  const index = Object.fromEntries(Object.entries(map).map(([k, h]) => [k, headers.indexOf(h as string)])) as Partial<Record<keyof ColumnMap, number>>;
  // a decimal comma is only possible when the comma is not the delimiter
  const num = (s: string): number => {
    const t = delimiter !== ',' && /^[-+]?\d+,\d+$/.test(s) ? s.replace(',', '.') : s;
    return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
  };
  // a date shaped like one but naming no real day or time (2024-02-31) would be stored rolled over or fail
  const dateWrong = (v: string | null) => {
    const why = timeProblem(v);
    return why !== null && `time '${v}' names a day or time that does not exist (${why})`;
  };
  const [ka, kb] = useXY ? (['x', 'y'] as const) : (['lon', 'lat'] as const);
  const rows: Row[] = [];
  const bad: BadRow[] = [];
  for (const { record, info } of data) {
    const line = info.lines;
    if (record.length !== headers.length) {
      bad.push({ row: line, message: `row ${line} has ${record.length} columns, the header has ${headers.length}` });
      continue;
    }
    const get = (key: keyof ColumnMap) => (index[key] === undefined ? null : record[index[key]!] || null);
    const a = num(get(ka) ?? '');
    const b = num(get(kb) ?? '');
    const zRaw = get('z');
    const z = zRaw === null ? null : num(zRaw);
    const wrong = [
      Number.isNaN(a) && `${ka === 'x' ? 'easting' : 'longitude'} '${get(ka) ?? ''}' is not a number`,
      Number.isNaN(b) && `${kb === 'y' ? 'northing' : 'latitude'} '${get(kb) ?? ''}' is not a number`,
      z !== null && Number.isNaN(z) && `height '${zRaw}' is not a number`,
      dateWrong(get('date')),
    ].filter(Boolean);
    if (wrong.length) bad.push({ row: line, message: `row ${line}: ${wrong.join(', ')}` });
    else rows.push({ line, a, b, z, get });
  }
  if (bad.length) {
    throw new IngestError('malformed', `${bad.length} row${bad.length === 1 ? '' : 's'} cannot be read (rows ${bad.map((r) => r.row).join(', ')}): ${bad.map((r) => r.message).join('; ')}`, {
      rows: bad,
    });
  }

  let sourceCrs = 'EPSG:4326';
  let positions: Position[];
  if (useXY) {
    if (!opts.crs) {
      // the columns go with the refusal, so that a form can show them recognised while it asks for the grid
      throw new IngestError('crs_required', `the CSV has easting/northing columns ('${map.x}', '${map.y}'); send the EPSG code of their coordinate system in the crs field`, {
        columns: { map, guessed, headers },
      });
    }
    const def = await resolveCrsName(opts.crs, opts.resolveCrs);
    sourceCrs = `EPSG:${def.srid}`;
    const dw = datumWarning(def);
    if (dw) warnings.push(dw);
    const toWgs84 = makeTransformer(def);
    const check = (xy: [number, number][]): Oriented => ({ lonlat: xy.map(([x, y]) => toWgs84(x, y)), source: xy });
    checkSwap({
      kind: 'projected',
      def,
      asIs: check(rows.map((r) => [r.a, r.b])),
      swapped: check(rows.map((r) => [r.b, r.a])),
      extent: opts.projectExtent ?? null,
      columns: [map.x!, map.y!],
      rows: rows.map((r) => r.line),
    });
    positions = rows.map((r) => toWgs84(r.a, r.b, r.z));
  } else {
    checkSwap({
      kind: 'geographic',
      asIs: { lonlat: rows.map((r) => [r.a, r.b]), source: rows.map((r) => [r.a, r.b]) },
      swapped: { lonlat: rows.map((r) => [r.b, r.a]), source: rows.map((r) => [r.b, r.a]) },
      extent: opts.projectExtent ?? null,
      columns: [map.lon!, map.lat!],
      rows: rows.map((r) => r.line),
    });
    positions = rows.map((r) => (r.z === null ? [r.a, r.b] : [r.a, r.b, r.z]));
  }
  const problems: RangeProblem[] = [];
  positions.forEach((p, i) => {
    const m = positionProblem(p[0], p[1]);
    if (m) problems.push({ where: `row ${rows[i].line}`, lon: p[0], lat: p[1], message: m });
  });
  if (problems.length) throw outOfRange(problems);

  const features = buildFeatures(rows, positions, map, warnings);
  return { format: 'csv', sourceCrs, features, warnings, columns: { map, guessed, headers } };
}
