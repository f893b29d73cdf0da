import { createHash } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import geodesic from 'geographiclib-geodesic';
import type { Knex } from 'knex';
import { getProject } from '../projects';
import { loadPrincipal } from '../../lib/auth/principal';
import { importPlan } from '../../lib/services/planned';
import { runReconciliation } from '../../lib/services/reconcile';
import { receiveUpload } from '../../lib/services/uploads';
import { DEMO_PROJECT, DEMO_USERS } from './01_demo';
import { mulberry32 } from '../../lib/records/seeded-random';

// The demo's field work in Quillhaven North: a design of four streets and their road crossings, one crew's
// handheld walk (with a detour around a tree pit on Lanternfield Road), an RTK survey of Cobbler Walk laid
// 0.8 m off the design for 30 m, a spur laid on past the end of Wickham Rise that the design does not have
// (Ferrier Close, agreed on site), and Saltmarsh Row not yet built. Generated, fictional, idempotent.
const G = geodesic.Geodesic.WGS84;
const O: [number, number] = [9.104, 52.106];
const at = (east: number, north: number): [number, number] => {
  const a = G.Direct(O[1], O[0], 90, east);
  const b = G.Direct(a.lat2!, a.lon2!, 0, north);
  return [b.lon2!, b.lat2!];
};

function design(): string {
  const f = (ref: string, street: string, bundle: string, type: string, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: ref, street, bundle, type }, geometry: { type: 'LineString', coordinates: pts.map(([e, n]) => at(e, n)) } });
  return JSON.stringify({
    type: 'FeatureCollection',
    features: [
      f('QN-101', 'Lanternfield Road', '12x7mm', 'street', [[0, 0], [140, 0], [280, 8]]),
      f('QN-102', 'Cobbler Walk', '7x7mm', 'street', [[140, 0], [140, 130]]),
      f('QN-103', 'Saltmarsh Row', '7x7mm', 'street', [[280, 8], [285, -110]]),
      f('QN-104', 'Wickham Rise', '4x7mm', 'street', [[140, 130], [250, 136]]),
      f('QN-X1', 'Lanternfield Road', '1x14mm', 'road crossing', [[40, 0], [40, -9]]),
      f('QN-X2', 'Lanternfield Road', '1x14mm', 'road crossing', [[90, 0], [90, -9]]),
      f('QN-X3', 'Lanternfield Road', '1x14mm', 'road crossing', [[200, 3.43], [200, -6]]),
    ],
  });
}

function prng(seed: number) {
  const u = mulberry32(seed);
  return () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
}

function walk(): string {
  const n = prng(2026);
  const pts: string[] = [];
  let t = Date.UTC(2026, 10, 3, 7, 30, 0);
  const step = (e: number, north: number) => {
    const [lon, lat] = at(e + 3 * n(), north + 3 * n());
    pts.push(`<trkpt lat="${lat.toFixed(7)}" lon="${lon.toFixed(7)}"><ele>${(48 + n() * 0.5).toFixed(1)}</ele><time>${new Date(t).toISOString()}</time><hdop>1.${Math.floor(Math.abs(n()) * 9)}</hdop></trkpt>`);
    t += 1000;
  };
  // Lanternfield Road east, around the tree pit at 60–85 m (6 m north), then Cobbler Walk north and Wickham Rise east
  for (let e = 0; e <= 140; e += 1.3) step(e, e >= 60 && e <= 85 ? 6 : 0);
  for (let north = 0; north <= 130; north += 1.3) step(140, north);
  for (let e = 140; e <= 250; e += 1.3) step(e, 130 + ((e - 140) * 6) / 110);
  return `<?xml version="1.0" encoding="UTF-8"?>\n<gpx version="1.1" creator="Trenchbook demo" xmlns="http://www.topografix.com/GPX/1/1"><trk><name>Crew 2, morning walk</name><trkseg>${pts.join('')}</trkseg></trk></gpx>\n`;
}

function rtk(): string {
  const n = prng(77);
  const rows = ['Pt,Lat,Lon,Height,Code,Fix,HRMS'];
  for (let north = 0; north <= 130; north += 2) {
    const [lon, lat] = at(140 + (north >= 50 && north <= 80 ? -0.8 : 0) + 0.015 * n(), north + 0.015 * n());
    rows.push(`CW${north},${lat.toFixed(9)},${lon.toFixed(9)},${(48.2 + north * 0.002).toFixed(3)},TR,fixed,0.012`);
  }
  return rows.join('\n') + '\n';
}

/** RTK points of the spur: from 3 m beyond the end of Wickham Rise, 45 m on to the north-east. */
function spur(): string {
  const n = prng(91);
  const rows = ['Pt,Lat,Lon,Height,Code,Fix,HRMS'];
  for (let s = 3; s <= 48; s += 3) {
    const [lon, lat] = at(250 + s * 0.5 + 0.015 * n(), 136 + s * 0.866 + 0.015 * n());
    rows.push(`FC${s},${lat.toFixed(9)},${lon.toFixed(9)},${(48.6 + s * 0.003).toFixed(3)},TR,fixed,0.014`);
  }
  return rows.join('\n') + '\n';
}

async function form(dir: string, name: string, text: string, fields: Record<string, string>) {
  const tmpPath = path.join(dir, name);
  await writeFile(tmpPath, text);
  const bytes = Buffer.from(text);
  return { files: [{ field: 'file', fileName: name, tmpPath, size: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') }], fields, cleanup: async () => {} };
}

export async function seed(knex: Knex): Promise<void> {
  const row = await knex('projects').whereRaw('lower(name) = lower(?)', [DEMO_PROJECT]).first('id');
  if (!row) return;
  if (await knex('reconcile_runs').where({ project_id: row.id }).first('id')) return;
  const userId = async (role: string) => (await knex('users').where({ email: DEMO_USERS.find((u) => u.role === role)!.email }).first('id')).id;
  const engineer = (await loadPrincipal(knex, await userId('engineer')))!;
  const surveyor = (await loadPrincipal(knex, await userId('surveyor')))!;
  const dir = await mkdtemp(path.join(os.tmpdir(), 'trenchbook-seed-'));
  try {
    let project = (await getProject(knex, row.id))!;
    if (!(await knex('plan_versions').where({ project_id: row.id }).first('id'))) {
      await importPlan(knex, engineer, project, await form(dir, 'quillhaven-north-design.geojson', design(), { mapping: JSON.stringify({ ref: 'route_id', street: 'street', ducts: 'bundle', kind: 'type' }) }));
      project = (await getProject(knex, row.id))!;
    }
    await receiveUpload(knex, surveyor, project, await form(dir, 'crew2-morning-walk.gpx', walk(), { accuracy: 'handheld_gnss', surveyDate: '2026-11-03', crew: 'Crew 2', content: 'trench' }));
    await receiveUpload(knex, surveyor, project, await form(dir, 'cobbler-walk-rtk.csv', rtk(), { accuracy: 'rtk_gnss', surveyDate: '2026-11-04', crew: 'Survey team', content: 'trench' }));
    await receiveUpload(knex, surveyor, project, await form(dir, 'ferrier-close-spur-rtk.csv', spur(), { accuracy: 'rtk_gnss', surveyDate: '2026-11-05', crew: 'Survey team', content: 'trench' }));
    await runReconciliation(knex, row.id, null, { userId: engineer.id, label: `demo seed for ${engineer.name}`, organisationId: engineer.organisationId }, async () => {});
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
