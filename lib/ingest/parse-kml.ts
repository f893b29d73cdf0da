import { kml } from '@tmcw/togeojson';
import { DOMParser } from '@xmldom/xmldom';
import type { Feature, Geometry } from 'geojson';
import { assertSafeXml } from './check-xml';
import { decodeText } from './decode-text';
import { readZip } from './read-zip';
import { badTimesError, timesToUtc, timeToUtc, type BadTime } from './utc-time';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { KML_NOT_DATA as NOT_DATA, parseKmlStream } from './parse-kml-stream';
import { IngestError, type IngestLimits, type ParsedFeature, type ParsedUpload, type Position } from './types';

// above ~2M chars the xmldom tree (up to ~100x the text for gx:Track files) costs seconds and hundreds of MB; saxes keeps only the features
export const KML_STREAM_THRESHOLD = 2 * 1024 * 1024;

function parseXml(text: string): Document {
  let reason = '';
  const parser = new DOMParser({
    onError: (level, message) => {
      // xmldom only throws on fatal errors; mismatched quotes and similar are 'error' and must stop too
      if (level === 'warning') return;
      reason = message;
      throw new Error(message);
    },
  });
  try {
    return parser.parseFromString(text, 'text/xml') as unknown as Document;
  } catch (e) {
    const loc = (e as { locator?: { lineNumber?: number; columnNumber?: number } }).locator ?? {};
    const line = loc.lineNumber ?? 0;
    const column = loc.columnNumber ?? 0;
    throw new IngestError('malformed', `the KML is not well-formed XML at line ${line}, column ${column}: ${reason || (e as Error).message}`, { line, column });
  }
}

function parts(g: Geometry | null): Geometry[] {
  if (!g) return [];
  return g.type === 'GeometryCollection' ? g.geometries.flatMap(parts) : [g];
}

function toPosition(c: number[]): Position {
  return c.length >= 3 && Number.isFinite(c[2]) ? [c[0], c[1], c[2]] : [c[0], c[1]];
}

/**
 * Parse a KML 2.2 document (text) with @tmcw/togeojson over @xmldom/xmldom, or, above
 * KML_STREAM_THRESHOLD characters, with the streaming parser (parseKmlStream), which reads the same.
 *
 * Each part of a MultiGeometry becomes its own feature (attribute `part`); gx:Track times are kept;
 * Placemark name and ExtendedData go into attributes; polygons are skipped with a warning.
 *
 * @example
 * parseKml('<kml xmlns="http://www.opengis.net/kml/2.2"><Placemark><name>A</name><Point><coordinates>13.4,52.5</coordinates></Point></Placemark></kml>');
 * // { format: 'kml', features: [{ kind: 'point', name: 'A', coord: [13.4, 52.5], … }], … }
 */
export function parseKml(text: string, format: 'kml' | 'kmz' = 'kml'): ParsedUpload {
  return text.length > KML_STREAM_THRESHOLD ? parseKmlStream(text, format) : parseKmlDom(text, format);
}

/**
 * The togeojson path of parseKml, used for files up to KML_STREAM_THRESHOLD characters (and as the
 * oracle the streaming parser is tested against).
 *
 * @example
 * parseKmlDom(text).features.length === parseKmlStream(text).features.length; // true
 */
