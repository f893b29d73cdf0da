import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { decodeText, guessColumns, parseSurveyCsv, type ParsedLine, type ParsedPoint } from '@/lib/ingest';
import { ingestOptions } from '../../helpers/crs-from-db';
import { ingestErrorAsync as ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const text = (name: string) => decodeText(readFileSync(path.join(IN, name)));

afterAll(() => closeDb());


describe('parseSurveyCsv: EPSG:25832 with line ids', () => {
  it('joins rows by line id in file order, with per-point id/code/fix/rms and times', async () => {
    const u = await parseSurveyCsv(text('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832' }));
    const [l1, l2, mh, cab] = u.features as [ParsedLine, ParsedLine, ParsedPoint, ParsedPoint];
    expect([l1.name, l1.coords.length, l2.name, l2.coords.length]).toEqual(['L1', 4, 'L2', 3]);
    expect(l1.attributes).toEqual({ line: 'L1' });
    expect(l2.pointAttributes).toEqual({
      id: ['P104', 'P105', 'P106'],
      code: ['DUCT', 'DUCT', 'DUCT'],
      fix: ['FIXED', 'FLOAT', 'FIXED'],
      rms_h: [0.012, 0.012, 0.012],
      rms_v: [0.021, 0.021, 0.021],
    });
    expect(l1.times?.[0]).toBe('2024-05-14T08:10:00.000Z');
    expect(mh).toMatchObject({ kind: 'point', name: 'P107', attributes: { code: 'MH', line: null, row: 9 } });
    expect(cab.name).toBe('P108');
    // gdaltransform made E/N from these WGS 84 positions; back within 1e-7°
    expect(Math.abs(l1.coords[0][0] - 9.50011)).toBeLessThan(1e-7);
    expect(Math.abs(l1.coords[0][1] - 51.00011)).toBeLessThan(1e-7);
    expect(l1.coords[0][2]).toBe(150);
  });

  it('reports the guessed mapping and warns about it', async () => {
    const u = await parseSurveyCsv(text('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832' }));
    expect(u.columns).toEqual({
      map: { id: 'Pt', x: 'Easting', y: 'Northing', z: 'Height', code: 'Code', line: 'Line', date: 'Date', fix: 'Fix', rmsH: 'HRMS', rmsV: 'VRMS' },
      guessed: true,
      headers: ['Pt', 'Easting', 'Northing', 'Height', 'Code', 'Line', 'Date', 'Fix', 'HRMS', 'VRMS'],
    });
    expect(u.warnings[0]).toMatch(/^columns were guessed from the header: id='Pt', x='Easting', y='Northing'/);
  });

  it('uses an explicit mapping without a warning', async () => {
    const u = await parseSurveyCsv(text('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832', columns: { id: 'Pt', x: 'Easting', y: 'Northing' } }));
    expect(u.columns?.guessed).toBe(false);
    expect(u.warnings).toEqual([]);
    expect(u.features.every((f) => f.kind === 'point')).toBe(true);
    expect(u.features.length).toBe(9);
  });

  it('needs the CRS for easting/northing', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-25832-lines.csv'), ingestOptions()));
    expect([e.code, e.message]).toEqual(['crs_required', "the CSV has easting/northing columns ('Easting', 'Northing'); send the EPSG code of their coordinate system in the crs field"]);
  });

  it('refuses a mapped column that is not in the header, and a header without coordinates', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832', columns: { x: 'E', y: 'Northing' } })));
    expect([e.code, e.message]).toEqual(['malformed', "column 'E' given for x is not in the CSV header (Pt, Easting, Northing, Height, Code, Line, Date, Fix, HRMS, VRMS)"]);
    const n = await ingestError(() => parseSurveyCsv('a,b\n1,2\n', ingestOptions()));
    expect(n.message).toBe('no coordinate columns were found in the header (a, b); name them in the columns field: x and y (easting, northing) or lat and lon');
  });
});

