import { createHash } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import geodesic from 'geographiclib-geodesic';
import type { Knex } from 'knex';
import { stringify } from 'csv-stringify/sync';
import { getProject } from '../projects';
import { loadPrincipal } from '../../lib/auth/principal';
import { mulberry32 } from '../../lib/records/seeded-random';
import { importAddresses } from '../../lib/services/address-import';
import { connectAddress, recomputeHouseholds } from '../../lib/services/households';
import { DEMO_PROJECT, DEMO_USERS } from './01_demo';

// The demo's address register in Quillhaven North: a few hundred invented addresses along the four demo
// streets, odd numbers on the trench's side and even ones across, some flats (2–24 households), a few
// corner plots and infill houses with a letter (12a), invented postcodes. Imported through the real address
// import as a CSV, a handful of drops recorded as installed by the surveyor, then households worked out
// twice: once as of 19 November (before the drops) and once today, so the progress chart has two days.
// Generated with a seeded generator: the same register every time. Fictional, idempotent.
const G = geodesic.Geodesic.WGS84;
// the demo design's origin and local east/north metres (db/seeds/02_demo_field_work.ts)
const O: [number, number] = [9.104, 52.106];
const at = (east: number, north: number): [number, number] => {
  const a = G.Direct(O[1], O[0], 90, east);
  const b = G.Direct(a.lat2!, a.lon2!, 0, north);
  return [b.lon2!, b.lat2!];
};

interface Street {
  code: string;
  name: string;
  postcode: string;
  /** the street's line in local metres, the same as its demo route */
  line: [number, number][];
  /** the side of the trench (odd numbers): +1 left of the line's direction, -1 right */
  trenchSide: 1 | -1;
  from: number;
  to: number;
}

// crossings QN-X1..X3 run south from Lanternfield Road, so its south side is across; the other streets'
// trench side is the one the design's junctions make natural (inside the block)
const STREETS: Street[] = [
  { code: 'LR', name: 'Lanternfield Road', postcode: 'QH7 2LF', line: [[0, 0], [140, 0], [280, 8]], trenchSide: 1, from: 6, to: 272 },
  { code: 'CW', name: 'Cobbler Walk', postcode: 'QH7 2CW', line: [[140, 0], [140, 130]], trenchSide: 1, from: 16, to: 122 },
  { code: 'SR', name: 'Saltmarsh Row', postcode: 'QH7 3SR', line: [[280, 8], [285, -110]], trenchSide: 1, from: 16, to: 112 },
  { code: 'WR', name: 'Wickham Rise', postcode: 'QH7 2WR', line: [[140, 130], [250, 136]], trenchSide: -1, from: 12, to: 104 },
];

/** A point `s` metres along a polyline and `off` metres to its left (negative: right). */
function along(line: [number, number][], s: number, off: number): [number, number] {
  let rest = s;
  for (let i = 1; i < line.length; i++) {
    const [x0, y0] = line[i - 1];
    const [x1, y1] = line[i];
    const len = Math.hypot(x1 - x0, y1 - y0);
    if (rest <= len || i === line.length - 1) {
      const ux = (x1 - x0) / len;
      const uy = (y1 - y0) / len;
      return [x0 + ux * rest - uy * off, y0 + uy * rest + ux * off];
    }
    rest -= len;
  }
  return line[0];
}

export interface DemoAddress {
  key: string;
  street: string;
  number: string;
  postcode: string;
  units: number;
  buildingType: string;
  lon: number;
  lat: number;
}

