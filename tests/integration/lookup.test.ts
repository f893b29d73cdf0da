import { randomUUID } from 'node:crypto';
import geodesic from 'geographiclib-geodesic';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { searchAddresses } from '@/db/address-search';
import { normaliseStreet, parseHouseNumber } from '@/lib/households/normalise';
import { lookupAddresses, lookupNearby, nearbyQuery } from '@/lib/services/lookup';
import { POINTS_AND_CROSSINGS_SQL, SECTION_DETAILS_SQL } from '@/db/lookup';
import { createToken } from '@/lib/services/tokens';
import { GET as nearbyRoute } from '@/app/api/lookup/nearby/route';
import { GET as addressesRoute } from '@/app/api/lookup/addresses/route';
import { PATCH as contactRoute } from '@/app/api/me/organisation/route';
import { makePrincipal } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

const db = getDb();
const G = geodesic.Geodesic.WGS84;
const ORIGIN: [number, number] = [9.5, 52.5];
let plan: RecordPlan;
let foreign: RecordPlan;
let northAddressId: string;

async function uploadOf(p: RecordPlan, cls: string, sigma: number): Promise<string> {
  const id = randomUUID();
  await db('uploads').insert({ id, project_id: p.project.id, sha256: randomUUID().replace(/-/g, '').padEnd(64, '0'), size_bytes: 1, file_name: `${cls}.gpx`, status: 'stored', accuracy_class: cls, sigma_m: sigma, crew: 'A', content: 'trench' });
  return id;
}

async function sectionOf(p: RecordPlan, ref: string, pts: [number, number][], from: number, to: number, accuracyM: number, uploads: string[], extra: Record<string, unknown> = {}): Promise<string> {
  const line = pts.map(([e, n]) => p.at(e, n));
  const [{ id }] = await db('sections').insert({
    project_id: p.project.id, planned_route_ref: ref, status: 'as_planned', from_chainage_m: from, to_chainage_m: to,
    geom: db.raw(`ST_SetSRID(ST_GeomFromGeoJSON(?), 4326)`, [JSON.stringify({ type: 'LineString', coordinates: line })]),
    length_m: to - from, max_offset_m: 0.1, p95_offset_m: 0.1, accuracy_m: accuracyM, source_upload_ids: uploads, laid_on: '2026-11-03', first_run: 1, last_run: 1, ...extra,
  }).returning('id');
  return id;
}