describe('parseSurveyCsv: other layouts', () => {
  it('joins lat/lon rows by code when there is no line column (codes with ≥ 2 rows)', async () => {
    const u = await parseSurveyCsv(text('csv-latlon-codes.csv'), ingestOptions());
    expect(u.sourceCrs).toBe('EPSG:4326');
    expect(u.features.map((f) => [f.kind, f.name])).toEqual([['line', 'DUCT'], ['point', '3'], ['line', 'CAB']]);
    expect((u.features[0] as ParsedLine).coords).toEqual([[9.50011, 51.00011, 150.1], [9.50032, 51.00019, 150.2], [9.50055, 51.00031, 150.4]]);
    expect((u.features[2] as ParsedLine).coords).toEqual([[9.5102, 51.0102], [9.5104, 51.0103]]);
  });

  it('reads semicolons, decimal commas and windows-1252 text', async () => {
    const u = await parseSurveyCsv(text('csv-semicolon.csv'), ingestOptions({ crs: 'EPSG:25832' }));
    const [line] = u.features as ParsedLine[];
    expect(line.name).toBe('A');
    expect(line.pointAttributes?.code).toEqual(['Straße', 'Straße', 'Straße', 'Straße']);
    expect(line.coords[3][2]).toBe(150.3);
    expect(Math.abs(line.coords[3][0] - 9.50071)).toBeLessThan(1e-7);
  });

  it('keeps a line id with one row as a point, with a warning', async () => {
    const u = await parseSurveyCsv('pt,lat,lon,line\n1,51,9,A\n2,51.1,9.1,B\n3,51.2,9.2,B\n', ingestOptions());
    expect(u.features.map((f) => f.kind)).toEqual(['point', 'line']);
    expect(u.warnings[1]).toBe("line 'A' has 1 point (row 2); kept as a point");
  });
});

describe('parseSurveyCsv: bad input', () => {
  it('lists every unparsable row', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-two-bad-rows.csv'), ingestOptions({ crs: 'EPSG:25832' })));
    expect(e.code).toBe('malformed');
    expect(e.message).toBe("2 rows cannot be read (rows 3, 5): row 3 has 3 columns, the header has 4; row 5: northing 'north?' is not a number");
    expect(e.details).toEqual({ rows: [{ row: 3, message: 'row 3 has 3 columns, the header has 4' }, { row: 5, message: "row 5: northing 'north?' is not a number" }] });
  });

  it('says when latitude and longitude are swapped (|lat| > 90, |lon| ≤ 90)', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-latlon-swapped.csv'), ingestOptions()));
    expect(e.code).toBe('swapped_axes');
    expect(e.message).toBe(
      "the latitude 'lat' and longitude 'lon' columns look swapped: latitude is beyond ±90 in 2 row(s) (row 2: 151.2093) while longitude stays within ±90; map columns.lat to 'lon' and columns.lon to 'lat', or swap the two columns in the file",
    );
  });

  it('says when swapped lat/lon would land inside the project extent', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-latlon-swapped-europe.csv'), ingestOptions({ projectExtent: [9.4, 50.9, 9.6, 51.1] })));
    expect(e.code).toBe('swapped_axes');
    expect(e.message).toMatch(/^the latitude 'lat' and longitude 'lon' columns look swapped: as given no row lies in the project's area, swapped every row does \(row 2 would be at 51.00011, 9.50011\)/);
  });

  it('says when easting and northing are swapped for the CRS', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-en-swapped.csv'), ingestOptions({ crs: 'EPSG:25832' })));
    expect(e.code).toBe('swapped_axes');
    expect(e.message).toBe(
      "the easting 'easting' and northing 'northing' columns look swapped for EPSG:25832 (ETRS89 / UTM zone 32N): as given the values lie outside the area of that coordinate system, swapped they fit (row 2 would be at 51.00011, 9.50011); map columns.x to 'northing' and columns.y to 'easting', or swap the two columns in the file",
    );
  });

  it('lists every latitude beyond ±90 when the rows are not simply swapped', async () => {
    const e = await ingestError(() => parseSurveyCsv(text('csv-lat95.csv'), ingestOptions()));
    expect(e.code).toBe('out_of_range');
    expect((e.details as { problems: { where: string }[] }).problems.map((p) => p.where)).toEqual(['row 3', 'row 4']);
  });

  it('refuses a header without rows as empty', async () => {
    const e = await ingestError(() => parseSurveyCsv('pt,lat,lon\n', ingestOptions()));
    expect([e.code, e.message]).toEqual(['empty_file', 'the CSV has a header but no rows']);
  });
});

describe('guessColumns', () => {
  it('maps the usual rover and total-station headers, each header once', () => {
    expect(guessColumns(['Point', 'E', 'N', 'Z', 'Desc', 'String', 'Time', 'Solution', 'sigma_h', 'V RMS'])).toEqual({
      id: 'Point', x: 'E', y: 'N', z: 'Z', code: 'Desc', line: 'String', date: 'Time', fix: 'Solution', rmsH: 'sigma_h', rmsV: 'V RMS',
    });
    expect(guessColumns(['Name', 'Lat', 'Long', 'H'])).toEqual({ id: 'Name', lat: 'Lat', lon: 'Long', z: 'H' });
  });
});
