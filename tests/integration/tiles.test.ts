import { randomUUID } from 'node:crypto';
import { VectorTile, type VectorTileLayer } from '@mapbox/vector-tile';
import { PbfReader } from 'pbf';
import geodesic from 'geographiclib-geodesic';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { projectTile, tileQuery } from '@/db/tiles';
import { createToken } from '@/lib/services/tokens';
import { TILE_LAYERS, parseTileParams } from '@/lib/tiles/params';
import { GET as tileRoute } from '@/app/api/projects/[projectId]/tiles/[layer]/[z]/[x]/[y]/route';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

const db = getDb();
const G = geodesic.Geodesic.WGS84;

/** The XYZ tile holding a position (the slippy-map formulae: Web Mercator, y from the north). */
function tileOf(lon: number, lat: number, z: number): { x: number; y: number } {
  const n = 2 ** z;
  const r = (lat * Math.PI) / 180;
  return { x: Math.floor(((lon + 180) / 360) * n), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * n) };
}

/** The centre of tile (z, x, y) as lon/lat. */
function tileCentre(z: number, x: number, y: number): [number, number] {
  const n = 2 ** z;
  const lon = ((x + 0.5) / n) * 360 - 180;
  const lat = (Math.atan(Math.sinh(Math.PI * (1 - (2 * (y + 0.5)) / n))) * 180) / Math.PI;
  return [lon, lat];
}

const Z = 14;
const HOME = tileOf(10.2, 51.3, Z);
// the fixture's origin is the middle of one zoom-14 tile (about 1.5 km across here), so everything lies in it
const ORIGIN = tileCentre(Z, HOME.x, HOME.y);

let plan: RecordPlan;
let foreign: RecordPlan;
let token: string;
let ownerToken: string;
const ids: Record<string, string> = {};

async function call(projectId: string, layer: string, z: string | number, x: string | number, y: string, opts: { token?: string; ifNoneMatch?: string } = {}): Promise<Response> {
  const headers: Record<string, string> = { authorization: `Bearer ${opts.token ?? token}` };
  if (opts.ifNoneMatch) headers['if-none-match'] = opts.ifNoneMatch;
  const url = `http://127.0.0.1/api/projects/${projectId}/tiles/${layer}/${z}/${x}/${y}`;
  return tileRoute(new NextRequest(url, { headers }), { params: Promise.resolve({ projectId, layer, z: String(z), x: String(x), y }) });
}

async function decode(res: Response): Promise<VectorTile> {
  return new VectorTile(new PbfReader(new Uint8Array(await res.arrayBuffer())));
}

function props(layer: VectorTileLayer): Record<string, unknown>[] {
  return Array.from({ length: layer.length }, (_, i) => layer.feature(i).properties);
}

async function sectionOf(p: RecordPlan, ref: string, pts: [number, number][], extra: Record<string, unknown> = {}): Promise<string> {
  const line = pts.map(([e, n]) => p.at(e, n));
  const [{ id }] = await db('sections').insert({
    project_id: p.project.id, planned_route_ref: ref, status: 'as_planned', from_chainage_m: 0, to_chainage_m: 200,
    geom: db.raw('ST_SetSRID(ST_GeomFromGeoJSON(?), 4326)', [JSON.stringify({ type: 'LineString', coordinates: line })]),
    length_m: 200, max_offset_m: 0.1, p95_offset_m: 0.1, accuracy_m: 0.05, source_upload_ids: [], laid_on: '2026-11-03', first_run: 1, last_run: 1, ...extra,
  }).returning('id');
  return id;
}

