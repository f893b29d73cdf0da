import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { assertSafeXml, decodeText, detectFormat, SUPPORTED_FORMATS } from '@/lib/ingest';
import { ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const file = (name: string, as = name) => ({ name: as, bytes: readFileSync(path.join(IN, name)) });


describe('detectFormat looks at content, not names', () => {
  it.each([
    ['gpx11-times-ele-hdop.gpx', 'gpx', 'text'],
    ['gpx10.gpx', 'gpx', 'text'],
    ['kml-mixed.kml', 'kml', 'text'],
    ['kml-gdal.kml', 'kml', 'text'],
    ['kmz-doc.kmz', 'kmz', 'zip'],
    ['shapefile-32633.zip', 'shapefile', 'zip'],
    ['shapefile-missing-dbf.zip', 'shapefile', 'zip'],
    ['geojson-fc.geojson', 'geojson', 'text'],
    ['geojson-geometry.geojson', 'geojson', 'text'],
    ['geojson-malformed.geojson', 'geojson', 'text'],
    ['csv-25832-lines.csv', 'csv', 'text'],
    ['csv-semicolon.csv', 'csv', 'text'],
  ])('%s → %s, whatever it is called', (name, format, container) => {
    expect(detectFormat([file(name, 'upload.dat')])).toMatchObject({ format, container });
  });

  it('takes loose shapefile parts together, and a lone .shp by its file code', () => {
    const parts = ['duct.shp', 'duct.shx', 'duct.dbf', 'duct.prj', 'duct.cpg'].map((n) => file(`shapefile-loose/${n}`, n));
    expect(detectFormat(parts)).toMatchObject({ format: 'shapefile', container: 'loose' });
    expect(detectFormat([file('shapefile-loose/duct.shp', 'x.bin')])).toMatchObject({ format: 'shapefile', container: 'loose' });
  });

  it('refuses several files that are not one shapefile', () => {
    const e = ingestError(() => detectFormat([file('gpx10.gpx'), file('kml-mixed.kml')]));
    expect(e.code).toBe('unknown_format');
    expect(e.message).toBe(`'gpx10.gpx', 'kml-mixed.kml' were sent together, but only the parts of a shapefile (.shp, .shx, .dbf, .prj, .cpg) may be sent as several files; supported formats: ${SUPPORTED_FORMATS}`);
  });
});

describe('detectFormat refuses what it cannot read', () => {
  it.each([
    ['empty.gpx', 'empty_file', "'empty.gpx' is empty (0 bytes)"],
    ['whitespace.csv', 'empty_file', "'whitespace.csv' contains only whitespace"],
    ['drawing.dxf', 'unsupported_format', `'drawing.dxf' is a DXF drawing, which is not supported; export the lines from the CAD program as one of: ${SUPPORTED_FORMATS}`],
    ['geopackage.gpkg', 'unsupported_format', `'geopackage.gpkg' is a GeoPackage/SQLite database, which is not supported; export the layer as one of: ${SUPPORTED_FORMATS}`],
    ['unknown.bin', 'unknown_format', `'unknown.bin' is a binary file of an unknown kind; supported formats: ${SUPPORTED_FORMATS}`],
    ['notes.txt', 'unknown_format', `'notes.txt' is not in a recognised format; supported formats: ${SUPPORTED_FORMATS}`],
    ['zip-nothing-known.zip', 'unknown_format', `'zip-nothing-known.zip' is a zip archive holding neither a .kml nor a shapefile (it holds readme.txt); supported formats: ${SUPPORTED_FORMATS}`],
    ['gpx-doctype-utf8.gpx', 'unsafe_xml', 'the file contains <!DOCTYPE at line 2, column 1; document type and entity declarations are refused for safety. Export the file again without a DOCTYPE'],
    ['kml-entity-utf16le.kml', 'unsafe_xml', 'the file contains <!DOCTYPE at line 2, column 1; document type and entity declarations are refused for safety. Export the file again without a DOCTYPE'],
  ])('%s → %s', (name, code, message) => {
    const e = ingestError(() => detectFormat([file(name)]));
    expect([e.code, e.message]).toEqual([code, message]);
  });

  it('names the formats it supports', () => {
    expect(SUPPORTED_FORMATS).toBe('GPX, KML/KMZ, zipped or loose ESRI shapefile, GeoJSON, survey CSV');
  });

  it('recognises DXF written with bare LF and no indent', () => {
    const e = ingestError(() => detectFormat([{ name: 'a', bytes: Buffer.from('0\nSECTION\n2\nENTITIES\n') }]));
    expect(e.code).toBe('unsupported_format');
  });

  it('refuses JSON that is not GeoJSON and XML that is neither GPX nor KML', () => {
    expect(ingestError(() => detectFormat([{ name: 'a.json', bytes: Buffer.from('{"hello": "world"}') }])).code).toBe('unknown_format');
    const x = ingestError(() => detectFormat([{ name: 'a.xml', bytes: Buffer.from('<?xml version="1.0"?><!-- c --><svg/>') }]));
    expect(x.message).toBe(`'a.xml' is XML with root element <svg>, neither GPX nor KML; supported formats: ${SUPPORTED_FORMATS}`);
  });

  it('refuses an empty upload', () => {
    expect(ingestError(() => detectFormat([])).code).toBe('empty_file');
  });
});

describe('decodeText', () => {
  it('strips a UTF-8 BOM and decodes UTF-16 LE and BE by their BOM', () => {
    expect(decodeText(Buffer.from([0xef, 0xbb, 0xbf, 0x61, 0xc3, 0x9f]))).toBe('aß');
    expect(decodeText(Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('<gpx/>', 'utf16le')]))).toBe('<gpx/>');
    const be = Buffer.from('<kml/>', 'utf16le').swap16();
    expect(decodeText(Buffer.concat([Buffer.from([0xfe, 0xff]), be]))).toBe('<kml/>');
  });

  it('honours an ISO-8859-1 or windows-1252 XML declaration', () => {
    expect(decodeText(Buffer.from('<?xml version="1.0" encoding="ISO-8859-1"?><a>Stra\u00dfe</a>', 'latin1'))).toBe('<?xml version="1.0" encoding="ISO-8859-1"?><a>Straße</a>');
    // 0x80 is € in windows-1252
    expect(decodeText(Buffer.from([...Buffer.from("<?xml version='1.0' encoding='windows-1252'?>"), 0x80]))).toMatch(/€$/);
  });

  it('falls back to windows-1252 for bytes that are not UTF-8', () => {
    expect(decodeText(Buffer.from('pt;code\n1;Stra\u00dfe\n', 'latin1'))).toBe('pt;code\n1;Straße\n');
  });
});

describe('assertSafeXml', () => {
  it('refuses DOCTYPE and ENTITY in any case, anywhere', () => {
    expect(() => assertSafeXml('<gpx><wpt/></gpx>')).not.toThrow();
    expect(ingestError(() => assertSafeXml('<gpx>\n<!doctype x></gpx>')).message).toMatch(/^the file contains <!DOCTYPE at line 2, column 1;/);
    expect(ingestError(() => assertSafeXml('<gpx><!EnTiTy a "b"></gpx>')).code).toBe('unsafe_xml');
  });
});
