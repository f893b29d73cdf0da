import { readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { IngestError, parseUpload, type IngestErrorCode } from '@/lib/ingest';
import { ingestOptions } from '../../helpers/crs-from-db';

const IN = path.join(__dirname, '../../fixtures/ingest/in');

function load(name: string) {
  const p = path.join(IN, name);
  return statSync(p).isDirectory() ? readdirSync(p).map((f) => ({ name: f, bytes: readFileSync(path.join(p, f)) })) : [{ name, bytes: readFileSync(p) }];
}

afterAll(() => closeDb());

// every bad fixture, end to end, with its code and the start of its message
const BAD: [string, IngestErrorCode, RegExp, object?][] = [
  ['empty.gpx', 'empty_file', /^'empty.gpx' is empty \(0 bytes\)$/],
  ['whitespace.csv', 'empty_file', /^'whitespace.csv' contains only whitespace$/],
  ['unknown.bin', 'unknown_format', /^'unknown.bin' is a binary file of an unknown kind; supported formats: GPX, KML\/KMZ/],
  ['notes.txt', 'unknown_format', /^'notes.txt' is not in a recognised format; supported formats: /],
  ['drawing.dxf', 'unsupported_format', /^'drawing.dxf' is a DXF drawing, which is not supported; export .* GPX, KML\/KMZ, zipped or loose ESRI shapefile, GeoJSON, survey CSV$/],
  ['geopackage.gpkg', 'unsupported_format', /^'geopackage.gpkg' is a GeoPackage\/SQLite database, which is not supported/],
  ['gpx-truncated.gpx', 'malformed', /^the GPX is not well-formed XML at line \d+, column \d+: unclosed tag/],
  ['gpx-malformed.gpx', 'malformed', /^the GPX is not well-formed XML at line 3, column 79: unexpected close tag\.$/],
  ['kml-malformed.kml', 'malformed', /^the KML is not well-formed XML at line 3, column 21: /],
  ['geojson-malformed.geojson', 'malformed', /^the GeoJSON is not valid JSON at line 4, column 87: /],
  ['gpx-doctype-utf8.gpx', 'unsafe_xml', /^the file contains <!DOCTYPE at line 2, column 1; /],
  ['kml-entity-utf16le.kml', 'unsafe_xml', /^the file contains <!DOCTYPE at line 2, column 1; /],
  ['zip-dotdot.kmz', 'unsafe_zip', /^zip entry '..\/..\/evil.kml' contains a ".." segment/],
  ['zip-absolute.kmz', 'unsafe_zip', /^zip entry '\/etc\/cron.d\/doc.kml' is an absolute path/],
  ['zip-backslash.kmz', 'unsafe_zip', /^zip entry '..\\evil.kml' contains a backslash/],
  ['zip-drive.kmz', 'unsafe_zip', /^zip entry 'C:\/temp\/doc.kml' starts with a drive letter/],
  ['zip-bomb-falsified.kmz', 'zip_limits', /^zip entry 'doc.kml' does not inflate to the size its header declares/],
  ['zip-big-honest.kmz', 'zip_limits', /^the zip inflates to more than 1048576 bytes/, { limits: { maxInflatedBytes: 1024 * 1024, maxZipEntries: 1000 } }],
  ['zip-many-entries.zip', 'zip_limits', /^the zip has 1001 entries; at most 1000 are accepted$/],
  ['shapefile-missing-dbf.zip', 'missing_parts', /^the shapefile is incomplete: 'duct' lacks .dbf/],
  ['shapefile-missing-dbf', 'missing_parts', /^the shapefile is incomplete: 'duct' lacks .dbf/],
  ['shapefile-noprj', 'crs_required', /^the shapefile 'duct.shp' has no readable .prj; send the EPSG code in the crs field$/],
  ['csv-25832-lines.csv', 'crs_required', /^the CSV has easting\/northing columns/],
  ['gpx-lat95.gpx', 'out_of_range', /^2 positions out of range: <trkpt> at line 4, column 29: latitude 95 is beyond ±90 \(and 1 more\)$/],
  ['gpx-lon190.gpx', 'out_of_range', /^2 positions out of range: <trkpt> at line 4, column 30: longitude 190 is beyond \[-180, 180\) \(and 1 more\)$/],
  ['kml-lat95.kml', 'out_of_range', /^2 positions out of range: placemark 1 'Bad' position 2: latitude 95 is beyond ±90/],
  ['csv-lat95.csv', 'out_of_range', /^2 positions out of range: row 3: latitude 95 is beyond ±90 \(and 1 more\)$/],
  ['csv-latlon-swapped.csv', 'swapped_axes', /^the latitude 'lat' and longitude 'lon' columns look swapped/],
  ['csv-en-swapped.csv', 'swapped_axes', /^the easting 'easting' and northing 'northing' columns look swapped for EPSG:25832/, { crs: 'EPSG:25832' }],
  ['gpx-one-point-track.gpx', 'too_few_points', /^no track or route in the GPX has 2 or more points/],
  ['csv-two-bad-rows.csv', 'malformed', /^2 rows cannot be read \(rows 3, 5\)/, { crs: 'EPSG:25832' }],
  ['zip-nothing-known.zip', 'unknown_format', /^'zip-nothing-known.zip' is a zip archive holding neither a .kml nor a shapefile/],
];

describe('parseUpload refuses every bad input with its code and a specific message', () => {
  it.each(BAD)('%s → %s', async (name, code, message, opts) => {
    const err = await parseUpload(load(name), ingestOptions(opts ?? {})).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(IngestError);
    expect((err as IngestError).code).toBe(code);
    expect((err as IngestError).message).toMatch(message);
  });
});

describe('parseUpload', () => {
  it('refuses a well-formed file with nothing in it', async () => {
    const e = await parseUpload([{ name: 'a.gpx', bytes: Buffer.from('<gpx version="1.1"><metadata/></gpx>') }], ingestOptions()).catch((x: IngestError) => x);
    expect([(e as IngestError).code, (e as IngestError).message]).toEqual(['too_few_points', 'the file holds no usable line or point']);
  });

  it('passes the crs field to projected formats', async () => {
    const u = await parseUpload(load('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832' }));
    expect([u.format, u.sourceCrs, u.features.length]).toEqual(['csv', 'EPSG:25832', 4]);
  });
});
