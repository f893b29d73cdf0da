import { SaxesParser, type SaxesTagPlain } from 'saxes';
import { assertSafeXml } from './check-xml';
import { badTimesError, timesToUtc, timeToUtc, type BadTime } from './utc-time';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { IngestError, type ParsedFeature, type ParsedUpload, type Position } from './types';

const CHUNK = 1 << 16;

/**
 * Property names that describe styling or togeojson's own bookkeeping, not the placemark's data.
 * Shared with the togeojson path in parse-kml.ts, so that both drop the same keys.
 */
export const KML_NOT_DATA = new Set([
  'name', 'coordinateProperties', 'styleUrl', 'styleHash', 'styleMapHash', 'stroke', 'stroke-opacity', 'stroke-width',
  'fill', 'fill-opacity', 'icon', 'icon-color', 'icon-opacity', 'icon-scale', 'icon-heading', 'icon-offset',
  'icon-offset-units', 'label-color', 'label-opacity', 'label-scale', 'visibility', 'open',
]);

// SimpleField types as togeojson converts them; anything else stays a string
const NUMERIC_TYPES = new Set(['int', 'uint', 'short', 'ushort', 'float', 'double']);
type Converter = (x: string) => unknown;
const asString: Converter = (x) => x;
const asNumber: Converter = (x) => Number(x);
const asBool: Converter = (x) => Boolean(x);

/** A geometry as togeojson would have produced it (only what parseKml looks at). */
type Part = { type: 'LineString'; coords: Position[] } | { type: 'Point'; coord: Position } | { type: 'Polygon' };

/** A text capture: the textContent of the element opened at `depth`, handed to `done` when it closes. */
interface Capture {
  depth: number;
  text: string;
  /** first CDATA section that is a direct child (only tracked for <description>) */
  cdata: string | undefined;
  done: (text: string, cdata: string | undefined) => void;
}

interface Box {
  north?: string;
  south?: string;
  east?: string;
  west?: string;
}

/**
 * What togeojson reads from one Placemark, GroundOverlay or NetworkLink. Like togeojson, the
 * properties come from the FIRST matching descendant (at any depth), and geometry only from
 * direct children of the Placemark (and of MultiGeometry children, recursively).
 */
interface Rec {
  kind: 'Placemark' | 'GroundOverlay' | 'NetworkLink';
  depth: number;
  name?: string;
  address?: string;
  phoneNumber?: string;
  description?: string;
  descriptionHtml?: string;
  data: [string, string][];
  simple: [string, string][];
  timespan?: { begin: string; end: string };
  timestamp?: string;
  parts: Part[];
  coordTimes: string[][];
  // bookkeeping while streaming
  seen: Set<string>;
  extDepth: number;
  openData: { depth: number; entry: [string, string]; hasValue: boolean }[];
  spanDepth: number;
  stampDepth: number;
  // GroundOverlay / NetworkLink
  quad: boolean;
  regionDepth: number;
  boxDepth: number;
  box: Box | null;
}

/** The geometry element being read (at most one at a time: geometries do not nest). */
interface Geom {
  type: 'Point' | 'LineString' | 'Polygon' | 'Track';
  depth: number;
  text: string | null;
  /** Polygon: each LinearRing descendant's first <coordinates> text; the rings still open */
  rings: { text: string | null; depth: number }[];
  openRings: { text: string | null; depth: number }[];
  /** Track: unprefixed <coord>, else any prefixed *:coord (togeojson's rule), and every <when> */
  plain: Position[];
  prefixed: Position[];
  whens: string[];
}

function newRec(kind: Rec['kind'], depth: number): Rec {
  return {
    kind, depth, data: [], simple: [], parts: [], coordTimes: [], seen: new Set(), extDepth: -1, openData: [],
    spanDepth: -1, stampDepth: -1, quad: false, regionDepth: -1, boxDepth: -1, box: null,
  };
}

function localName(name: string): string {
  const c = name.indexOf(':');
  return c < 0 ? name : name.slice(c + 1);
}

/** One "lon,lat[,alt]" tuple the way togeojson's coord1 reads it: parseFloat per field, NaN fields dropped, ≤ 3 kept. */
function tuple(s: string): Position | null {
  let n = 0;
  let a = 0;
  let b = 0;
  let c = 0;
  let start = 0;
  for (;;) {
    const comma = s.indexOf(',', start);
    const v = Number.parseFloat(comma < 0 ? s.slice(start) : s.slice(start, comma));
    if (v === v) {
      if (n === 0) a = v;
      else if (n === 1) b = v;
      else c = v;
      if (++n === 3) break;
    }
    if (comma < 0) break;
    start = comma + 1;
  }
  if (n < 2) return null;
  return n === 3 && Number.isFinite(c) ? [a, b, c] : [a, b];
}

