import { SaxesParser, type SaxesTagPlain } from 'saxes';
import { assertSafeXml } from './check-xml';
import { badTimesError, noteBadTime, toUtcIso, type BadTime } from './utc-time';
import { outOfRange, positionProblem, type RangeProblem } from './validate-coords';
import { IngestError, type ParsedFeature, type ParsedUpload, type Position } from './types';

const CHUNK = 1 << 16;
/** Per-point values kept in pointAttributes when at least one point of the segment has them. */
const POINT_EXTRAS = ['hdop', 'vdop', 'pdop', 'sat', 'fix'] as const;
type Extra = (typeof POINT_EXTRAS)[number];
const LEAVES = new Set(['name', 'desc', 'cmt', 'type', 'ele', 'time', ...POINT_EXTRAS]);

/** The point being read; leaves are plain fields so that 100k points allocate little. */
interface Pt {
  lon: number;
  lat: number;
  ok: boolean;
  ele?: string;
  /** ISO 8601 UTC, already converted where the <time> closed */
  time?: string;
  name?: string;
  desc?: string;
  cmt?: string;
  type?: string;
  /** hdop, vdop, pdop, sat, fix: only allocated when the point has one */
  extra: Partial<Record<Extra, string>> | null;
}

/** A segment (or route) being collected: plain arrays, so 100k points stay cheap. */
class Run {
  coords: Position[] = [];
  times: (string | null)[] = [];
  anyTime = false;
  extras: Partial<Record<Extra, (string | number | null)[]>> = {};
  private anyExtra = false;

  add(p: Pt): void {
    const i = this.coords.length;
    const ele = p.ele !== undefined ? Number.parseFloat(p.ele) : Number.NaN;
    this.coords.push(Number.isFinite(ele) ? [p.lon, p.lat, ele] : [p.lon, p.lat]);
    const t = p.time ?? null;
    if (t) this.anyTime = true;
    this.times.push(t);
    if (!p.extra) {
      if (this.anyExtra) for (const k of Object.keys(this.extras) as Extra[]) this.extras[k]!.push(null);
      return;
    }
    for (const k of POINT_EXTRAS) {
      const raw = p.extra?.[k]?.trim();
      if (raw === undefined || raw === '') {
        this.extras[k]?.push(null);
        continue;
      }
      this.anyExtra = true;
      const arr = (this.extras[k] ??= new Array<string | number | null>(i).fill(null));
      arr.push(k === 'fix' ? raw : Number(raw));
    }
  }

  pointAttributes(): Record<string, (string | number | null)[]> | null {
    const keys = Object.keys(this.extras) as Extra[];
    return keys.length ? Object.fromEntries(keys.map((k) => [k, this.extras[k]!])) : null;
  }
}

const EXTRA_SET = new Set<string>(POINT_EXTRAS);

function localName(name: string): string {
  const c = name.indexOf(':');
  return c < 0 ? name : name.slice(c + 1);
}

/**
 * Parse GPX 1.0 or 1.1 by streaming it through saxes.
 *
 * Each trk/trkseg becomes a line (segments of fewer than 2 points are skipped with a warning),
 * each rte a line, each wpt a point. Throws 'malformed' (with line and column; also for a <time> that
 * names no real day or time, such as 2024-02-31), 'out_of_range' (every bad point listed) or 'too_few_points'.
 * A <time> that is not shaped like a date at all is read as no time.
 *
 * @example
 * const upload = parseGpx(await readFile('walk.gpx', 'utf8'));
 * upload.features[0]; // { kind: 'line', name: 'Trench 4', coords: [[13.4, 52.5, 34.2], …], times: […], … }
 */