const point = (pos: [number, number]) => db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', pos);

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Tiles', ORIGIN);
  foreign = await makeRecordPlan(db, 'Tiles elsewhere', ORIGIN);
  token = (await createToken(db, plan.engineer, { name: 'tiles' })).secret;
  ownerToken = (await createToken(db, plan.owner, { name: 'tiles owner' })).secret;
  const pid = plan.project.id;
  const s1 = plan.routes.get('S-1')!;

  ids.s1 = await sectionOf(plan, 'S-1', [[0, 0], [200, 0]], { review: 'approved' });
  ids.x2 = await sectionOf(plan, 'X-2', [[90, 0], [90, -9]], { status: 'not_built', to_chainage_m: 9, length_m: 9, accuracy_m: null, max_offset_m: null, p95_offset_m: null });
  // retired by a later run: never drawn
  await sectionOf(plan, 'S-1', [[0, 1], [200, 1]], { retired_in_run: 2 });
  // another organisation's section at the very same place
  await sectionOf(foreign, 'S-1', [[0, 0], [200, 0]]);

  const [{ id: rc }] = await db('road_crossings').insert({ project_id: pid, route_id: plan.routes.get('X-1'), from_chainage_m: 0, to_chainage_m: 9, built: true, built_on: '2026-11-02' }).returning('id');
  ids.crossing = rc;
  const [{ id: dr }] = await db('depth_readings').insert({ project_id: pid, route_id: s1, chainage_m: 20, offset_m: 0, geom: point(plan.at(20, 0)), cover_m: 0.62, source: 'typed' }).returning('id');
  ids.depth = dr;
  await db('depth_readings').insert({ project_id: pid, route_id: s1, chainage_m: 150, offset_m: 0, geom: point(plan.at(150, 0)), trench_depth_m: 0.5, source: 'typed' });
  const [{ id: pit }] = await db('test_pits').insert({ project_id: pid, route_id: s1, chainage_m: 60, offset_m: 0.5, geom: point(plan.at(60, 0.5)), name: 'TP-1' }).returning('id');
  ids.pit = pit;
  const kind = await db('utility_kinds').where({ project_id: pid }).first('id');
  const [{ id: uc }] = await db('utility_crossings').insert({ project_id: pid, route_id: s1, chainage_m: 60, offset_m: 0, geom: point(plan.at(60, 0)), utility_kind_id: kind.id, method: 'gpr' }).returning('id');
  ids.utility = uc;
  const sha = 'a'.repeat(64);
  const [{ id: photo }] = await db('photos').insert({ project_id: pid, route_id: s1, chainage_m: 100, offset_m: 0, geom: point(plan.at(100, 0)), placed_by: 'hand', file_name: 'p.jpg', mime_type: 'image/jpeg', size_bytes: 1, sha256: sha, width: 1, height: 1, storage_key: `tiles/${randomUUID()}`, thumbnail_key: `tiles/${randomUUID()}` }).returning('id');
  ids.photo = photo;

  const [{ id: imp }] = await db('address_imports').insert({ project_id: pid, file_name: 'a.csv', sha256: sha, size_bytes: 1, storage_key: `tiles/${randomUUID()}`, format: 'csv', crs: 'EPSG:4326', mapping: '{}', mapping_guessed: false, counts: '{}' }).returning('id');
  const addr = async (key: string, north: number, extra: Record<string, unknown>) => (await db('addresses').insert({ project_id: pid, key, street: 'Test Street', number: key, geom: point(plan.at(40, north)), ...extra }).returning('id'))[0].id as string;
  ids.addrPassed = await addr('10', -15, { passed: true, connected: true, connected_on: '2026-11-05' });
  ids.addrOpen = await addr('12', 15, {});
  await addr('14', 20, { removed_in_import: imp });

  // two uploads' raw features: a stored one is drawn, a withdrawn one not
  for (const [status, north] of [['stored', 2], ['withdrawn', 3]] as const) {
    const uid = randomUUID();
    await db('uploads').insert({ id: uid, project_id: pid, sha256: randomUUID().replace(/-/g, '').padEnd(64, '0'), size_bytes: 1, file_name: `${status}.gpx`, status, accuracy_class: 'rtk_gnss', sigma_m: 0.02, crew: 'A', content: 'trench' });
    await db('upload_features').insert({ upload_id: uid, project_id: pid, seq: 1, kind: 'line', geom: db.raw('ST_SetSRID(ST_GeomFromGeoJSON(?), 4326)', [JSON.stringify({ type: 'LineString', coordinates: [plan.at(0, north), plan.at(200, north)] })]), point_count: 2 });
    if (status === 'stored') ids.upload = uid;
  }
});
afterAll(() => closeDb());