const SPACE = /\s+/;

/** <coordinates> of a LineString/LinearRing: tuples separated by any whitespace; tuples with < 2 numbers dropped. */
function lineCoords(text: string): Position[] {
  const out: Position[] = [];
  const tokens = text.trim().split(SPACE);
  for (let i = 0; i < tokens.length; i++) {
    const p = tuple(tokens[i]);
    if (p) out.push(p);
  }
  return out;
}

/** The raw numbers of each tuple, for the polygon ring test (togeojson's fixRing compares them). */
function ringLength(text: string): number {
  const tokens = text.trim().split(SPACE);
  const raw: number[][] = [];
  for (const t of tokens) {
    const nums = t.split(',').map(Number.parseFloat).filter((v) => !Number.isNaN(v)).slice(0, 3);
    if (nums.length >= 2) raw.push(nums);
  }
  if (raw.length === 0) return 0;
  const first = raw[0];
  const last = raw[raw.length - 1];
  for (let i = 0; i < Math.max(first.length, last.length); i++) if (first[i] !== last[i]) return raw.length + 1;
  return raw.length;
}

/**
 * A gx:coord, read as togeojson does: fields split on single spaces, parseFloat, then [lon, lat]
 * plus the height when it is finite. Written out by hand, as split/map costs more than the XML does.
 */
function trackCoord(s: string): Position {
  const i = s.indexOf(' ');
  // "13.4" alone: togeojson gives [13.4] and parseKml reads lat as undefined, which the range check reports
  if (i < 0) return [Number.parseFloat(s), undefined as unknown as number];
  const x = Number.parseFloat(s.slice(0, i));
  const j = s.indexOf(' ', i + 1);
  if (j < 0) return [x, Number.parseFloat(s.slice(i + 1))];
  const y = Number.parseFloat(s.slice(i + 1, j));
  const k = s.indexOf(' ', j + 1);
  const z = Number.parseFloat(k < 0 ? s.slice(j + 1) : s.slice(j + 1, k));
  return Number.isFinite(z) ? [x, y, z] : [x, y];
}

/**
 * Parse a KML 2.2 document by streaming it through saxes: the same features, attributes, warnings
 * and errors as the @tmcw/togeojson path of parseKml, without building a DOM.
 *
 * Placemarks at any depth (Document, Folder …); LineString, LinearRing, Point, MultiGeometry (one
 * feature per part, attribute `part`), gx:Track (times kept when every part is a track with
 * <when>s); name and ExtendedData (Data/value, SchemaData/SimpleData) into attributes; polygons,
 * ground overlays and network links are skipped with a warning. Throws 'malformed' (line and
 * column from saxes) or 'out_of_range' (every bad position listed).
 *
 * @example
 * const upload = parseKmlStream(await readFile('big.kml', 'utf8'));
 * upload.features[0]; // { kind: 'line', name: 'Duct 1', coords: [[13.4049, 52.52, 34], …], … }
 */