export function parseGpx(text: string): ParsedUpload {
  assertSafeXml(text);
  const parser = new SaxesParser({ position: true });
  const features: ParsedFeature[] = [];
  const warnings: string[] = [];
  const problems: RangeProblem[] = [];
  const badNumbers: { where: string; message: string }[] = [];
  const badTimes: BadTime[] = [];
  const stack: string[] = [];
  let skipDepth = 0; // inside <extensions>: anything goes, nothing is read
  let capture: string | null = null;
  let pt: Pt | null = null;
  let run: Run | null = null;
  let owner: { kind: 'trk' | 'rte'; text: Record<string, string>; index: number; segments: Run[] } | null = null;
  let trackCount = 0;
  let routeCount = 0;

  const where = (el: string) => `<${el}> at line ${parser.line}, column ${parser.column}`;

  parser.on('error', (e) => {
    throw new IngestError('malformed', `the GPX is not well-formed XML at line ${parser.line}, column ${parser.column}: ${e.message.replace(/^(?:.*?:)?\d+:\d+: /, '')}`, {
      line: parser.line,
      column: parser.column,
    });
  });

  parser.on('opentag', (tag) => {
    const name = localName(tag.name);
    stack.push(name);
    if (skipDepth > 0 || name === 'extensions') {
      skipDepth++;
      return;
    }
    if (LEAVES.has(name)) {
      capture = '';
      return;
    }
    if (name === 'trk' || name === 'rte') {
      const index = name === 'trk' ? ++trackCount : ++routeCount;
      owner = { kind: name, text: {}, index, segments: [] };
      if (name === 'rte') run = new Run();
    } else if (name === 'trkseg') {
      run = new Run();
    } else if (name === 'trkpt' || name === 'rtept' || name === 'wpt') {
      const attrs = (tag as SaxesTagPlain).attributes as Record<string, string>;
      // Number() rather than parseFloat(): '52.1abc' must be refused, not read as 52.1
      const lat = attrs.lat?.trim() ? Number(attrs.lat) : Number.NaN;
      const lon = attrs.lon?.trim() ? Number(attrs.lon) : Number.NaN;
      let ok = true;
      if (!Number.isFinite(lat) || !Number.isFinite(lon)) {
        badNumbers.push({ where: where(name), message: `lat="${attrs.lat ?? ''}" lon="${attrs.lon ?? ''}" are not numbers` });
        ok = false;
      } else {
        const m = positionProblem(lon, lat, false);
        if (m) {
          problems.push({ where: where(name), lon, lat, message: m });
          ok = false;
        }
      }
      pt = { lon, lat, ok, extra: null };
    }
  });

  const onText = (t: string) => {
    if (capture !== null) capture += t;
  };
  parser.on('text', onText);
  parser.on('cdata', onText);

  parser.on('closetag', () => {
    const name = stack.pop()!;
    if (skipDepth > 0) {
      skipDepth--;
      return;
    }
    if (capture !== null) {
      const parent = stack[stack.length - 1];
      if (pt && (parent === 'trkpt' || parent === 'rtept' || parent === 'wpt')) {
        if (EXTRA_SET.has(name)) (pt.extra ??= {})[name as Extra] = capture;
        else if (name === 'time') {
          const iso = toUtcIso(capture);
          if (iso !== null) pt.time = iso;
          else if (capture.trim() !== '') noteBadTime(capture, where('time'), badTimes);
        } else pt[name as 'ele' | 'name' | 'desc' | 'cmt' | 'type'] = capture;
      }
      else if (owner && parent === owner.kind) owner.text[name] = capture.trim();
      capture = null;
      return;
    }
    if ((name === 'trkpt' || name === 'rtept') && pt) {
      if (pt.ok && run) run.add(pt);
      pt = null;
    } else if (name === 'wpt' && pt) {
      if (pt.ok) {
        const ele = Number.parseFloat(pt.ele ?? '');
        const attributes: Record<string, unknown> = {};
        for (const k of ['desc', 'cmt', 'type'] as const) if (pt[k] !== undefined) attributes[k] = pt[k]!.trim();
        for (const [k, v] of Object.entries(pt.extra ?? {})) attributes[k] = k === 'fix' ? v.trim() : Number(v);
        features.push({
          kind: 'point',
          name: pt.name?.trim() || null,
          coord: Number.isFinite(ele) ? [pt.lon, pt.lat, ele] : [pt.lon, pt.lat],
          time: pt.time ?? null,
          attributes,
        });
      }
      pt = null;
    } else if (name === 'trkseg' && run && owner) {
      owner.segments.push(run);
      run = null;
    } else if ((name === 'trk' || name === 'rte') && owner) {
      if (name === 'rte' && run) owner.segments.push(run);
      run = null;
      const label = owner.text.name || `${name === 'trk' ? 'track' : 'route'} ${owner.index}`;
      let used = 0;
      owner.segments.forEach((seg, i) => {
        const n = seg.coords.length;
        if (n < 2) {
          const part = name === 'trk' ? `track '${label}' segment ${i + 1}` : `route '${label}'`;
          warnings.push(`${part} has ${n} point${n === 1 ? '' : 's'}; skipped`);
          return;
        }
        const attributes: Record<string, unknown> = { gpxType: name };
        if (name === 'trk') {
          attributes.track = owner!.index;
          attributes.segment = i + 1;
        }
        for (const k of ['desc', 'cmt', 'type']) if (owner!.text[k]) attributes[k] = owner!.text[k];
        used++;
        features.push({
          kind: 'line',
          name: owner!.text.name || null,
          coords: seg.coords,
          times: seg.anyTime ? seg.times : null,
          pointAttributes: seg.pointAttributes(),
          attributes,
        });
      });
      if (name === 'rte' && used > 0) warnings.push(`route '${label}' was read as a line; routes are usually planned, not surveyed`);
      owner = null;
    }
  });

  for (let i = 0; i < text.length; i += CHUNK) parser.write(text.slice(i, i + CHUNK));
  parser.close();

  if (badNumbers.length) {
    throw new IngestError('malformed', `${badNumbers.length} point(s) have unreadable coordinates: ${badNumbers[0].where}: ${badNumbers[0].message}`, {
      count: badNumbers.length,
      problems: badNumbers.slice(0, 50),
    });
  }
  if (problems.length) throw outOfRange(problems);
  if (badTimes.length) throw badTimesError(badTimes);
  if (features.length === 0 && trackCount + routeCount > 0) {
    throw new IngestError('too_few_points', `no track or route in the GPX has 2 or more points (${warnings.join('; ')})`);
  }
  return { format: 'gpx', sourceCrs: 'EPSG:4326', features, warnings };
}
