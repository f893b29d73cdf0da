import { createHash, randomUUID } from 'node:crypto';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import type { Knex } from 'knex';
import { listDuctSizes } from '../../catalogues';
import type { ReceivedForm } from '../../../lib/api/multipart';
import { roadCrossingSchema } from '../../../lib/records/road-crossing-schema';
import { receivePhoto } from '../../../lib/services/photos';
import { createRoadCrossing } from '../../../lib/services/road-crossings';
import type { DemoCtx } from './context';

// The demo's road crossings and photos on Lanternfield Road: QN-X1 and QN-X2 sawn and laid on 2 November,
// QN-X2 after the lengthways cut (the crew came back for it), QN-X3 not built yet (no record); each lists
// the keys of the houses across that it serves (db/seeds/04_demo_addresses.ts); three
// photos along QN-101, placed by hand or by chainage (they carry no GPS), one of them showing QN-X1.
// The pictures are drawn here: asphalt, the sawn slot and the coloured microducts. Fictional.

/** A picture of a slot with `ducts` microducts in it, on asphalt of a given shade. */
async function slotPicture(shade: number, ducts: string[], crossing = false): Promise<Buffer> {
  const w = 960;
  const h = 720;
  const slot = crossing ? `<rect x="440" y="0" width="80" height="${h}" fill="#2b2b2b"/>` : `<rect x="0" y="330" width="${w}" height="60" fill="#2b2b2b"/>`;
  const rings = ducts
    .map((c, i) => (crossing ? `<circle cx="480" cy="${200 + i * 70}" r="26" fill="${c}" stroke="#111" stroke-width="4"/>` : `<circle cx="${180 + i * 58}" cy="360" r="22" fill="${c}" stroke="#111" stroke-width="4"/>`))
    .join('');
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="${w}" height="${h}" fill="rgb(${shade},${shade},${shade + 4})"/>${slot}${rings}<rect x="24" y="24" width="120" height="16" fill="#f2d21b"/></svg>`;
  return sharp(Buffer.from(svg)).jpeg({ quality: 82 }).toBuffer();
}

/** A received form as the photo route hands it over, from bytes in memory. */
async function formFor(name: string, bytes: Buffer, fields: Record<string, string>): Promise<ReceivedForm> {
  const dir = path.join(os.tmpdir(), 'trenchbook-demo-photo', randomUUID());
  await mkdir(dir, { recursive: true });
  const tmpPath = path.join(dir, '0');
  await writeFile(tmpPath, bytes);
  return { files: [{ field: 'file', fileName: name, tmpPath, size: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') }], fields, cleanup: () => rm(dir, { recursive: true, force: true }) };
}

export async function seedCrossingsPhotos(knex: Knex, ctx: DemoCtx): Promise<void> {
  const { project, surveyor } = ctx;
  const route = (ref: string) => {
    const id = ctx.routes.get(ref);
    if (!id) throw new Error(`demo route ${ref} is missing`);
    return id;
  };
  if (await knex('road_crossings').where({ project_id: project.id }).first('id')) return;
  const size14 = (await listDuctSizes(knex, project.id)).find((s) => s.outerMm === 14 && s.innerMm === 10)?.id ?? null;

  const x1 = await createRoadCrossing(knex, surveyor, project, roadCrossingSchema.parse({
    routeId: route('QN-X1'), built: true, builtOn: '2026-11-02', lengthM: 9.3, sawnBeforeMain: true, ductCount: 1, ductSizeId: size14, addressRef: 'QH-LR-14; QH-LR-16',
  }));
  await createRoadCrossing(knex, surveyor, project, roadCrossingSchema.parse({
    routeId: route('QN-X2'), built: true, builtOn: '2026-11-02', lengthM: 9.6, sawnBeforeMain: false, ductCount: 1, ductSizeId: size14, addressRef: 'QH-LR-28',
    note: 'Sawn after the lengthways cut: parked van over the crossing in the morning.',
  }));

  const lanternfield = await knex('planned_routes').where({ id: route('QN-101') }).first(knex.raw('ST_AsGeoJSON(geom, 9)::json as g'));
  const [[x0, y0], [x1e, y1e]] = (lanternfield.g as { coordinates: [number, number][] }).coordinates;
  // a point a fraction of the way along the first leg (0–140 m, due east), nudged north by `north` degrees
  const along = (f: number, north: number) => [x0 + (x1e - x0) * f, y0 + (y1e - y0) * f + north] as const;
  const TIA = ['#1f5fbf', '#f08a00', '#1e8c3a', '#7a4a1e', '#708090', '#f4f4f4', '#d22b2b', '#1a1a1a', '#f2d21b', '#7d3cb5', '#3fc6d4', '#f19cbb'];
  const photos: { name: string; bytes: Buffer; fields: Record<string, string> }[] = [
    { name: 'QN-101_slot_35m.jpg', bytes: await slotPicture(96, []), fields: { caption: 'Slot sawn, Lanternfield Road, before the ducts', lon: String(along(35 / 140, 0.000005)[0]), lat: String(along(35 / 140, 0.000005)[1]), routeId: route('QN-101') } },
    { name: 'QN-101_bundle_120m.jpg', bytes: await slotPicture(104, TIA.slice(0, 12)), fields: { caption: 'Twelve microducts laid, warning tape next', routeId: route('QN-101'), chainageM: '120' } },
    { name: 'QN-X1_crossing.jpg', bytes: await slotPicture(90, [TIA[0]], true), fields: { caption: 'Crossing to no. 14 sawn, one 14 mm duct', lon: String(along(40 / 140, 0.000003)[0]), lat: String(along(40 / 140, 0.000003)[1]), routeId: route('QN-101'), crossingId: x1.id } },
  ];
  for (const p of photos) {
    const form = await formFor(p.name, p.bytes, p.fields);
    try {
      await receivePhoto(knex, surveyor, project, form);
    } finally {
      await form.cleanup();
    }
  }
}
