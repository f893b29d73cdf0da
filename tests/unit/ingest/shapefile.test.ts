import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { parseShapefile, parseZippedShapefile, prjMismatch, prjToEpsg, type ParsedLine, type ParsedPoint } from '@/lib/ingest';
import { crsFromDb, ingestOptions } from '../../helpers/crs-from-db';
import { ingestErrorAsync as ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const dir = (d: string) => readdirSync(path.join(IN, d)).map((name) => ({ name, bytes: readFileSync(path.join(IN, d, name)) }));

afterAll(() => closeDb());


// the WGS 84 coordinates make-fixtures.ts gave ogr2ogr, which wrote them in EPSG:32633
const LINE_A = [[15.0012345, 52.1012345, 40.25], [15.0023456, 52.1023456, 40.5], [15.0034567, 52.1029999, 40.75], [15.0045678, 52.1041111, 41.0]];
const LINE_B2 = [[14.9934567, 52.0934567, 40.0], [14.9945678, 52.0945678, 40.5], [14.9956789, 52.0956789, 41.0]];
const POINTS = [[15.0101, 52.1101], [15.0202, 52.1202]];

function within(actual: number[][], expected: number[][], tol: number) {
  expect(actual.length).toBe(expected.length);
  actual.forEach((c, i) => {
    expect(Math.abs(c[0] - expected[i][0])).toBeLessThan(tol);
    expect(Math.abs(c[1] - expected[i][1])).toBeLessThan(tol);
    if (expected[i].length === 3) expect(c[2]).toBe(expected[i][2]);
  });
}

describe('parseShapefile: GDAL-made EPSG:32633 shapefiles', () => {
  it('reads every set of a zip: PolyLineZ parts as lines, Points as points, within 1e-7°', async () => {
    const u = await parseZippedShapefile(readFileSync(path.join(IN, 'shapefile-32633.zip')), ingestOptions());
    expect(u.sourceCrs).toBe('EPSG:32633');
    const lines = u.features.filter((f): f is ParsedLine => f.kind === 'line');
    const points = u.features.filter((f): f is ParsedPoint => f.kind === 'point');
    within(lines[0].coords, LINE_A, 1e-7);
    within(lines[2].coords, LINE_B2, 1e-7);
    within(points.map((p) => p.coord), POINTS, 1e-7);
    expect(lines.map((l) => [l.name, l.attributes.part])).toEqual([['Straße Süd', undefined], ['Crossing', 1], ['Crossing', 2]]);
    expect(lines[0].attributes).toEqual({ name: 'Straße Süd', depth: 0.45, laid: '2024-05-01' });
    expect(points.map((p) => p.name)).toEqual(['MH-1', 'MH-2']);
    expect(u.warnings).toEqual([]);
  });

  it('reads loose parts sent together', async () => {
    const u = await parseShapefile(dir('shapefile-loose'), ingestOptions());
    within((u.features[0] as ParsedLine).coords, LINE_A.map(([x, y]) => [x, y]), 1e-7);
    expect(u.features[0].attributes).toEqual({ name: 'Duct 2D', ducts: 4 });
  });

  it('asks for the CRS when there is no .prj, and takes it from the crs field', async () => {
    const e = await ingestError(() => parseShapefile(dir('shapefile-noprj'), ingestOptions()));
    expect(e.code).toBe('crs_required');
    expect(e.message).toBe("the shapefile 'duct.shp' has no readable .prj; send the EPSG code in the crs field");
    const u = await parseShapefile(dir('shapefile-noprj'), ingestOptions({ crs: 'EPSG:32633' }));
    within((u.features[0] as ParsedLine).coords, LINE_A.map(([x, y]) => [x, y]), 1e-7);
  });

  it('names the missing parts, loose or zipped', async () => {
    const loose = await ingestError(() => parseShapefile(dir('shapefile-missing-dbf'), ingestOptions()));
    expect([loose.code, loose.message]).toEqual(['missing_parts', "the shapefile is incomplete: 'duct' lacks .dbf; send .shp, .shx and .dbf together (with .prj)"]);
    const zipped = await ingestError(() => parseZippedShapefile(readFileSync(path.join(IN, 'shapefile-missing-dbf.zip')), ingestOptions()));
    expect(zipped.code).toBe('missing_parts');
    expect(zipped.details).toEqual({ missing: [{ set: 'duct', missing: ['.dbf'] }] });
    const onlyDbf = await ingestError(() => parseShapefile([{ name: 'a.dbf', bytes: Buffer.alloc(40) }], ingestOptions()));
    expect(onlyDbf.message).toBe("the shapefile is incomplete: 'a' lacks .shp, .shx; send .shp, .shx and .dbf together (with .prj)");
  });

  it('never guesses: an unknown .prj name, or a known name with other parameters, needs the crs field', async () => {
    const parts = dir('shapefile-loose').filter((f) => !f.name.endsWith('.prj'));
    const prj = readFileSync(path.join(IN, 'shapefile-loose/duct.prj'), 'utf8');
    const custom = prj.replace('WGS_1984_UTM_Zone_33N', 'My_Site_Grid');
    const e1 = await ingestError(() => parseShapefile([...parts, { name: 'duct.prj', bytes: Buffer.from(custom) }], ingestOptions()));
    expect(e1.code).toBe('crs_required');
    expect(e1.message).toMatch(/^the shapefile 'duct.shp' has no readable .prj \(its coordinate system "PROJCS\[\\"My_Site_Grid\\"/);
    const liar = prj.replace('PARAMETER["Central_Meridian",15.0]', 'PARAMETER["Central_Meridian",9.0]');
    const e2 = await ingestError(() => parseShapefile([...parts, { name: 'duct.prj', bytes: Buffer.from(liar) }], ingestOptions()));
    expect(e2.code).toBe('crs_required');
    expect(e2.message).toMatch(/^the .prj of 'duct.shp' is named like EPSG:32633 but does not match it \(long0 is 0.157/);
  });

  it('refuses an EPSG code that is not in the catalogue', async () => {
    const e = await ingestError(() => parseShapefile(dir('shapefile-noprj'), ingestOptions({ crs: 'EPSG:999999' })));
    expect([e.code, e.message]).toEqual(['unknown_crs', 'EPSG:999999 is not in the coordinate system catalogue; check the code']);
  });
});

describe('prjToEpsg', () => {
  it('takes the root AUTHORITY of WKT1 and the root ID of WKT2, not a nested one', () => {
    expect(prjToEpsg('PROJCS["ETRS89 / UTM zone 32N",GEOGCS["ETRS89",AUTHORITY["EPSG","4258"]],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AUTHORITY["EPSG","25832"]]')).toBe(25832);
    expect(prjToEpsg('PROJCRS["WGS 84 / UTM zone 33N",BASEGEOGCRS["WGS 84",ID["EPSG",4326]],ID["EPSG",32633]]')).toBe(32633);
  });

  it('maps unambiguous ESRI names, and nothing else', () => {
    expect(prjToEpsg('PROJCS["WGS_1984_UTM_Zone_33N",GEOGCS["GCS_WGS_1984"]]')).toBe(32633);
    expect(prjToEpsg('PROJCS["WGS_1984_UTM_Zone_19S",GEOGCS["GCS_WGS_1984"]]')).toBe(32719);
    expect(prjToEpsg('PROJCS["ETRS_1989_UTM_Zone_32N",GEOGCS["GCS_ETRS_1989"]]')).toBe(25832);
    expect(prjToEpsg('PROJCS["NAD_1983_StatePlane_New_York_Long_Island_FIPS_3104_Feet",GEOGCS["GCS_North_American_1983"]]')).toBe(2263);
    expect(prjToEpsg('PROJCS["British_National_Grid",GEOGCS["GCS_OSGB_1936"]]')).toBe(27700);
    expect(prjToEpsg('GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984"]]')).toBe(4326);
    expect(prjToEpsg('PROJCS["WGS_1984_UTM_Zone_61N",GEOGCS["GCS_WGS_1984"]]')).toBeNull();
    expect(prjToEpsg('PROJCS["Local_Site_Grid",GEOGCS["GCS_WGS_1984"]]')).toBeNull();
    expect(prjToEpsg('not wkt at all')).toBeNull();
  });

  it('cross-checks parameters against the catalogue definition', async () => {
    const prj = readFileSync(path.join(IN, 'shapefile-loose/duct.prj'), 'utf8');
    expect(prjMismatch(prj, (await crsFromDb(32633))!)).toBeNull();
    expect(prjMismatch(prj, (await crsFromDb(32632))!)).toMatch(/^long0 is/);
  });
});
