import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { decodeText, parseKml, parseKmz, type ParsedLine, type ParsedPoint } from '@/lib/ingest';
import { ingestErrorAsync as ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const bytes = (name: string) => readFileSync(path.join(IN, name));
const limits = { maxInflatedBytes: 20 * 1024 * 1024, maxZipEntries: 1000 };


describe('parseKml', () => {
  const upload = parseKml(decodeText(bytes('kml-mixed.kml')));
  const byName = (n: string) => upload.features.filter((f) => f.name === n);

  it('reads a LineString with its ExtendedData, without style noise', () => {
    const [duct] = byName('Duct 1') as ParsedLine[];
    expect(duct).toEqual({
      kind: 'line',
      name: 'Duct 1',
      coords: [[13.4049, 52.52, 34], [13.4052, 52.5202, 34.1], [13.4057, 52.5203, 34.3]],
      times: null,
      pointAttributes: null,
      attributes: { ducts: '4', contractor: 'Acme Tiefbau' },
    });
  });

  it('splits a MultiGeometry into one feature per part', () => {
    const parts = byName('Crossing');
    expect(parts.map((f) => [f.kind, f.attributes.part])).toEqual([['line', 1], ['line', 2], ['point', 3]]);
    expect((parts[1] as ParsedLine).coords).toEqual([[13.4063, 52.5213], [13.4065, 52.5215], [13.4066, 52.5217]]);
    expect((parts[2] as ParsedPoint).coord).toEqual([13.4064, 52.5214]);
  });

  it('keeps gx:Track times (when) beside gx:coord positions', () => {
    const [walk] = byName('Walk') as ParsedLine[];
    expect(walk.coords).toEqual([[13.41, 52.53, 35], [13.4102, 52.5301, 35.1], [13.4104, 52.5302, 35.2], [13.4106, 52.5303, 35]]);
    expect(walk.times).toEqual(['2024-05-14T07:30:00.000Z', '2024-05-14T07:30:05.000Z', '2024-05-14T07:30:10.000Z', '2024-05-14T07:30:15.000Z']);
  });

  it('reads a Point with its height and skips polygons with a warning', () => {
    expect(byName('Manhole 7')).toEqual([{ kind: 'point', name: 'Manhole 7', coord: [13.405, 52.5201, 34.5], time: null, attributes: {} }]);
    expect(upload.warnings).toEqual(["placemark 5 'Compound' is a Polygon; only lines and points are read, so it was skipped"]);
  });

  it('comes back within 1e-7° of the coordinates GDAL was given, with SchemaData attributes', () => {
    const u = parseKml(decodeText(bytes('kml-gdal.kml')));
    const [a, b1, b2] = u.features as ParsedLine[];
    const expected = [[15.0012345, 52.1012345, 40.25], [15.0023456, 52.1023456, 40.5], [15.0034567, 52.1029999, 40.75], [15.0045678, 52.1041111, 41.0]];
    a.coords.forEach((c, i) => {
      expect(Math.abs(c[0] - expected[i][0])).toBeLessThan(1e-7);
      expect(Math.abs(c[1] - expected[i][1])).toBeLessThan(1e-7);
    });
    expect(a.name).toBe('Straße Süd');
    expect(a.attributes).toMatchObject({ depth: 0.45, laid: '2024/05/01' });
    expect([b1.name, b1.coords.length, b2.name, b2.coords.length]).toEqual(['Crossing', 2, 'Crossing', 3]);
  });

  it('reports malformed XML with its line and column', async () => {
    const e = await ingestError(() => parseKml(decodeText(bytes('kml-malformed.kml'))));
    expect(e.code).toBe('malformed');
    expect(e.message).toBe('the KML is not well-formed XML at line 3, column 21: Opening and ending tag mismatch: "Point" != "Pont"');
    expect(e.details).toEqual({ line: 3, column: 21 });
  });

  it('reports an unclosed attribute quote (an xmldom "error", not "fatalError") as malformed', async () => {
    const e = await ingestError(() => parseKml('<kml a="1><Placemark/></kml>'));
    expect(e.code).toBe('malformed');
  });

  it('lists every position beyond ±90', async () => {
    const e = await ingestError(() => parseKml(decodeText(bytes('kml-lat95.kml'))));
    expect(e.code).toBe('out_of_range');
    expect((e.details as { problems: { where: string }[] }).problems.map((p) => p.where)).toEqual(["placemark 1 'Bad' position 2", "placemark 1 'Bad' position 3"]);
  });

  it('refuses entities in UTF-16 LE with a BOM', async () => {
    const e = await ingestError(() => parseKml(decodeText(bytes('kml-entity-utf16le.kml'))));
    expect(e.code).toBe('unsafe_xml');
    expect(e.message).toMatch(/^the file contains <!DOCTYPE at line 2, column 1;/);
  });
});

describe('parseKmz', () => {
  it('reads doc.kml out of the archive', async () => {
    const u = await parseKmz(bytes('kmz-doc.kmz'), limits);
    expect(u.format).toBe('kmz');
    expect(u.features.length).toBe(6);
  });

  it('refuses a KMZ without any .kml', async () => {
    const e = await ingestError(() => parseKmz(bytes('zip-nothing-known.zip'), limits));
    expect([e.code, e.message]).toEqual(['malformed', 'the KMZ holds no .kml file']);
  });
});
