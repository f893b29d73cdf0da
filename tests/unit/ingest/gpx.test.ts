import { readFileSync } from 'node:fs';
import path from 'node:path';
import { gpx as togeojsonGpx } from '@tmcw/togeojson';
import { DOMParser } from '@xmldom/xmldom';
import type { Feature, LineString, MultiLineString } from 'geojson';
import { describe, expect, it } from 'vitest';
import { decodeText, parseGpx, type ParsedLine, type ParsedPoint } from '@/lib/ingest';
import { ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const text = (name: string) => decodeText(readFileSync(path.join(IN, name)));


/** A GPX with `tracks` tracks of `segments` segments of `n` points each, with ele and time. */
function generatedGpx(tracks: number, segments: number, n: number): string {
  const out: string[] = ['<?xml version="1.0" encoding="UTF-8"?>\n<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">'];
  let k = 0;
  for (let t = 0; t < tracks; t++) {
    out.push(`<trk><name>T${t}</name>`);
    for (let s = 0; s < segments; s++) {
      out.push('<trkseg>');
      for (let i = 0; i < n; i++, k++) {
        const lat = (48 + k * 1.3e-6).toFixed(7);
        const lon = (11 + k * 1.7e-6).toFixed(7);
        const time = new Date(Date.UTC(2024, 0, 1) + k * 1000).toISOString().replace('.000Z', 'Z');
        out.push(`<trkpt lat="${lat}" lon="${lon}"><ele>${(500 + (k % 100) / 10).toFixed(1)}</ele><time>${time}</time></trkpt>`);
      }
      out.push('</trkseg>');
    }
    out.push('</trk>');
  }
  out.push('</gpx>\n');
  return out.join('\n');
}

describe('parseGpx: GPX 1.1', () => {
  const upload = parseGpx(text('gpx11-times-ele-hdop.gpx'));
  const lines = upload.features.filter((f): f is ParsedLine => f.kind === 'line');
  const points = upload.features.filter((f): f is ParsedPoint => f.kind === 'point');

  it('makes one line per segment, named after the track, with the segment index', () => {
    expect(lines.map((l) => l.name)).toEqual(['Trench 4 – Friedrichstraße', 'Trench 4 – Friedrichstraße']);
    expect(lines.map((l) => l.attributes)).toEqual([
      { gpxType: 'trk', track: 1, segment: 1, desc: '40 mm slot' },
      { gpxType: 'trk', track: 1, segment: 2, desc: '40 mm slot' },
    ]);
    expect(lines[0].coords).toEqual([[13.3888, 52.517, 34.2], [13.38895, 52.51705, 34.3], [13.3891, 52.5171, 34.1], [13.38925, 52.51716, 34.0], [13.3894, 52.51722, 33.8]]);
    expect(lines[1].coords.length).toBe(4);
  });

  it('keeps times in UTC and hdop/sat/fix per point, null where a point has none', () => {
    expect(lines[0].times).toEqual(['07:30:00', '07:30:05', '07:30:10', '07:30:15', '07:30:20'].map((t) => `2024-05-14T${t}.000Z`));
    expect(lines[0].pointAttributes).toEqual({ hdop: [0.6, null, 0.8, null, 1], sat: [12, 13, 14, 15, 16], fix: ['3d', '3d', '3d', '3d', '3d'] });
    expect(lines[1].pointAttributes).toEqual({ fix: ['dgps', 'dgps', 'dgps', 'dgps'] });
  });

  it('reads waypoints with name and desc, and ignores names inside <extensions> and <metadata>', () => {
    expect(points).toEqual([
      { kind: 'point', name: 'MH-01', coord: [13.3887, 52.5169, 34], time: '2024-05-14T07:29:00.000Z', attributes: { desc: 'Manhole, lid cracked' } },
      { kind: 'point', name: 'CAB-2', coord: [13.39075, 52.51781], time: null, attributes: { desc: 'Street cabinet' } },
    ]);
    expect(upload.warnings).toEqual([]);
  });
});

describe('parseGpx: other inputs', () => {
  it('reads GPX 1.0 in ISO-8859-1 with hdop/sat/fix and a route', () => {
    const u = parseGpx(text('gpx10.gpx'));
    const [wpt, rte, trk] = u.features;
    expect(wpt).toMatchObject({ kind: 'point', name: 'Kreuzung Müllerstraße' });
    expect(rte).toMatchObject({ kind: 'line', name: 'Planned', attributes: { gpxType: 'rte' } });
    expect(trk).toMatchObject({ kind: 'line', name: 'Old receiver', pointAttributes: { hdop: [1, 1.1, 1.2, 1.3], sat: [9, 9, 9, 9], fix: ['3d', '3d', '3d', '3d'] } });
    expect(u.warnings).toEqual(["route 'Planned' was read as a line; routes are usually planned, not surveyed"]);
  });

  it('skips a segment of one point with a warning naming track and segment', () => {
    const u = parseGpx(text('gpx-one-point-segment.gpx'));
    expect(u.features.length).toBe(1);
    expect(u.warnings).toEqual(["track 'Short' segment 2 has 1 point; skipped"]);
  });

  it('refuses a GPX whose only track has one point', () => {
    const e = ingestError(() => parseGpx(text('gpx-one-point-track.gpx')));
    expect(e.code).toBe('too_few_points');
    expect(e.message).toBe("no track or route in the GPX has 2 or more points (track 'Lonely' segment 1 has 1 point; skipped)");
  });

  it('lists every point with a latitude beyond ±90, with line and column', () => {
    const e = ingestError(() => parseGpx(text('gpx-lat95.gpx')));
    expect(e.code).toBe('out_of_range');
    expect(e.message).toBe('2 positions out of range: <trkpt> at line 4, column 29: latitude 95 is beyond ±90 (and 1 more)');
    expect(e.details).toEqual({
      count: 2,
      problems: [
        { where: '<trkpt> at line 4, column 29', lon: 13.41, lat: 95, message: 'latitude 95 is beyond ±90' },
        { where: '<trkpt> at line 6, column 32', lon: 13.43, lat: -91.5, message: 'latitude -91.5 is beyond ±90' },
      ],
    });
  });

  it('refuses lon 190 and, per the GPX 1.1 schema (lon < 180), lon 180', () => {
    const e = ingestError(() => parseGpx(text('gpx-lon190.gpx')));
    expect(e.code).toBe('out_of_range');
    const problems = (e.details as { problems: { lon: number; message: string }[] }).problems;
    expect(problems.map((p) => [p.lon, p.message])).toEqual([
      [190, 'longitude 190 is beyond [-180, 180)'],
      [180, 'longitude 180 is beyond [-180, 180)'],
    ]);
  });

  it('caps the listed problems at 50 but counts them all', () => {
    const pts = Array.from({ length: 120 }, (_, i) => `<trkpt lat="${91 + i / 1000}" lon="10"/>`).join('\n');
    const e = ingestError(() => parseGpx(`<gpx version="1.1"><trk><trkseg>\n${pts}\n</trkseg></trk></gpx>`));
    const d = e.details as { count: number; problems: unknown[] };
    expect([e.code, d.count, d.problems.length]).toEqual(['out_of_range', 120, 50]);
  });

  it('reports malformed and truncated XML with line and column', () => {
    const m = ingestError(() => parseGpx(text('gpx-malformed.gpx')));
    expect(m.code).toBe('malformed');
    expect(m.message).toBe('the GPX is not well-formed XML at line 3, column 79: unexpected close tag.');
    expect(m.details).toEqual({ line: 3, column: 79 });
    const t = ingestError(() => parseGpx(text('gpx-truncated.gpx')));
    expect(t.code).toBe('malformed');
    expect(t.message).toMatch(/^the GPX is not well-formed XML at line \d+, column \d+: unclosed tag: \w+$/);
    const { line } = t.details as { line: number };
    expect(line).toBeGreaterThan(5);
  });

  it('refuses unreadable coordinates, listing each element', () => {
    const e = ingestError(() => parseGpx('<gpx version="1.1"><wpt lat="abc" lon="1"/><wpt lon="2"/></gpx>'));
    expect(e.code).toBe('malformed');
    expect((e.details as { count: number }).count).toBe(2);
    expect(e.message).toBe('2 point(s) have unreadable coordinates: <wpt> at line 1, column 43: lat="abc" lon="1" are not numbers');
  });

  it('refuses a DOCTYPE before parsing', () => {
    const e = ingestError(() => parseGpx(text('gpx-doctype-utf8.gpx')));
    expect(e.code).toBe('unsafe_xml');
  });
});

describe('parseGpx against @tmcw/togeojson (the oracle)', () => {
  it('agrees on every coordinate and time of a generated GPX of 3,600 points', () => {
    const gpxText = generatedGpx(3, 4, 300);
    const ours = parseGpx(gpxText).features as ParsedLine[];
    const oracle = togeojsonGpx(new DOMParser().parseFromString(gpxText, 'text/xml') as unknown as Document).features as Feature<LineString | MultiLineString>[];
    expect(oracle.length).toBe(3);
    const oracleLines = oracle.flatMap((f) => (f.geometry.type === 'MultiLineString' ? f.geometry.coordinates : [f.geometry.coordinates]));
    const oracleTimes = oracle.flatMap((f) => (f.properties?.coordinateProperties as { times: string[][] }).times);
    expect(ours.length).toBe(oracleLines.length);
    ours.forEach((line, i) => {
      expect(line.coords).toEqual(oracleLines[i]);
      expect(line.times!.map((t) => Date.parse(t!))).toEqual(oracleTimes[i].map((t) => Date.parse(t)));
    });
    expect(oracle.map((f) => f.properties?.name)).toEqual(['T0', 'T1', 'T2']);
  });

  it('parses 100,000 track points, streaming', () => {
    const gpxText = generatedGpx(1, 1, 100_000);
    const [line] = parseGpx(gpxText).features as ParsedLine[];
    expect(line.coords.length).toBe(100_000);
    expect(line.coords[0]).toEqual([11, 48, 500]);
    expect(line.coords[99_999]).toEqual([Number((11 + 99_999 * 1.7e-6).toFixed(7)), Number((48 + 99_999 * 1.3e-6).toFixed(7)), 509.9]);
    expect(line.times![99_999]).toBe(new Date(Date.UTC(2024, 0, 1) + 99_999 * 1000).toISOString());
  });
});
