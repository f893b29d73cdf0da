import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { parseGeoJson, type ParsedLine } from '@/lib/ingest';
import { ingestOptions } from '../../helpers/crs-from-db';
import { ingestErrorAsync as ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const text = (name: string) => readFileSync(path.join(IN, name), 'utf8');

afterAll(() => closeDb());


describe('parseGeoJson', () => {
  it('reads a FeatureCollection: multi-geometries split into parts, polygons and null geometries skipped', async () => {
    const u = await parseGeoJson(text('geojson-fc.geojson'), ingestOptions());
    expect(u.features.map((f) => [f.kind, f.name, f.attributes.part])).toEqual([
      ['line', 'Spur A', undefined],
      ['line', 'Spur B', 1],
      ['line', 'Spur B', 2],
      ['point', 'HH 3', undefined],
      ['point', 'Markers', 1],
      ['point', 'Markers', 2],
    ]);
    expect((u.features[2] as ParsedLine).coords).toEqual([[9.512, 51.012], [9.513, 51.013, 120.5]]);
    expect(u.features[0].attributes).toEqual({ name: 'Spur A', ducts: 2 });
    expect(u.warnings).toEqual(["feature 5 'Area' is a Polygon; only lines and points are read, so it was skipped", "feature 6 'Nothing' has no geometry; skipped"]);
  });

  it('honours a legacy crs member (GDAL-written, EPSG:25832) and reprojects within 1e-7°', async () => {
    const u = await parseGeoJson(text('geojson-legacy-crs.geojson'), ingestOptions());
    expect(u.sourceCrs).toBe('EPSG:25832');
    const [first] = (u.features[0] as ParsedLine).coords;
    expect(Math.abs(first[0] - 15.0012345)).toBeLessThan(1e-7);
    expect(Math.abs(first[1] - 52.1012345)).toBeLessThan(1e-7);
  });

  it('reads the short "EPSG:nnnn" crs name, and lets the crs field override the member with a warning', async () => {
    const doc = (name: string) => JSON.stringify({ type: 'Point', coordinates: [500000, 5650000], crs: { type: 'name', properties: { name } } });
    const u = await parseGeoJson(doc('EPSG:25832'), ingestOptions());
    expect(u.features[0]).toMatchObject({ kind: 'point' });
    const [lon, lat] = (u.features[0] as { coord: number[] }).coord;
    // E 500000 N 5650000 in EPSG:25832 = 9°E 51.0015746933°N by gdaltransform (PROJ 9.1)
    expect(Math.abs(lon - 9)).toBeLessThan(1e-9);
    expect(Math.abs(lat - 51.0015746933105)).toBeLessThan(1e-9);
    const o = await parseGeoJson(doc('EPSG:25833'), ingestOptions({ crs: 'EPSG:25832' }));
    expect(o.sourceCrs).toBe('EPSG:25832');
    expect(o.warnings).toEqual(["the file's crs member says EPSG:25833; EPSG:25832 from the request was used"]);
  });

  it('asks for the CRS when the crs member names no EPSG code', async () => {
    const e = await ingestError(() => parseGeoJson(JSON.stringify({ type: 'Point', coordinates: [1, 2], crs: { type: 'link', properties: { href: 'x.prj' } } }), ingestOptions()));
    expect(e.code).toBe('crs_required');
  });

  it('reports malformed JSON with line and column', async () => {
    const e = await ingestError(() => parseGeoJson(text('geojson-malformed.geojson'), ingestOptions()));
    expect(e.code).toBe('malformed');
    expect(e.message).toMatch(/^the GeoJSON is not valid JSON at line 4, column 87: /);
    expect(e.details).toMatchObject({ line: 4, column: 87 });
    const truncated = await ingestError(() => parseGeoJson('{"type":"Point","coordinates":[1,', ingestOptions()));
    expect(truncated.message).toMatch(/^the GeoJSON is not valid JSON at line 1, column 34: /);
  });

  it('lists every position out of range, and unreadable coordinates', async () => {
    const e = await ingestError(() => parseGeoJson(JSON.stringify({ type: 'LineString', coordinates: [[10, 95], [190, 10], [10, 10]] }), ingestOptions()));
    expect(e.code).toBe('out_of_range');
    expect((e.details as { count: number }).count).toBe(2);
    const m = await ingestError(() => parseGeoJson(JSON.stringify({ type: 'LineString', coordinates: [[10, 'a'], [10, 10]] }), ingestOptions()));
    expect([m.code, m.message]).toEqual(['malformed', '1 geometry has unreadable coordinates: feature 1 position 1: [10,"a"] is not a position']);
  });
});
