import proj4 from 'proj4';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { datumWarning, epsgCode, IngestError, makeTransformer, resolveCrsName, unitToMetre, type CrsDefinition } from '@/lib/ingest';
import { crsFromDb } from '../../helpers/crs-from-db';

afterAll(() => closeDb());

const def = async (srid: number): Promise<CrsDefinition> => (await crsFromDb(srid))!;

/** The independent side: PROJ, through PostGIS's ST_Transform, from `srid` to WGS 84. */
async function postgisToWgs84(srid: number, x: number, y: number): Promise<[number, number]> {
  const { rows } = await getDb().raw<{ rows: { lon: number; lat: number }[] }>(
    'select ST_X(g) as lon, ST_Y(g) as lat from (select ST_Transform(ST_SetSRID(ST_MakePoint(?, ?), ?::int), 4326) g) s',
    [x, y, srid],
  );
  return [rows[0].lon, rows[0].lat];
}

describe('the catalogue through proj4', () => {
  it('projects the IOGP worked example for British National Grid within 2 cm', async () => {
    // IOGP Guidance Note 7-2, Transverse Mercator worked example [published]:
    // OSGB 1936 / British National Grid (EPSG:27700), 50°30'00"N 0°30'00"E ↔ E 577274.99 m, N 69740.50 m.
    // The example is the projection alone, on the OSGB 1936 datum, so no datum shift is involved.
    const bng = await def(27700);
    const [e, n] = proj4('+proj=longlat +datum=OSGB36 +no_defs', bng.proj4, [0.5, 50.5]);
    expect(Math.abs(e - 577274.99)).toBeLessThan(0.02);
    expect(Math.abs(n - 69740.5)).toBeLessThan(0.02);
    const [lon, lat] = proj4(bng.proj4, '+proj=longlat +datum=OSGB36 +no_defs', [577274.99, 69740.5]);
    // back to 50°30'N 0°30'E within 2 cm on the ground (the published E/N are rounded to 1 cm)
    const metresPerDegree = 111_320;
    expect(Math.abs(lon - 0.5) * metresPerDegree * Math.cos((50.5 * Math.PI) / 180)).toBeLessThan(0.02);
    expect(Math.abs(lat - 50.5) * metresPerDegree).toBeLessThan(0.02);
  });

  it('agrees with PostGIS on a US-survey-foot state plane point (EPSG:2263)', async () => {
    // independent side: PROJ 9 through PostGIS ST_Transform
    const ny = await def(2263);
    const [x, y] = [988_000, 210_000]; // ftUS, midtown Manhattan
    const ours = makeTransformer(ny)(x, y);
    const theirs = await postgisToWgs84(2263, x, y);
    expect(Math.abs(ours[0] - theirs[0])).toBeLessThan(1e-8);
    expect(Math.abs(ours[1] - theirs[1])).toBeLessThan(1e-8);
    expect(unitToMetre(ny)).toBe(1200 / 3937);
    // heights in a foot CRS come back in metres
    expect(makeTransformer(ny)(x, y, 100)[2]).toBeCloseTo(30.48006096, 8);
  });

  it('agrees with PostGIS on a datum-shifted point (EPSG:27700, OSGB 1936 → WGS 84)', async () => {
    // independent side: PROJ 9 through PostGIS ST_Transform. Without the OSTN15 grid installed
    // PROJ uses the same 7-parameter Helmert (EPSG:1314) as the catalogue's +datum=OSGB36.
    const bng = await def(27700);
    const ours = makeTransformer(bng)(577274.99, 69740.5);
    const theirs = await postgisToWgs84(27700, 577274.99, 69740.5);
    expect(Math.abs(ours[0] - theirs[0])).toBeLessThan(1e-7);
    expect(Math.abs(ours[1] - theirs[1])).toBeLessThan(1e-7);
    // the shift itself is ~120 m here: the comparison is not trivially satisfied
    expect(Math.abs(ours[0] - 0.5) * 71_000).toBeGreaterThan(100);
  });

  it('agrees with PostGIS on UTM (EPSG:32633 and EPSG:25832)', async () => {
    for (const [srid, x, y] of [[32633, 500_000, 5_772_000], [25832, 535_084.707, 5_649_943.86]] as const) {
      const ours = makeTransformer(await def(srid))(x, y);
      const theirs = await postgisToWgs84(srid, x, y);
      expect(Math.abs(ours[0] - theirs[0])).toBeLessThan(1e-9);
      expect(Math.abs(ours[1] - theirs[1])).toBeLessThan(1e-9);
    }
  });
});

describe('datumWarning', () => {
  it('warns for datum shifts that are approximate and not for exact ones', async () => {
    expect(datumWarning(await def(27700))).toBe('EPSG:27700 (OSGB 1936 / British National Grid): datum shift approximate: positions may be off by up to a few metres');
    expect(datumWarning(await def(2056))).toMatch(/^EPSG:2056 \(CH1903\+ \/ LV95\): datum shift approximate \(translation only\)/);
    expect(datumWarning(await def(4326))).toBeNull();
    expect(datumWarning(await def(32633))).toBeNull();
    expect(datumWarning(await def(25832))).toBeNull();
    expect(datumWarning(await def(2263))).toBeNull();
    expect(datumWarning({ srid: 1, name: 'three', proj4: '+proj=utm +zone=31 +ellps=intl +towgs84=-87,-98,-121 +units=m' })).toMatch(/translation only/);
    expect(datumWarning({ srid: 2, name: 'none', proj4: '+proj=utm +zone=31 +ellps=intl +units=m' })).toMatch(/no datum shift to WGS 84 is defined/);
    expect(datumWarning({ srid: 3, name: 'grid', proj4: '+proj=longlat +ellps=clrk66 +nadgrids=@conus,@alaska' })).toMatch(/grid @conus,@alaska is not available/);
  });
});

describe('CRS names', () => {
  it('reads the forms users and files write', () => {
    expect(epsgCode('EPSG:25832')).toBe(25832);
    expect(epsgCode('epsg:2263')).toBe(2263);
    expect(epsgCode('25832')).toBe(25832);
    expect(epsgCode('urn:ogc:def:crs:EPSG::25832')).toBe(25832);
    expect(epsgCode('urn:ogc:def:crs:EPSG:9.1:27700')).toBe(27700);
    expect(epsgCode('http://www.opengis.net/def/crs/EPSG/0/32633')).toBe(32633);
    expect(epsgCode('urn:ogc:def:crs:OGC:1.3:CRS84')).toBe(4326);
    expect(epsgCode('UTM 32')).toBeNull();
  });

  it('refuses a name that is no EPSG code, and a code not in the catalogue', async () => {
    await expect(resolveCrsName('UTM 32', crsFromDb)).rejects.toMatchObject({ code: 'unknown_crs', message: "'UTM 32' is not an EPSG code; write it as EPSG:nnnn" });
    await expect(resolveCrsName('EPSG:1', crsFromDb)).rejects.toBeInstanceOf(IngestError);
  });
});