/** The demo register, the same every time (seeded): about 220 addresses. */
export function demoAddresses(): DemoAddress[] {
  const u = mulberry32(1504);
  const out: DemoAddress[] = [];
  for (const st of STREETS) {
    for (const side of [1, -1] as const) {
      // odd numbers on the trench's side, even across; terraced houses ~5 m apart, flats wider
      let n = side === 1 ? 1 : 2;
      let s = st.from + u() * 2;
      while (s <= st.to) {
        const flats = u() < 0.1;
        const units = flats ? 2 + Math.floor(u() * 23) : 1;
        // houses set back 8–12 m from the trench's side; across, the width of the road (9 m) further
        const back = 8 + u() * 4 + (side === st.trenchSide ? 0 : 9);
        const [e, nn] = along(st.line, s, side * st.trenchSide * back);
        const [lon, lat] = at(e, nn);
        out.push({ key: `QH-${st.code}-${n}`, street: st.name, number: String(n), postcode: st.postcode, units, buildingType: flats ? 'flats' : 'house', lon, lat });
        // now and then an infill house with a letter, in the garden of the one before
        if (!flats && u() < 0.05) {
          const [e2, n2] = along(st.line, s + 2.5, side * st.trenchSide * (back + 6));
          const [lon2, lat2] = at(e2, n2);
          out.push({ key: `QH-${st.code}-${n}a`, street: st.name, number: `${n}a`, postcode: st.postcode, units: 1, buildingType: 'house', lon: lon2, lat: lat2 });
        }
        n += 2;
        s += flats ? 14 + u() * 4 : 4.2 + u() * 1.2;
      }
    }
  }
  // corner plots: addressed to one street, standing nearer to the other one
  const corner = (key: string, street: string, number: string, postcode: string, e: number, n: number) => {
    const [lon, lat] = at(e, n);
    out.push({ key, street, number, postcode, units: 1, buildingType: 'house', lon, lat });
  };
  corner('QH-CW-1c', 'Cobbler Walk', '1c', 'QH7 2CW', 148, 9);
  corner('QH-LR-121c', 'Lanternfield Road', '121c', 'QH7 2LF', 131, 12);
  corner('QH-WR-2c', 'Wickham Rise', '2c', 'QH7 2WR', 152, 122);
  corner('QH-SR-1c', 'Saltmarsh Row', '1c', 'QH7 3SR', 292, 0);
  return out;
}

/** The register as the CSV a town's address office might send: its own column names, a mapping given. */
export function demoAddressCsv(addresses: DemoAddress[]): string {
  return stringify([
    ['address_id', 'street', 'house_no', 'postcode', 'town', 'households', 'building', 'lon', 'lat'],
    ...addresses.map((a) => [a.key, a.street, a.number, a.postcode, 'Quillhaven', a.units, a.buildingType, a.lon.toFixed(8), a.lat.toFixed(8)]),
  ]);
}

export const DEMO_ADDRESS_MAPPING = { key: 'address_id', street: 'street', number: 'house_no', postcode: 'postcode', locality: 'town', units: 'households', buildingType: 'building', lon: 'lon', lat: 'lat' };

export async function seed(knex: Knex): Promise<void> {
  const row = await knex('projects').whereRaw('lower(name) = lower(?)', [DEMO_PROJECT]).first('id');
  if (!row) return;
  if (!(await knex('reconcile_runs').where({ project_id: row.id }).first('id'))) return;
  if (await knex('addresses').where({ project_id: row.id }).first('id')) return;
  const userId = async (role: string) => (await knex('users').where({ email: DEMO_USERS.find((x) => x.role === role)!.email }).first('id')).id;
  const engineer = (await loadPrincipal(knex, await userId('engineer')))!;
  const surveyor = (await loadPrincipal(knex, await userId('surveyor')))!;
  const project = (await getProject(knex, row.id))!;
  const dir = await mkdtemp(path.join(os.tmpdir(), 'trenchbook-seed-addresses-'));
  try {
    const text = demoAddressCsv(demoAddresses());
    const tmpPath = path.join(dir, 'quillhaven-north-addresses.csv');
    await writeFile(tmpPath, text);
    const bytes = Buffer.from(text);
    await importAddresses(knex, engineer, project, {
      files: [{ field: 'file', fileName: 'quillhaven-north-addresses.csv', tmpPath, size: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') }],
      fields: { mapping: JSON.stringify(DEMO_ADDRESS_MAPPING) },
      cleanup: async () => {},
    });
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
  const quiet = async () => {};
  await recomputeHouseholds(knex, row.id, quiet, new Date('2026-11-19T12:00:00Z'));
  // drops installed at a handful of passed houses on Cobbler Walk and Lanternfield Road
  const passed = await knex('addresses').where({ project_id: row.id, passed: true }).whereIn('street', ['Cobbler Walk', 'Lanternfield Road']).orderBy('key').select('id');
  const picks = passed.filter((_: unknown, i: number) => i % 9 === 0).slice(0, 7);
  for (const [i, a] of picks.entries()) {
    await connectAddress(knex, surveyor, project, a.id, { connected: true, connectedOn: `2026-11-${String(20 + i).padStart(2, '0')}` });
  }
  await recomputeHouseholds(knex, row.id, quiet);
}