export function parseKmlDom(text: string, format: 'kml' | 'kmz' = 'kml'): ParsedUpload {
  assertSafeXml(text);
  const doc = parseXml(text);
  const root = doc.documentElement;
  if (!root || root.localName !== 'kml') throw new IngestError('malformed', `the root element is <${root?.tagName ?? '?'}>, not <kml>`);
  const fc = kml(doc);
  const features: ParsedFeature[] = [];
  const warnings: string[] = [];
  const problems: RangeProblem[] = [];
  const badTimes: BadTime[] = [];

  (fc.features as Feature<Geometry | null>[]).forEach((f, index) => {
    const props = (f.properties ?? {}) as Record<string, unknown>;
    const name = typeof props.name === 'string' && props.name.trim() ? props.name.trim() : null;
    const label = `placemark ${index + 1}${name ? ` '${name}'` : ''}`;
    const attributes = Object.fromEntries(Object.entries(props).filter(([k]) => !NOT_DATA.has(k)));
    const geoms = parts(f.geometry);
    if (geoms.length === 0) {
      warnings.push(`${label} has no geometry; skipped`);
      return;
    }
    const raw = (props.coordinateProperties as { times?: string[] | string[][] } | undefined)?.times;
    const trackTimes: string[][] = raw ? (Array.isArray(raw[0]) ? (raw as string[][]) : [raw as string[]]) : [];
    // togeojson reports track times per track, not per geometry: they line up only when every part is a track
    const timesFor = trackTimes.length === geoms.length ? trackTimes : null;
    if (trackTimes.length && !timesFor) warnings.push(`${label} mixes gx:Track with other geometry; its times were dropped`);

    geoms.forEach((g, i) => {
      const partAttrs = geoms.length > 1 ? { ...attributes, part: i + 1 } : attributes;
      const where = `${label}${geoms.length > 1 ? ` part ${i + 1}` : ''}`;
      const check = (p: Position, j?: number) => {
        const m = positionProblem(p[0], p[1]);
        if (m) problems.push({ where: j === undefined ? where : `${where} position ${j + 1}`, lon: p[0], lat: p[1], message: m });
      };
      let times = timesFor?.[i] ? timesToUtc(timesFor[i], where, badTimes) : null;
      if (g.type === 'LineString' || g.type === 'MultiLineString') {
        const lines = g.type === 'LineString' ? [g.coordinates] : g.coordinates;
        for (const line of lines) {
          const coords = line.map(toPosition);
          coords.forEach(check);
          if (times && times.length !== coords.length) {
            warnings.push(`${where}: ${times.length} <when> for ${coords.length} <gx:coord>; times dropped`);
            times = null;
          }
          if (coords.length < 2) {
            warnings.push(`${where} has ${coords.length} point; skipped`);
            continue;
          }
          features.push({ kind: 'line', name, coords, times, pointAttributes: null, attributes: partAttrs });
        }
      } else if (g.type === 'Point' || g.type === 'MultiPoint') {
        const pts = g.type === 'Point' ? [g.coordinates] : g.coordinates;
        for (const c of pts) {
          const coord = toPosition(c);
          check(coord);
          features.push({ kind: 'point', name, coord, time: times?.[0] ?? timeToUtc(props.timestamp, `${where} <TimeStamp>`, badTimes), attributes: partAttrs });
        }
      } else {
        warnings.push(`${where} is a ${g.type}; only lines and points are read, so it was skipped`);
      }
    });
  });

  if (problems.length) throw outOfRange(problems);
  if (badTimes.length) throw badTimesError(badTimes);
  return { format, sourceCrs: 'EPSG:4326', features, warnings };
}

/**
 * Parse a KMZ: the root doc.kml, else the first .kml at the root (as Google Earth reads it), else the only .kml.
 *
 * @example
 * const upload = await parseKmz(bytes, { maxInflatedBytes: 200e6, maxZipEntries: 1000 });
 */
export async function parseKmz(bytes: Buffer, limits: IngestLimits): Promise<ParsedUpload> {
  const entries = await readZip(bytes, limits, (n) => /\.kml$/i.test(n));
  const main =
    entries.find((e) => e.name.toLowerCase() === 'doc.kml') ??
    entries.find((e) => !e.name.includes('/')) ??
    (entries.length === 1 ? entries[0] : undefined);
  if (!main) {
    throw new IngestError('malformed', entries.length ? `the KMZ holds several .kml files in folders (${entries.map((e) => e.name).join(', ')}) and no doc.kml` : 'the KMZ holds no .kml file');
  }
  return parseKml(decodeText(main.bytes), 'kmz');
}