export function parseKmlStream(text: string, format: 'kml' | 'kmz' = 'kml'): ParsedUpload {
  assertSafeXml(text);
  const parser = new SaxesParser({ position: true });
  const placemarks: Rec[] = [];
  const overlays: Rec[] = [];
  const links: Rec[] = [];
  const schema = new Map<string, Converter>();
  const recs: Rec[] = []; // open Placemark/GroundOverlay/NetworkLink, innermost last
  const captures: Capture[] = [];
  let depth = 0;
  let root: string | null = null;
  let rootOk = true;
  /** depths that hold geometry children: the open Placemark and MultiGeometry chains inside it */
  const container: boolean[] = [];
  let geom: Geom | null = null;

  const capture = (d: number, done: Capture['done']) => captures.push({ depth: d, text: '', cdata: undefined, done });
  /** capture the element's text once per record: the first one wins, as togeojson's get1 */
  const first = (rec: Rec, key: string, d: number, done: (s: string) => void) => {
    if (rec.seen.has(key)) return;
    rec.seen.add(key);
    capture(d, done);
  };

  parser.on('error', (e) => {
    throw new IngestError('malformed', `the KML is not well-formed XML at line ${parser.line}, column ${parser.column}: ${e.message.replace(/^(?:.*?:)?\d+:\d+: /, '')}`, {
      line: parser.line,
      column: parser.column,
    });
  });

  /** prefixes declared by xmlns:p attributes, with the depth of the declaring element */
  const declared: [number, string][] = [];
  const isBound = (prefix: string) => prefix === 'xml' || declared.some(([, p]) => p === prefix);
  // xmldom refuses an undeclared prefix (e.g. gx:Track without xmlns:gx); saxes without xmlns does not, so check here
  const checkPrefixes = (name: string, attrs: Record<string, string>, d: number) => {
    for (const a in attrs) if (a.startsWith('xmlns:')) declared.push([d, a.slice(6)]);
    const c = name.indexOf(':');
    if (c >= 0 && !isBound(name.slice(0, c))) parser.fail(`unbound namespace prefix: "${name.slice(0, c)}" in <${name}>.`);
    for (const a in attrs) {
      const ac = a.indexOf(':');
      if (ac >= 0 && !a.startsWith('xmlns:') && !isBound(a.slice(0, ac))) parser.fail(`unbound namespace prefix: "${a.slice(0, ac)}" in attribute ${a}.`);
    }
  };

  parser.on('opentag', (tag) => {
    const name = tag.name;
    const d = ++depth;
    container[d] = false;
    const attrs = (tag as SaxesTagPlain).attributes as Record<string, string>;
    checkPrefixes(name, attrs, d);
    if (d === 1) {
      root = name;
      rootOk = localName(name) === 'kml';
    }
    if (!rootOk) return;

    if (name === 'SimpleField') {
      const type = attrs.type || '';
      schema.set(attrs.name || '', NUMERIC_TYPES.has(type) ? asNumber : type === 'bool' ? asBool : asString);
    }
    if (name === 'Placemark' || name === 'GroundOverlay' || name === 'NetworkLink') {
      const rec = newRec(name, d);
      (name === 'Placemark' ? placemarks : name === 'GroundOverlay' ? overlays : links).push(rec);
      recs.push(rec);
      if (name === 'Placemark') {
        container[d] = true;
        geom = null;
      }
      return;
    }
    const rec = recs[recs.length - 1];
    if (!rec) return;

    // geometry: direct children of the placemark or of a MultiGeometry in it
    if (rec.kind === 'Placemark' && container[d - 1] && !geom) {
      switch (name) {
        case 'MultiGeometry':
        case 'MultiTrack':
        case 'gx:MultiTrack':
          container[d] = true;
          break;
        case 'Point':
        case 'LineString':
        case 'LinearRing':
        case 'Polygon':
          geom = { type: name === 'LinearRing' ? 'LineString' : name, depth: d, text: null, rings: [], openRings: [], plain: [], prefixed: [], whens: [] };
          break;
        case 'Track':
        case 'gx:Track':
          geom = { type: 'Track', depth: d, text: null, rings: [], openRings: [], plain: [], prefixed: [], whens: [] };
          break;
      }
    } else if (geom) {
      const g = geom;
      if (g.type === 'Track') {
        if (name === 'when') {
          const i = g.whens.push('') - 1;
          capture(d, (s) => (g.whens[i] = s));
        } else if (localName(name) === 'coord') {
          const list = name === 'coord' ? g.plain : g.prefixed;
          const i = list.push([Number.NaN, Number.NaN]) - 1;
          capture(d, (s) => (list[i] = trackCoord(s)));
        }
      } else if (g.type === 'Polygon') {
        if (name === 'LinearRing') {
          const ring = { text: null, depth: d };
          g.rings.push(ring);
          g.openRings.push(ring);
        } else if (name === 'coordinates') {
          const open = g.openRings.filter((r) => r.text === null);
          if (open.length) capture(d, (s) => open.forEach((r) => (r.text = s)));
        }
      } else if (name === 'coordinates' && g.text === null) {
        g.text = '';
        capture(d, (s) => (g.text = s));
      }
    }

    // properties: the first matching descendant, at any depth
    switch (name) {
      case 'name':
        first(rec, name, d, (s) => (rec.name = s));
        break;
      case 'address':
        first(rec, name, d, (s) => (rec.address = s));
        break;
      case 'phoneNumber':
        first(rec, name, d, (s) => (rec.phoneNumber = s));
        break;
      case 'description':
        if (!rec.seen.has(name)) {
          rec.seen.add(name);
          capture(d, (s, cdata) => {
            rec.description = s;
            rec.descriptionHtml = cdata;
          });
        }
        break;
      case 'ExtendedData':
        if (!rec.seen.has(name)) {
          rec.seen.add(name);
          rec.extDepth = d;
        }
        break;
      case 'TimeSpan':
        if (!rec.seen.has(name)) {
          rec.seen.add(name);
          rec.spanDepth = d;
          rec.timespan = { begin: '', end: '' };
        }
        break;
      case 'TimeStamp':
        if (!rec.seen.has(name)) {
          rec.seen.add(name);
          rec.stampDepth = d;
          rec.timestamp = '';
        }
        break;
    }
    if (rec.extDepth > 0 && d > rec.extDepth) {
      if (name === 'Data') {
        const entry: [string, string] = [attrs.name || '', ''];
        rec.data.push(entry);
        rec.openData.push({ depth: d, entry, hasValue: false });
      } else if (name === 'value') {
        const open = rec.openData.filter((o) => !o.hasValue);
        open.forEach((o) => (o.hasValue = true));
        if (open.length) capture(d, (s) => open.forEach((o) => (o.entry[1] = s)));
      } else if (name === 'SimpleData') {
        const entry: [string, string] = [attrs.name || '', ''];
        rec.simple.push(entry);
        capture(d, (s) => (entry[1] = s));
      }
    }
    if (rec.spanDepth > 0 && d > rec.spanDepth && (name === 'begin' || name === 'end')) {
      const span = rec.timespan!;
      first(rec, `TimeSpan/${name}`, d, (s) => (span[name] = s));
    }
    if (rec.stampDepth > 0 && d > rec.stampDepth && name === 'when') first(rec, 'TimeStamp/when', d, (s) => (rec.timestamp = s));

    if (rec.kind === 'GroundOverlay') {
      if (name === 'gx:LatLonQuad') rec.quad = true;
      if (name === 'LatLonBox' && !rec.seen.has(name)) {
        rec.seen.add(name);
        rec.boxDepth = d;
        rec.box = {};
      }
    } else if (rec.kind === 'NetworkLink') {
      if (name === 'Region' && !rec.seen.has(name)) {
        rec.seen.add(name);
        rec.regionDepth = d;
      } else if (name === 'LatLonAltBox' && rec.regionDepth > 0 && d > rec.regionDepth && !rec.seen.has(name)) {
        rec.seen.add(name);
        rec.boxDepth = d;
        rec.box = {};
      }
    }
    if (rec.boxDepth > 0 && d > rec.boxDepth && (name === 'north' || name === 'south' || name === 'east' || name === 'west')) {
      const box = rec.box!;
      first(rec, `box/${name}`, d, (s) => (box[name] = s));
    }
  });

  const onText = (t: string) => {
    for (let i = 0; i < captures.length; i++) captures[i].text += t;
  };
  parser.on('text', onText);
  parser.on('cdata', (t) => {
    for (let i = 0; i < captures.length; i++) {
      const c = captures[i];
      c.text += t;
      // a (non-empty: xmldom drops empty ones) CDATA section directly inside: togeojson reads <description> as HTML then
      if (c.depth === depth && c.cdata === undefined && t !== '') c.cdata = t;
    }
  });

  parser.on('closetag', () => {
    const d = depth--;
    while (declared.length && declared[declared.length - 1][0] === d) declared.pop();
    while (captures.length && captures[captures.length - 1].depth === d) {
      const c = captures.pop()!;
      c.done(c.text, c.cdata);
    }
    if (!rootOk) return;
    const rec = recs[recs.length - 1];
    if (!rec) return;
    if (rec.depth === d) {
      recs.pop();
      if (rec.kind === 'GroundOverlay' || rec.kind === 'NetworkLink') {
        const b = rec.box;
        const num = (s: string | undefined) => !Number.isNaN(Number.parseFloat(s ?? ''));
        if ((rec.kind === 'GroundOverlay' && rec.quad) || (b && num(b.north) && num(b.south) && num(b.east) && num(b.west))) rec.parts.push({ type: 'Polygon' });
      }
      geom = null;
      return;
    }
    if (d === rec.extDepth) rec.extDepth = -1;
    if (d === rec.spanDepth) rec.spanDepth = -1;
    if (d === rec.stampDepth) rec.stampDepth = -1;
    if (d === rec.regionDepth) rec.regionDepth = -1;
    if (d === rec.boxDepth) rec.boxDepth = -1;
    const od = rec.openData;
    if (od.length && od[od.length - 1].depth === d) od.pop();
    const rings = geom?.openRings;
    if (rings?.length && rings[rings.length - 1].depth === d) rings.pop();
    if (geom && geom.depth === d) {
      const g = geom;
      geom = null;
      if (g.type === 'Point') {
        const p = tuple((g.text ?? '').replace(/\s+/g, ''));
        if (p) rec.parts.push({ type: 'Point', coord: p });
      } else if (g.type === 'LineString') {
        const coords = lineCoords(g.text ?? '');
        if (coords.length >= 2) rec.parts.push({ type: 'LineString', coords });
      } else if (g.type === 'Polygon') {
        if (g.rings.some((r) => ringLength(r.text ?? '') >= 4)) rec.parts.push({ type: 'Polygon' });
      } else {
        const coords = g.plain.length ? g.plain : g.prefixed;
        if (coords.length) {
          rec.parts.push(coords.length >= 2 ? { type: 'LineString', coords } : { type: 'Point', coord: coords[0] });
          if (g.whens.length) rec.coordTimes.push(g.whens);
        }
      }
    }
  });

  for (let i = 0; i < text.length; i += CHUNK) parser.write(text.slice(i, i + CHUNK));
  parser.close();
  if (!rootOk) throw new IngestError('malformed', `the root element is <${root}>, not <kml>`);

  return finish([...placemarks, ...overlays, ...links], schema, format);
}