describe('vector tiles of a project', () => {
  it('serves each layer as MVT bytes decoded by @mapbox/vector-tile, with the catalogue\'s attributes and counts', async () => {
    const res = await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/vnd.mapbox-vector-tile');
    expect(res.headers.get('cache-control')).toBe('private, max-age=60');
    const tile = await decode(res);
    expect(Object.keys(tile.layers).sort()).toEqual([...TILE_LAYERS].sort());

    const routes = props(tile.layers.planned_routes);
    expect(routes.map((r) => r.ref).sort()).toEqual(['S-1', 'X-1', 'X-2', 'X-3']);
    expect(routes.find((r) => r.ref === 'S-1')).toMatchObject({ street: 'Test Street', kind: 'street' });
    expect(routes.find((r) => r.ref === 'X-1')).toMatchObject({ kind: 'crossing' });

    // current sections only (the retired one is left out), and none of the other organisation's
    const sections = props(tile.layers.sections);
    expect(sections).toHaveLength(2);
    expect(sections.find((s) => s.id === ids.s1)).toEqual({ id: ids.s1, ref: 'S-1', status: 'as_planned', review: 'approved', accuracy_m: 0.05 });
    // a figure nothing measured is absent, not 0
    expect(sections.find((s) => s.id === ids.x2)).toEqual({ id: ids.x2, ref: 'X-2', status: 'not_built', review: 'pending' });

    expect(props(tile.layers.road_crossings)).toEqual([{ id: ids.crossing, ref: 'X-1', built: true }]);
    expect(props(tile.layers.test_pits)).toEqual([{ id: ids.pit }]);
    expect(props(tile.layers.utility_crossings)).toEqual([{ id: ids.utility }]);
    expect(props(tile.layers.photos)).toEqual([{ id: ids.photo }]);
    const depths = props(tile.layers.depth_readings);
    expect(depths).toHaveLength(2);
    expect(depths.find((d) => d.id === ids.depth)).toEqual({ id: ids.depth, cover_m: 0.62 });
    // removed addresses are not drawn
    const addresses = props(tile.layers.addresses);
    expect(addresses).toHaveLength(2);
    expect(addresses.find((a) => a.id === ids.addrPassed)).toEqual({ id: ids.addrPassed, key: '10', passed: true, connected: true });
    expect(addresses.find((a) => a.id === ids.addrOpen)).toEqual({ id: ids.addrOpen, key: '12', passed: false, connected: false });
    // the stored upload's features only
    expect(props(tile.layers.raw_traces)).toEqual([expect.objectContaining({ upload_id: ids.upload, kind: 'line' })]);
  });

  it('a single-layer tile holds that layer only, and the same features as the multi-layer tile', async () => {
    const tile = await decode(await call(plan.project.id, 'sections', Z, HOME.x, `${HOME.y}.mvt`));
    expect(Object.keys(tile.layers)).toEqual(['sections']);
    expect(tile.layers.sections.length).toBe(2);
    expect(tile.layers.sections.extent).toBe(4096);
  });

  it('places features within a metre of the stored positions (GeographicLib geodesic distance)', async () => {
    // at zoom 14 one tile unit is 2π·6378137 m / 2^14 / 4096 ≈ 0.60 m of Web Mercator, ≈ 0.37 m on the ground at
    // 51.3° N; ST_AsMVTGeom rounds to the unit, so a decoded position is off by at most half a unit's diagonal (≈ 0.27 m)
    const tile = await decode(await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`));
    const distance = (a: number[], b: [number, number]) => G.Inverse(a[1], a[0], b[1], b[0]).s12!;
    const depths = tile.layers.depth_readings;
    const reading = Array.from({ length: depths.length }, (_, i) => depths.feature(i)).find((f) => f.properties.id === ids.depth)!;
    const geo = reading.toGeoJSON(HOME.x, HOME.y, Z);
    expect(geo.geometry.type).toBe('Point');
    expect(distance((geo.geometry as { coordinates: number[] }).coordinates, plan.at(20, 0))).toBeLessThan(0.5);

    const sections = tile.layers.sections;
    const s1 = Array.from({ length: sections.length }, (_, i) => sections.feature(i)).find((f) => f.properties.id === ids.s1)!;
    const line = s1.toGeoJSON(HOME.x, HOME.y, Z).geometry as { type: string; coordinates: number[][] };
    expect(line.type).toBe('LineString');
    const ends = [line.coordinates[0], line.coordinates[line.coordinates.length - 1]];
    const [west, east] = ends[0][0] < ends[1][0] ? ends : [ends[1], ends[0]];
    expect(distance(west, plan.at(0, 0))).toBeLessThan(0.5);
    expect(distance(east, plan.at(200, 0))).toBeLessThan(0.5);

    // the crossing is its route's line between its chainages: 9 m south from S-1 at 40 m
    const crossing = tile.layers.road_crossings.feature(0).toGeoJSON(HOME.x, HOME.y, Z).geometry as { coordinates: number[][] };
    const cEnds = crossing.coordinates;
    const [north, south] = cEnds[0][1] > cEnds[cEnds.length - 1][1] ? [cEnds[0], cEnds[cEnds.length - 1]] : [cEnds[cEnds.length - 1], cEnds[0]];
    expect(distance(north, plan.at(40, 0))).toBeLessThan(0.5);
    expect(distance(south, plan.at(40, -9))).toBeLessThan(0.5);
  });

  it('quantises per zoom: a line shorter than one tile unit is dropped at zoom 8, a point is within 1 cm at zoom 22', async () => {
    // at zoom 8 one unit is ≈ 38 m of Web Mercator (≈ 24 m on the ground here): ST_AsMVTGeom drops the 9 m
    // not-built stretch, which collapses to a point on the grid, and keeps the 200 m one
    const low = tileOf(ORIGIN[0], ORIGIN[1], 8);
    const lowTile = await decode(await call(plan.project.id, 'sections', 8, low.x, `${low.y}.mvt`));
    expect(props(lowTile.layers.sections).map((s) => s.id)).toEqual([ids.s1]);
    const pos = plan.at(20, 0);
    const high = tileOf(pos[0], pos[1], 22);
    const highTile = await decode(await call(plan.project.id, 'depth_readings', 22, high.x, `${high.y}.mvt`));
    const geo = highTile.layers.depth_readings.feature(0).toGeoJSON(high.x, high.y, 22).geometry as { coordinates: number[] };
    expect(G.Inverse(geo.coordinates[1], geo.coordinates[0], pos[1], pos[0]).s12!).toBeLessThan(0.01);
  });

  it('answers an empty tile (200, zero bytes) where the project has no feature', async () => {
    const res = await call(plan.project.id, 'all', Z, HOME.x + 2, `${HOME.y}.mvt`);
    expect(res.status).toBe(200);
    expect((await res.arrayBuffer()).byteLength).toBe(0);
    expect(res.headers.get('etag')).toMatch(/^"[0-9a-f]{64}"$/);
  });

  it('gives an ETag (SHA-256 of the bytes) and 304 with no body on a matching If-None-Match', async () => {
    const first = await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`);
    const bytes = Buffer.from(await first.arrayBuffer());
    const { createHash } = await import('node:crypto');
    const etag = first.headers.get('etag')!;
    expect(etag).toBe(`"${createHash('sha256').update(bytes).digest('hex')}"`);
    const again = await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`, { ifNoneMatch: etag });
    expect(again.status).toBe(304);
    expect(again.headers.get('etag')).toBe(etag);
    expect((await again.arrayBuffer()).byteLength).toBe(0);
    const listed = await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`, { ifNoneMatch: `"other", W/${etag}` });
    expect(listed.status).toBe(304);
    const stale = await call(plan.project.id, 'all', Z, HOME.x, `${HOME.y}.mvt`, { ifNoneMatch: '"stale"' });
    expect(stale.status).toBe(200);
  });

  it('lets the network owner\'s people read the tiles; another organisation\'s project is 404', async () => {
    expect((await call(plan.project.id, 'sections', Z, HOME.x, `${HOME.y}.mvt`, { token: ownerToken })).status).toBe(200);
    const res = await call(foreign.project.id, 'sections', Z, HOME.x, `${HOME.y}.mvt`);
    expect(res.status).toBe(404);
    expect((await res.json()).error.code).toBe('not_found');
    // even with a bad tile address: visibility first
    expect((await call(foreign.project.id, 'nope', 99, 0, '0.png')).status).toBe(404);
  });

  it.each([
    ['layer', 'trenches', '14', String(HOME.x), `${HOME.y}.mvt`, /layer: "trenches" is not a tile layer; it takes planned_routes, .*raw_traces or all/],
    ['z above 22', 'all', '23', '0', '0.mvt', /z: "23" is not a zoom level; it takes a whole number from 0 to 22/],
    ['z not a number', 'all', '1.5', '0', '0.mvt', /z: "1.5" is not a zoom level/],
    ['x beyond 2^z−1', 'all', '2', '4', '0.mvt', /x: "4" is not a tile column at zoom 2; it takes a whole number from 0 to 3/],
    ['negative x', 'all', '2', '-1', '0.mvt', /x: "-1" is not a tile column/],
    ['y beyond 2^z−1', 'all', '0', '0', '1.mvt', /y: "1" is not a tile row at zoom 0; it takes a whole number from 0 to 0/],
    ['suffix', 'all', '0', '0', '0.png', /y: the last segment "0.png" must be \{y\}.mvt/],
    ['no suffix', 'all', '0', '0', '0', /y: the last segment "0" must be \{y\}.mvt/],
  ])('refuses a bad %s with 400 bad_parameter naming it', async (_what, layer, z, x, y, message) => {
    const res = await call(plan.project.id, layer, z, x, y);
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.error.code).toBe('bad_parameter');
    expect(body.error.message).toMatch(message);
  });

  it('finds the rows through the GIST index on geom (EXPLAIN of the sections query)', async () => {
    const parsed = parseTileParams({ layer: 'sections', z: String(Z), x: String(HOME.x), y: `${HOME.y}.mvt` });
    if (!parsed.ok) throw new Error(parsed.message);
    expect((await projectTile(db, plan.project.id, parsed.tile)).length).toBeGreaterThan(0);
    // the same statement projectTile runs, explained; on a handful of rows the planner would rather scan, so
    // sequential scans are priced out for the check (one connection in a transaction, SET LOCAL)
    const { sql, bindings } = tileQuery(plan.project.id, parsed.tile);
    const plan_ = await db.transaction(async (trx) => {
      await trx.raw('SET LOCAL enable_seqscan = off');
      const r = await trx.raw(`EXPLAIN ${sql}`, bindings);
      return r.rows.map((row: { 'QUERY PLAN': string }) => row['QUERY PLAN']).join('\n');
    });
    expect(plan_).toContain('sections_geom_gist');
  });
});