async function street(p: RecordPlan, name: string, numbers: string[], north: number, postcode = '40210'): Promise<string[]> {
  const [{ id }] = await db('address_streets').insert({ project_id: p.project.id, name, name_norm: normaliseStreet(name), locality: 'Testbury' }).returning('id');
  const ids: string[] = [];
  for (const [i, n] of numbers.entries()) {
    const h = parseHouseNumber(n);
    const pos = p.at(10 + i * 10, north);
    const [{ id: aid }] = await db('addresses').insert({ project_id: p.project.id, key: `${name}-${n}`, street_id: id, street: name, number: n, number_base: h.base, number_suffix: h.suffix, postcode, locality: 'Testbury', geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', pos) }).returning('id');
    ids.push(aid);
  }
  return ids;
}

/** Geodesic distance from p to the geodesic a→b (GeographicLib): the minimum over the line sampled every 1 cm near the foot. */
function distanceToLine(p: [number, number], a: [number, number], b: [number, number]): number {
  const l = G.InverseLine(a[1], a[0], b[1], b[0]);
  const len = l.s13!;
  let best = Infinity;
  let bestS = 0;
  for (let s = 0; s <= len; s += 0.5) {
    const q = l.Position(s);
    const d = G.Inverse(p[1], p[0], q.lat2!, q.lon2!).s12!;
    if (d < best) [best, bestS] = [d, s];
  }
  for (let s = Math.max(0, bestS - 0.5); s <= Math.min(len, bestS + 0.5); s += 0.001) {
    const q = l.Position(s);
    best = Math.min(best, G.Inverse(p[1], p[0], q.lat2!, q.lon2!).s12!);
  }
  return best;
}

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Lookup', ORIGIN);
  await db('organisations').where({ id: plan.project.ownerOrgId }).update({ contact: 'Network desk 555 0100' });
  foreign = await makeRecordPlan(db, 'Lookup elsewhere', ORIGIN);
  const rtk = await uploadOf(plan, 'rtk_gnss', 0.02);
  const walk = await uploadOf(plan, 'handheld_gnss', 4);
  await sectionOf(plan, 'S-1', [[0, 0], [200, 0]], 0, 200, 0.049, [rtk]);
  await sectionOf(plan, 'X-1', [[40, 0], [40, -9]], 0, 9, 9.79, [walk]);
  // neither is ever returned: a stretch a later run retired, and one not built
  await sectionOf(plan, 'S-1', [[0, 1], [200, 1]], 0, 200, 0.05, [rtk], { retired_in_run: 2 });
  await sectionOf(plan, 'X-2', [[90, 0], [90, -9]], 0, 9, 0, [], { status: 'not_built', accuracy_m: null, max_offset_m: null, p95_offset_m: null });
  // another organisation's ducts at the very same place
  await sectionOf(foreign, 'S-1', [[0, 0], [200, 0]], 0, 200, 0.05, []);
  const s1 = plan.routes.get('S-1')!;
  for (const [ch, cover] of [[20, 0.62], [48, 0.55], [55, 0.58], [150, 0.41]] as const) {
    await db('depth_readings').insert({ project_id: plan.project.id, route_id: s1, chainage_m: ch, offset_m: 0, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', plan.at(ch, 0)), cover_m: cover, source: 'typed' });
  }
  const [{ id: bundle }] = await db('duct_bundles').insert({ project_id: plan.project.id, route_id: s1, from_chainage_m: 0, to_chainage_m: 200, kind: 'installed', note: '', tracer_wire: true, warning_tape: true, protective_fill: false }).returning('id');
  await db('duct_bundle_ducts').insert([
    { bundle_id: bundle, position: 1, outer_mm: 7, inner_mm: 4, colour_position: 1, colour_name: 'blue', colour_hex: '#0000ff' },
    { bundle_id: bundle, position: 2, outer_mm: 7, inner_mm: 4, colour_position: 2, colour_name: 'orange', colour_hex: '#ff8000' },
  ]);
  const ids = await street(plan, 'Lanternfield Road', ['10', '11', '12', '12a', '13', '14'], 12);
  northAddressId = ids[2];
  await street(plan, 'Mill Street', ['5', '7'], -14, '40211');
  await street(plan, 'Millbrook Lane', ['5'], -30, '40212');
  await street(foreign, 'Lanternfield Road', ['12'], 12);
});
afterAll(() => closeDb());

describe('address search (street first, then the number)', () => {
  const ids = () => [plan.project.id];
  it('tolerates a transposed letter and finds the exact number with its suffix first', async () => {
    const r = await searchAddresses(db, { projectIds: ids(), q: 'Lantrenfield Road 12a', limit: 5 });
    expect(r[0]).toMatchObject({ street: 'Lanternfield Road', number: '12a' });
    expect(r[1]).toMatchObject({ number: '12' });
    // then the nearest numbers
    expect(['11', '13']).toContain(r[2].number);
  });
  it('reads "str." as "street", and needs no postcode; a postcode raises the score', async () => {
    const bare = await searchAddresses(db, { projectIds: ids(), q: 'mill str. 5', limit: 3 });
    expect(bare[0]).toMatchObject({ street: 'Mill Street', number: '5' });
    const withPostcode = await searchAddresses(db, { projectIds: ids(), q: 'Mill Str. 5, 40211 Testbury', limit: 3 });
    expect(withPostcode[0].score).toBeGreaterThan(bare[0].score);
    const wrongPostcode = await searchAddresses(db, { projectIds: ids(), q: 'Mill Str. 5, 40299', limit: 3 });
    expect(wrongPostcode[0].score).toBeLessThan(bare[0].score);
  });
  it('only searches the given projects; nothing of another organisation', async () => {
    const mine = await lookupAddresses(db, plan.maintenance, { q: 'Lanternfield Road 12', limit: 10 });
    expect(mine.every((a) => a.projectId === plan.project.id)).toBe(true);
    const stranger = await makePrincipal(db, 'maintenance', 'owner');
    expect(await lookupAddresses(db, stranger, { q: 'Lanternfield Road 12', limit: 10 })).toEqual([]);
  });
  it('the street query is unnamed and in the form the trigram index serves (EXPLAIN)', async () => {
    // 3,000 invented street names in the other project, as a real register has them
    const syll = ['lan', 'tern', 'field', 'cob', 'bler', 'salt', 'marsh', 'wick', 'ham', 'fer', 'rier', 'quill', 'haven', 'moss', 'gate', 'lark', 'spur', 'tarn', 'oak', 'wren'];
    const kinds = ['road', 'street', 'lane', 'walk', 'row', 'rise', 'close'];
    const rows = Array.from({ length: 3000 }, (_, i) => {
      const name = `${syll[i % 20]}${syll[Math.floor(i / 20) % 20]}${syll[Math.floor(i / 400) % 20]} ${kinds[i % 7]}`;
      return { project_id: foreign.project.id, name, name_norm: normaliseStreet(name), locality: `L${i}` };
    });
    await db.batchInsert('address_streets', rows, 500);
    await db.raw('ANALYZE address_streets');
    const seen: { sql: string; bindings: unknown[] }[] = [];
    const listen = (q: { sql: string; bindings: unknown[] }) => seen.push(q);
    db.on('query', listen);
    await searchAddresses(db, { projectIds: [foreign.project.id], q: 'Lanfieldtern Road 3', limit: 5 });
    db.off('query', listen);
    const streetQuery = seen.find((q) => q.sql.includes('address_streets'))!;
    // never a named prepared statement: knex sends it unnamed (pg names a statement only when asked)
    expect(streetQuery).not.toHaveProperty('name');
    expect(streetQuery.sql).toMatch(/name_norm % \$\d/);
    // The condition is in the form the GIN index serves (`name_norm % text`; `name_norm <% text` would not be):
    // with sequential scans off, the trigram index answers it. On this small table the planner rightly
    // prefers a sequential scan of the project's streets (a few ms); the bench measures the big one.
    await db.transaction(async (trx) => {
      await trx.raw('SET LOCAL enable_seqscan = off');
      const { rows: plan } = await trx.raw('EXPLAIN SELECT id FROM address_streets WHERE name_norm % ?', ['lanfieldtern road']);
      expect(plan.map((r: Record<string, string>) => r['QUERY PLAN']).join('\n')).toContain('Bitmap Index Scan on address_streets_name_norm_trgm_idx');
    });
  });
});

describe('nearby stretches', () => {
  const q = (e: number, n: number, extra: Record<string, string> = {}) => {
    const [lon, lat] = plan.at(e, n);
    return nearbyQuery.parse({ lon: String(lon), lat: String(lat), ...extra });
  };
  it('measures geodesic distances (checked against GeographicLib) and lists the nearest first', async () => {
    const r = await lookupNearby(db, plan.maintenance, q(50, 7));
    expect(r.radiusM).toBe(50);
    expect(r.stretches.map((s) => s.routeRef)).toEqual(['S-1', 'X-1']);
    const spot = plan.at(50, 7);
    // [computed with geographiclib-geodesic]: the distance to each recorded line
    expect(r.stretches[0].distanceM).toBeCloseTo(distanceToLine(spot, plan.at(0, 0), plan.at(200, 0)), 1);
    expect(r.stretches[1].distanceM).toBeCloseTo(distanceToLine(spot, plan.at(40, 0), plan.at(40, -9)), 1);
    expect(Math.abs(r.stretches[0].distanceM - 7)).toBeLessThan(0.02);
  });
  it('says the side of the street, the cover, the ducts, the radius and its source', async () => {
    const north = (await lookupNearby(db, plan.maintenance, q(50, 7))).stretches[0];
    expect(north.side).toBe('left');
    const south = (await lookupNearby(db, plan.maintenance, q(50, -7, { addressId: northAddressId }))).stretches.find((s) => s.routeRef === 'S-1')!;
    expect(south.side).toBe('right');
    expect(south.sideOfAddress).toBe('across');
    const same = (await lookupNearby(db, plan.maintenance, q(50, 3, { addressId: northAddressId }))).stretches.find((s) => s.routeRef === 'S-1')!;
    expect(same.sideOfAddress).toBe('same side as the address');
    expect(north.cover.nearest.map((c) => c.coverM)).toEqual([0.55, 0.58]);
    expect(north.cover.shallowestM).toBe(0.41);
    expect(north.ducts[0].ducts.map((d) => d.colour)).toEqual(['blue', 'orange']);
    expect(north.radiusM).toBe(0.049);
    expect(north.radiusSource).toBe('RTK GNSS');
    expect(north.handoverRevision).toBeNull();
    expect(north.laidOn).toBe('2026-11-03');
    expect(north.ownerOrganisation).toBe(plan.project.ownerOrgName);
    expect(north.ownerContact).toBe('Network desk 555 0100');
  });
  it('names the newest issued handover revision holding the section; a section of no package stays "not handed over"', async () => {
    const before = (await lookupNearby(db, plan.maintenance, q(50, 7))).stretches;
    const north = before[0];
    const other = before.find((s) => s.id !== north.id)!;
    expect(other).toBeDefined();
    // revision n holds only the north street's section; a later returned revision holds it too
    const snap = (ids: string[]) => JSON.stringify({ sections: ids.map((id) => ({ id })) });
    const base = { project_id: plan.project.id, storage_key: 'handovers/x.zip', sha256: 'a'.repeat(64), size_bytes: 1, file_name: 'x.zip', issued_at: db.fn.now() };
    const { max } = (await db('handovers').where({ project_id: plan.project.id }).max('revision as max').first()) as { max: number | null };
    const r1 = (max ?? 0) + 1;
    await db('handovers').insert({ ...base, revision: r1, status: 'issued', snapshot: snap([north.id]) });
    await db('handovers').insert({ ...base, revision: r1 + 1, status: 'returned', reviewed_at: db.fn.now(), snapshot: snap([north.id]) });
    // a package still building or failed names nothing
    await db('handovers').insert({ project_id: plan.project.id, revision: r1 + 2, status: 'failed', failure_reason: 'test', snapshot: snap([north.id, other.id]) });
    try {
      const after = (await lookupNearby(db, plan.maintenance, q(50, 7))).stretches;
      expect(after.find((s) => s.id === north.id)!.handoverRevision).toMatchObject({ revision: r1 + 1, status: 'returned' });
      expect(after.find((s) => s.id === other.id)!.handoverRevision).toBeNull();
    } finally {
      await db('handovers').where({ project_id: plan.project.id }).where('revision', '>=', r1).delete();
    }
  });
  it('lists utility crossings, test pits and road crossings within the radius, by geodesic distance, and none just outside [positions by geographiclib-geodesic Direct]', async () => {
    const s1 = plan.routes.get('S-1')!;
    const x1 = plan.routes.get('X-1')!;
    const [lon0, lat0] = plan.at(100, 30);
    const from = (azi: number, dist: number): [number, number] => { const d = G.Direct(lat0, lon0, azi, dist); return [d.lon2!, d.lat2!]; };
    const kind = (await db('utility_kinds').whereNull('project_id').first('id')).id;
    const pt = (lonlat: [number, number]) => db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', lonlat);
    // due east and due north, where a box in degrees is tightest: 49.5 m in, 50.5 m out
    await db('utility_crossings').insert([
      { project_id: plan.project.id, route_id: s1, chainage_m: 100, geom: pt(from(90, 49.5)), utility_kind_id: kind, method: 'gpr', owner: 'Quillhaven Water', depth_m: 0.9, clearance_m: 0.3 },
      { project_id: plan.project.id, route_id: s1, chainage_m: 101, geom: pt(from(90, 50.5)), utility_kind_id: kind, method: 'gpr', owner: 'too far', depth_m: 0.9, clearance_m: 0.3 },
    ]);
    await db('test_pits').insert([
      { project_id: plan.project.id, route_id: s1, chainage_m: 100, geom: pt(from(0, 49.5)), name: 'TP-in', depth_m: 0.6 },
      { project_id: plan.project.id, route_id: s1, chainage_m: 100, geom: pt(from(180, 50.5)), name: 'TP-out', depth_m: 0.6 },
    ]);
    await db('road_crossings').insert({ project_id: plan.project.id, route_id: x1, from_chainage_m: 0, to_chainage_m: 9, built: true, built_on: '2026-11-04', length_m: 9, duct_count: 1 });
    try {
      const r = await lookupNearby(db, plan.maintenance, { ...nearbyQuery.parse({ lon: String(lon0), lat: String(lat0), radius: '50' }) });
      // a box that forgot the cos(latitude) would be about 30 m wide east–west here and lose the utility
      expect(r.nearby.map((n) => [n.kind, n.kind === 'pit' ? n.label : n.owner]).sort()).toEqual([['pit', 'Test pit TP-in'], ['utility', 'Quillhaven Water']]);
      for (const n of r.nearby) expect(n.distanceM).toBeCloseTo(49.5, 2);
      // the X-1 crossing runs 40 m east at 0 to -9 m north: about 74 m from this spot, outside
      expect(r.crossings).toEqual([]);
      const near = await lookupNearby(db, plan.maintenance, nearbyQuery.parse({ lon: String(plan.at(45, -4)[0]), lat: String(plan.at(45, -4)[1]) }));
      expect(near.crossings.map((c) => c.routeRef)).toEqual(['X-1']);
    } finally {
      await db('utility_crossings').where({ project_id: plan.project.id }).delete();
      await db('test_pits').where({ project_id: plan.project.id }).delete();
      await db('road_crossings').where({ project_id: plan.project.id }).delete();
    }
  });
  it("the named details statement's generic plan finds the sections by primary key and their records by index (EXPLAIN)", async () => {
    // SECTION_DETAILS_SQL runs prepared and named (db/lookup.ts): its cached, generic plan must stay on indexes
    const ids = (await lookupNearby(db, plan.maintenance, q(50, 7))).stretches.map((st) => st.id);
    await db.transaction(async (trx) => {
      await trx.raw('SET LOCAL plan_cache_mode = force_generic_plan');
      await trx.raw('SET LOCAL enable_seqscan = off'); // test tables are small enough for a scan to win anyway
      await trx.raw(`PREPARE details_plan_test AS ${SECTION_DETAILS_SQL}`);
      const { rows } = await trx.raw(`EXPLAIN EXECUTE details_plan_test('{${ids.join(',')}}')`);
      await trx.raw('DEALLOCATE details_plan_test');
      const text = rows.map((r: Record<string, string>) => r['QUERY PLAN']).join('\n');
      expect(text).toMatch(/Index Scan on sections_pkey|Index Scan using sections_pkey on sections s/);
      expect(text).not.toMatch(/Seq Scan/);
      expect(text).toMatch(/Index Scan using planned_routes_project_ref_unique on planned_routes r/);
      expect(text).toMatch(/depth_readings_project_route_chainage_idx/);
    });
    // POINTS_AND_CROSSINGS_SQL, named too: the generic plan finds each part through its GIST index by the box
    await db.transaction(async (trx) => {
      await trx.raw('SET LOCAL plan_cache_mode = force_generic_plan');
      await trx.raw('SET LOCAL enable_seqscan = off');
      await trx.raw(`PREPARE points_plan_test AS ${POINTS_AND_CROSSINGS_SQL}`);
      const [lon, lat] = plan.at(50, 7);
      const { rows } = await trx.raw(`EXPLAIN EXECUTE points_plan_test(${lon}, ${lat}, '{${plan.project.id}}', 0.001, 50)`);
      await trx.raw('DEALLOCATE points_plan_test');
      const text = rows.map((r: Record<string, string>) => r['QUERY PLAN']).join('\n');
      for (const index of ['utility_crossings_geom_gist', 'test_pits_geom_gist', 'planned_routes_geom_gist']) expect(text).toContain(index);
    });
    // and the lookup through it answers as before, again and again on the pool's connections (cached plans)
    for (let i = 0; i < 12; i++) expect((await lookupNearby(db, plan.maintenance, q(50, 7))).stretches[0].ducts[0].ducts.map((d) => d.colour)).toEqual(['blue', 'orange']);
  });
  it('sorts by "could be this close" too: the walked crossing, 9.79 m uncertain, could be nearer than the surveyed street', async () => {
    const r = await lookupNearby(db, plan.maintenance, q(45, 9, { order: 'could_be' }));
    expect(r.stretches[0].routeRef).toBe('X-1');
    expect(r.stretches[0].couldBeThisCloseM).toBeCloseTo(Math.max(0, r.stretches[0].distanceM - 9.79), 2);
    const byDistance = await lookupNearby(db, plan.maintenance, q(45, 9));
    expect(byDistance.stretches[0].routeRef).toBe('S-1');
  });
  it('draws the 95 % band: every vertex of the buffer lies the radius away from the line [computed with geographiclib-geodesic]', async () => {
    const x1 = (await lookupNearby(db, plan.maintenance, q(45, 9))).stretches.find((s) => s.routeRef === 'X-1')!;
    const ring = (x1.band!.type === 'Polygon' ? x1.band!.coordinates[0] : x1.band!.coordinates[0][0]) as [number, number][];
    expect(ring.length).toBeGreaterThan(16);
    for (const v of ring.filter((_, i) => i % 4 === 0)) expect(Math.abs(distanceToLine(v, plan.at(40, 0), plan.at(40, -9)) - 9.79)).toBeLessThan(0.1);
  });
  it('never returns another organisation’s sections: empty, not an error, where only theirs lie', async () => {
    const mine = await lookupNearby(db, plan.maintenance, q(150, 3));
    expect(mine.stretches.every((s) => s.projectId === plan.project.id)).toBe(true);
    const theirs = await lookupNearby(db, foreign.maintenance, q(150, 3));
    expect(theirs.stretches.map((s) => s.projectId)).toEqual([foreign.project.id]);
    const stranger = await makePrincipal(db, 'maintenance', 'owner');
    expect((await lookupNearby(db, stranger, q(150, 3))).stretches).toEqual([]);
  });
  it('the API: GeoJSON, and a specific 400 for a bad lon, lat or radius', async () => {
    const token = (await createToken(db, plan.maintenance, { name: 'lookup' })).secret;
    const call = (handler: typeof nearbyRoute, url: string) => handler(new NextRequest(`http://127.0.0.1${url}`, { headers: { authorization: `Bearer ${token}` } }), { params: Promise.resolve({}) });
    const [lon, lat] = plan.at(50, 7);
    const geo = await call(nearbyRoute, `/api/lookup/nearby?lon=${lon}&lat=${lat}&format=geojson`);
    expect(geo.status).toBe(200);
    const fc = await geo.json();
    expect(fc.features[0]).toMatchObject({ type: 'Feature', geometry: { type: 'LineString' }, properties: { routeRef: 'S-1', side: 'left' } });
    for (const [qs, param] of [[`lon=200&lat=${lat}`, 'lon'], [`lon=${lon}&lat=abc`, 'lat'], [`lon=${lon}&lat=${lat}&radius=900`, 'radius'], [`lat=${lat}`, 'lon']] as const) {
      const r = await call(nearbyRoute, `/api/lookup/nearby?${qs}`);
      expect(r.status, qs).toBe(400);
      const body = await r.json();
      expect(body.error.code).toBe('bad_parameter');
      expect(body.error.message.startsWith(`${param}:`)).toBe(true);
    }
    const found = await call(addressesRoute, '/api/lookup/addresses?q=lanternfeild%20rd%2012');
    expect((await found.json()).candidates[0]).toMatchObject({ street: 'Lanternfield Road', number: '12', projectId: plan.project.id });
  });
  it("the owner's administrator sets the contact the lookup shows (audited); another role gets 403, an over-long one a 422 naming the field, and nothing changes", async () => {
    const admin = await makePrincipal(db, 'admin', 'owner', plan.project.ownerOrgName);
    const patch = async (who: typeof admin, body: unknown) => {
      const token = (await createToken(db, who, { name: 'contact' })).secret;
      return contactRoute(new NextRequest('http://127.0.0.1/api/me/organisation', { method: 'PATCH', headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: JSON.stringify(body) }), { params: Promise.resolve({}) });
    };
    const auditRows = () => db('audit_log').where({ object_type: 'organisation', action: 'contact', object_id: plan.project.ownerOrgId }).count<{ n: number }[]>('* as n').then(([r]) => Number(r.n));
    const before = await auditRows();
    const ok = await patch(admin, { contact: '  Fault desk 555 0142, faults@quillhaven.example ' });
    expect(ok.status).toBe(200);
    expect((await ok.json()).organisation.contact).toBe('Fault desk 555 0142, faults@quillhaven.example');
    expect((await lookupNearby(db, plan.maintenance, q(50, 7))).stretches[0].ownerContact).toBe('Fault desk 555 0142, faults@quillhaven.example');
    expect(await auditRows()).toBe(before + 1);

    expect((await patch(plan.maintenance, { contact: 'Someone else' })).status).toBe(403);
    const long = await patch(admin, { contact: 'x'.repeat(501) });
    expect(long.status).toBe(422);
    expect((await long.json()).error.details[0].path).toBe('contact');
    expect((await db('organisations').where({ id: plan.project.ownerOrgId }).first()).contact).toBe('Fault desk 555 0142, faults@quillhaven.example');
    expect(await auditRows()).toBe(before + 1);
    await db('organisations').where({ id: plan.project.ownerOrgId }).update({ contact: 'Network desk 555 0100' });
  });
});