/** Turn the collected records into features exactly as parseKml's togeojson path does with togeojson's output. */
function finish(recs: Rec[], schema: Map<string, Converter>, format: 'kml' | 'kmz'): ParsedUpload {
  const features: ParsedFeature[] = [];
  const warnings: string[] = [];
  const problems: RangeProblem[] = [];
  const badTimes: BadTime[] = [];

  recs.forEach((rec, index) => {
    // the property object in togeojson's order, so that ExtendedData overrides name etc. as it does there
    const props: Record<string, unknown> = {};
    if (rec.name) props.name = rec.name;
    if (rec.address) props.address = rec.address;
    if (rec.phoneNumber) props.phoneNumber = rec.phoneNumber;
    if (rec.description) props.description = rec.description;
    if (rec.descriptionHtml !== undefined) props.description = { '@type': 'html', value: rec.descriptionHtml };
    for (const [k, v] of rec.data) props[k] = v;
    for (const [k, v] of rec.simple) props[k] = (schema.get(k) ?? asString)(v);
    if (rec.timespan) props.timespan = rec.timespan;
    if (rec.timestamp !== undefined) props.timestamp = rec.timestamp;

    const name = typeof props.name === 'string' && props.name.trim() ? props.name.trim() : null;
    const label = `placemark ${index + 1}${name ? ` '${name}'` : ''}`;
    const attributes = Object.fromEntries(Object.entries(props).filter(([k]) => !KML_NOT_DATA.has(k)));
    const geoms = rec.parts;
    if (geoms.length === 0) {
      warnings.push(`${label} has no geometry; skipped`);
      return;
    }
    const trackTimes = rec.coordTimes;
    const timesFor = trackTimes.length === geoms.length ? trackTimes : null;
    if (trackTimes.length && !timesFor) warnings.push(`${label} mixes gx:Track with other geometry; its times were dropped`);

    geoms.forEach((g, i) => {
      const partAttrs = geoms.length > 1 ? { ...attributes, part: i + 1 } : attributes;
      const where = `${label}${geoms.length > 1 ? ` part ${i + 1}` : ''}`;
      let times = timesFor?.[i] ? timesToUtc(timesFor[i], where, badTimes) : null;
      if (g.type === 'LineString') {
        const coords = g.coords;
        for (let j = 0; j < coords.length; j++) {
          const p = coords[j];
          const m = positionProblem(p[0], p[1]);
          if (m) problems.push({ where: `${where} position ${j + 1}`, lon: p[0], lat: p[1], message: m });
        }
        if (times && times.length !== coords.length) {
          warnings.push(`${where}: ${times.length} <when> for ${coords.length} <gx:coord>; times dropped`);
          times = null;
        }
        features.push({ kind: 'line', name, coords, times, pointAttributes: null, attributes: partAttrs });
      } else if (g.type === 'Point') {
        const coord = g.coord;
        const m = positionProblem(coord[0], coord[1]);
        if (m) problems.push({ where, lon: coord[0], lat: coord[1], message: m });
        features.push({ kind: 'point', name, coord, time: times?.[0] ?? timeToUtc(props.timestamp, `${where} <TimeStamp>`, badTimes), attributes: partAttrs });
      } else {
        warnings.push(`${where} is a ${g.type}; only lines and points are read, so it was skipped`);
      }
    });
  });

  if (problems.length) throw outOfRange(problems);
  if (badTimes.length) throw badTimesError(badTimes);
  return { format, sourceCrs: 'EPSG:4326', features, warnings };
}
