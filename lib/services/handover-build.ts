import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, mkdtemp, readdir, rm, stat } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { once } from 'node:events';
import { promisify } from 'node:util';
import { ZipArchive } from 'archiver';
import ExcelJS from 'exceljs';
import type { Knex } from 'knex';
import yauzl from 'yauzl';
import type { Project } from '@/db/projects';
import { changeReport, type ChangeReport, type SectionSnap, type Snapshot } from '@/lib/handover/change-report';
import { writeGeoJsonLayer, fmtCoord } from '@/lib/handover/geojson';
import { writeKmlLayer } from '@/lib/handover/kml';
import { LAYERS, type LayerDef, type LayerFeature, type Props } from '@/lib/handover/layers';
import { originalsStore } from '@/lib/storage/originals-store';
import { accuracyStatement } from '@/lib/handover/accuracy';
import type { AccuracyClass } from '@/lib/records/accuracy-classes';

// Builds a handover package (issue 16) into a temporary folder and then one ZIP: GeoJSON and KML written
// here, shapefiles and the GeoPackage by GDAL's ogr2ogr from the GeoJSON (argument lists, never a shell),
// the workbook by exceljs's streaming writer, the originals unchanged, manifest.json and README.txt. Every
// time inside is the package's stated time, so the same revision from the same data gives the same bytes.

const run = promisify(execFile);
export const GENERATOR_VERSION = 'trenchbook-handover 1';

export interface HandoverScope {
  routes?: string[];
  bbox?: [number, number, number, number];
  /** also write the shapefiles and GeoPackage in the project's coordinate system */
  projectCrs?: boolean;
}

export interface BuildInput {
  project: Project;
  revision: number;
  createdAt: Date;
  createdByName: string;
  scope: HandoverScope;
  note: string;
  previous: { revision: number; snapshot: Snapshot } | null;
}

export interface BuildOutput {
  zipPath: string;
  tmpDir: string;
  sizeBytes: number;
  sha256: string;
  manifest: Record<string, unknown>;
  changeReport: ChangeReport;
  snapshot: Snapshot;
  /** milliseconds per step (for the benchmark) */
  timings: Record<string, number>;
}

export class NothingToPackage extends Error {}

type Progress = (fraction: number, message: string) => Promise<void>;

interface SectionRow {
  id: string; route: string | null; street: string | null; route_id: string | null; from_chainage_m: number; to_chainage_m: number; length_m: number;
  status: string; max_offset_m: number | null; p95_offset_m: number | null; accuracy_m: number | null; laid_on: string | null; review: string;
  geometry: { coordinates: number[][] }; source_upload_ids: string[];
}

const isoDay = (d: Date | string | null) => (d === null ? null : typeof d === 'string' ? d.slice(0, 10) : d.toISOString().slice(0, 10));

/** The packaged sections: current and approved, within the chosen routes or area. */
export async function scopedSections(db: Knex, projectId: string, scope: HandoverScope): Promise<SectionRow[]> {
  const q = db('sections as s')
    .leftJoin('planned_routes as r', function () {
      this.on('r.project_id', 's.project_id').andOn('r.ref', 's.planned_route_ref').andOnNull('r.removed_in_version');
    })
    .where('s.project_id', projectId).whereNull('s.retired_in_run').where('s.review', 'approved')
    .select('s.id', 's.planned_route_ref as route', 'r.street', 'r.id as route_id', 's.from_chainage_m', 's.to_chainage_m', 's.length_m', 's.status', 's.max_offset_m', 's.p95_offset_m',
      's.accuracy_m', db.raw("to_char(s.laid_on, 'YYYY-MM-DD') as laid_on"), 's.review', 's.source_upload_ids', db.raw('ST_AsGeoJSON(s.geom, 7)::json as geometry'))
    .orderBy([{ column: 's.planned_route_ref', order: 'asc' }, { column: 's.from_chainage_m', order: 'asc' }, { column: 's.id', order: 'asc' }]);
  if (scope.routes?.length) q.whereIn('s.planned_route_ref', scope.routes);
  if (scope.bbox) q.whereRaw('ST_Intersects(s.geom, ST_MakeEnvelope(?, ?, ?, ?, 4326))', scope.bbox);
  return q;
}

const pointRows = (db: Knex, table: string, projectId: string, routeIds: string[], scope: HandoverScope) => {
  const q = db(`${table} as t`).join('planned_routes as r', 'r.id', 't.route_id').where('t.project_id', projectId).whereIn('t.route_id', routeIds)
    .select('t.*', 'r.ref as route', db.raw('ST_AsGeoJSON(t.geom, 7)::json as geometry')).orderBy([{ column: 'r.ref' }, { column: 't.chainage_m' }, { column: 't.id' }]);
  if (scope.bbox) q.whereRaw('ST_Intersects(t.geom, ST_MakeEnvelope(?, ?, ?, ?, 4326))', scope.bbox);
  return q;
};

export interface Loaded {
  sections: SectionRow[];
  layers: Map<string, LayerFeature[]>;
  ducts: { section_id: string; size: string; colour: string; metres: number }[];
  depths: Record<string, unknown>[];
  crossings: Record<string, unknown>[];
  pits: Record<string, unknown>[];
  utilities: Record<string, unknown>[];
  restorations: Record<string, unknown>[];
  addresses: Record<string, unknown>[];
  originals: { zipName: string; storageKey: string }[];
  /** each source upload's accuracy class, for the accuracy statement by source */
  uploadClasses: Map<string, AccuracyClass>;
}

export async function load(db: Knex, project: Project, scope: HandoverScope): Promise<Loaded> {
  const sections = await scopedSections(db, project.id, scope);
  if (sections.length === 0) throw new NothingToPackage('Nothing to package: no current, approved section lies in the chosen scope. Approve sections in the review first, or widen the routes or area.');
  const routeIds = [...new Set(sections.map((s) => s.route_id).filter((x): x is string => !!x))];
  const refs = [...new Set(sections.map((s) => s.route).filter((x): x is string => !!x))];
  const routes = await db('planned_routes').where({ project_id: project.id }).whereNull('removed_in_version').whereIn('ref', refs)
    .select('id', 'ref', 'kind', 'street', db.raw('ST_AsGeoJSON(geom, 7)::json as geometry')).orderBy('ref');
  const crossings = await db('road_crossings as c').join('planned_routes as r', 'r.id', 'c.route_id').where('c.project_id', project.id).whereIn('c.route_id', routeIds)
    .select('c.*', 'r.ref as route', 'r.street', db.raw('ST_AsGeoJSON(r.geom, 7)::json as geometry')).orderBy(['r.ref', 'c.id']);
  const pits = await pointRows(db, 'test_pits', project.id, routeIds, scope);
  const utilities = await pointRows(db, 'utility_crossings', project.id, routeIds, scope);
  const depths = await pointRows(db, 'depth_readings', project.id, routeIds, scope);
  const photos = await pointRows(db, 'photos', project.id, routeIds, scope);
  const addrQ = db('addresses as a').leftJoin('planned_routes as r', 'r.id', 'a.serving_route_id').where('a.project_id', project.id).whereNull('a.removed_in_import')
    .select('a.key', 'a.street', 'a.number', 'a.units', 'a.passed', 'a.passed_approved', 'a.connected', 'a.connected_on', 'r.ref as route', db.raw('ST_AsGeoJSON(a.geom, 7)::json as geometry')).orderBy('a.key');
  if (scope.routes?.length) addrQ.whereIn('a.serving_route_id', routeIds);
  if (scope.bbox) addrQ.whereRaw('ST_Intersects(a.geom, ST_MakeEnvelope(?, ?, ?, ?, 4326))', scope.bbox);
  const addresses = await addrQ;
  const restorations = await db('restorations as t').join('planned_routes as r', 'r.id', 't.route_id').where('t.project_id', project.id).whereIn('t.route_id', routeIds)
    .select('t.*', 'r.ref as route').orderBy(['r.ref', 't.from_chainage_m', 't.id']);
  // installed duct metres by size and colour, per section (bundle stretch overlapping the section's stretch)
  const ductRows = await db.raw(
    `select s.id as section_id, d.outer_mm || '/' || coalesce(d.inner_mm::text, 'unknown') || ' mm' as size, coalesce(d.colour_name, 'uncoloured') as colour,
            sum(greatest(0, least(b.to_chainage_m, s.to_chainage_m) - greatest(b.from_chainage_m, s.from_chainage_m)))::float8 as metres
       from sections s join planned_routes r on r.project_id = s.project_id and r.ref = s.planned_route_ref and r.removed_in_version is null
       join duct_bundles b on b.route_id = r.id and b.kind = 'installed' join duct_bundle_ducts d on d.bundle_id = b.id
      where s.id = any(?) and b.to_chainage_m > s.from_chainage_m and b.from_chainage_m < s.to_chainage_m
      group by 1, 2, 3 order by 1, 2, 3`, [sections.map((s) => s.id)]);
  const upIds = [...new Set(sections.flatMap((s) => s.source_upload_ids ?? []))].sort();
  const uploadClasses = new Map<string, AccuracyClass>(upIds.length ? (await db('uploads').whereIn('id', upIds).select('id', 'accuracy_class')).map((u: { id: string; accuracy_class: AccuracyClass }) => [u.id, u.accuracy_class]) : []);
  const upFiles = upIds.length ? await db('upload_files').whereIn('upload_id', upIds).orderBy(['upload_id', 'id']).select('upload_id', 'file_name', 'storage_key') : [];
  const originals = [
    ...upFiles.map((f: { upload_id: string; file_name: string; storage_key: string }) => ({ zipName: `originals/uploads/${f.upload_id}/${f.file_name.replace(/[\\/]/g, '_')}`, storageKey: f.storage_key })),
    ...photos.map((p: { id: string; file_name: string; storage_key: string }) => ({ zipName: `originals/photos/${p.id}-${p.file_name.replace(/[\\/]/g, '_')}`, storageKey: p.storage_key })),
  ];
  const pt = (g: { coordinates: number[] }) => g.coordinates;
  const layers = new Map<string, LayerFeature[]>();
  layers.set('as_built_sections', sections.map((s) => ({ coordinates: s.geometry.coordinates, props: {
    section_id: s.id, route: s.route, street: s.street, from_chainage_m: s.from_chainage_m, to_chainage_m: s.to_chainage_m, length_m: s.length_m, status: s.status,
    max_offset_m: s.max_offset_m, p95_offset_m: s.p95_offset_m, accuracy_m: s.accuracy_m, laid_on: s.laid_on, review: s.review } })));
  layers.set('planned_routes', routes.map((r: { ref: string; kind: string; street: string | null; geometry: { coordinates: number[][] } }) => ({ coordinates: r.geometry.coordinates, props: { route: r.ref, kind: r.kind, street: r.street } })));
  layers.set('road_crossings', crossings.map((c: Record<string, never>) => ({ coordinates: (c.geometry as { coordinates: number[][] }).coordinates, props: {
    crossing_id: c.id, route: c.route, built: c.built, built_on: isoDay(c.built_on), length_m: c.length_m, duct_count: c.duct_count, addresses: c.address_ref } as Props })));
  layers.set('test_pits', pits.map((p: Record<string, never>) => ({ coordinates: pt(p.geometry), props: {
    pit_id: p.id, route: p.route, chainage_m: p.chainage_m, name: p.name, dug_on: isoDay(p.dug_on), method: p.method, depth_m: p.depth_m, findings: p.findings } as Props })));
  layers.set('utility_crossings', utilities.map((p: Record<string, never>) => ({ coordinates: pt(p.geometry), props: {
    utility_crossing_id: p.id, route: p.route, chainage_m: p.chainage_m, owner: p.owner, depth_m: p.depth_m, clearance_m: p.clearance_m, method: p.method, found_on: isoDay(p.found_on) } as Props })));
  layers.set('depth_readings', depths.map((p: Record<string, never>) => ({ coordinates: pt(p.geometry), props: {
    reading_id: p.id, route: p.route, chainage_m: p.chainage_m, cover_m: p.cover_m, trench_depth_m: p.trench_depth_m, source: p.source } as Props })));
  layers.set('photo_points', photos.map((p: Record<string, never>) => ({ coordinates: pt(p.geometry), props: {
    photo_id: p.id, route: p.route, chainage_m: p.chainage_m, file_name: `${p.id}-${String(p.file_name).replace(/[\\/]/g, '_')}`, caption: p.caption, placed_by: p.placed_by } as Props })));
  layers.set('addresses', addresses.map((a: Record<string, never>) => ({ coordinates: pt(a.geometry), props: {
    address_key: a.key, street: a.street, number: a.number, units: a.units, passed: a.passed, passed_approved: a.passed_approved, connected: a.connected } as Props })));
  return { sections, layers, ducts: ductRows.rows, depths, crossings, pits, utilities, restorations, addresses, originals, uploadClasses };
}

// ---- snapshot ----
const geomDigest = (c: number[][]) => createHash('sha256').update(c.map((p) => `${fmtCoord(p[0])},${fmtCoord(p[1])}`).join(' ')).digest('hex').slice(0, 16);

export function snapshotOf(l: Loaded): Snapshot {
  const ducts = new Map<string, Record<string, number>>();
  for (const d of l.ducts) {
    const m = ducts.get(d.section_id) ?? {};
    m[d.size] = Math.round(((m[d.size] ?? 0) + d.metres) * 1000) / 1000;
    ducts.set(d.section_id, m);
  }
  const sections: SectionSnap[] = l.sections.map((s) => {
    const ds = l.depths.filter((d) => d.route === s.route && (d.chainage_m as number) >= s.from_chainage_m && (d.chainage_m as number) <= s.to_chainage_m);
    const covers = ds.map((d) => d.cover_m as number | null).filter((x): x is number => x !== null);
    return {
      id: s.id, route: s.route, from: Math.round(s.from_chainage_m * 1000) / 1000, to: Math.round(s.to_chainage_m * 1000) / 1000, status: s.status,
      geom: geomDigest(s.geometry.coordinates), ducts: Object.fromEntries(Object.entries(ducts.get(s.id) ?? {}).sort()),
      depth: { count: ds.length, minCoverM: covers.length ? Math.min(...covers) : null },
    };
  });
  return { sections, passed: l.addresses.filter((a) => a.passed).map((a) => String(a.key)).sort() };
}

// ---- files ----
async function writeText(file: string, fn: (write: (s: string) => Promise<void>) => Promise<unknown>) {
  const out = createWriteStream(file);
  const write = async (s: string) => { if (!out.write(s)) await once(out, 'drain'); };
  await fn(write);
  out.end();
  await once(out, 'finish');
}

const stamp = (d: Date) => d.toISOString().replace(/\.\d+Z$/, '');

async function ogr(args: string[], when: Date) {
  await run('ogr2ogr', ['--config', 'OGR_CURRENT_DATE', `${stamp(when)}Z`, ...args], { maxBuffer: 16 * 1024 * 1024 });
}

/** A .xlsx is itself a zip: rewritten with every entry at the stated time, in the writer's order. */
async function fixZipTimes(src: string, dest: string, when: Date) {
  const zipfile = await new Promise<yauzl.ZipFile>((res, rej) => yauzl.open(src, { lazyEntries: true }, (e, z) => (e ? rej(e) : res(z!))));
  const zip = new ZipArchive({ zlib: { level: 6 } });
  const out = createWriteStream(dest);
  zip.pipe(out);
  await new Promise<void>((res, rej) => {
    zipfile.on('entry', (entry: yauzl.Entry) => {
      zipfile.openReadStream(entry, (e, s) => {
        if (e) return rej(e);
        const chunks: Buffer[] = [];
        s!.on('data', (c: Buffer) => chunks.push(c));
        s!.on('end', () => { zip.append(Buffer.concat(chunks), { name: entry.fileName, date: when, mode: 0o644 }); zipfile.readEntry(); });
        s!.on('error', rej);
      });
    });
    zipfile.on('end', () => res());
    zipfile.on('error', rej);
    zipfile.readEntry();
  });
  await zip.finalize();
  await once(out, 'finish').catch(() => undefined);
  if (!out.writableFinished) await once(out, 'close');
}

const num = (x: unknown) => (x === null || x === undefined ? null : Math.round(Number(x) * 1000) / 1000);

async function writeWorkbook(file: string, l: Loaded, inp: BuildInput) {
  const tmp = `${file}.raw`;
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: tmp, useStyles: true, useSharedStrings: false });
  wb.creator = GENERATOR_VERSION; wb.lastModifiedBy = GENERATOR_VERSION; wb.created = inp.createdAt; wb.modified = inp.createdAt;
  const sheet = (name: string, cols: { header: string; key: string; width?: number; fmt?: string }[]) => {
    const ws = wb.addWorksheet(name, { views: [{ state: 'frozen', ySplit: 1 }] });
    ws.columns = cols.map((c) => ({ header: c.header, key: c.key, width: c.width ?? 16, style: c.fmt ? { numFmt: c.fmt } : {} }));
    ws.autoFilter = { from: { row: 1, column: 1 }, to: { row: 1, column: cols.length } };
    ws.getRow(1).font = { bold: true };
    return ws;
  };
  const M = '0.000', D = 'yyyy-mm-dd';
  const trenchM = l.sections.filter((s) => s.status !== 'not_built').reduce((a, s) => a + s.length_m, 0);
  const summary = sheet('Summary', [{ header: 'Item', key: 'k', width: 40 }, { header: 'Value', key: 'v', width: 40 }]);
  for (const [k, v] of [['Project', inp.project.name], ['Revision', inp.revision], ['Created at (UTC)', inp.createdAt], ['Created by', inp.createdByName], ['Sections', l.sections.length],
    ['Trench length (m)', num(trenchM)], ['Addresses passed', l.addresses.filter((a) => a.passed).length], ['Caution', 'Records must be verified on site before digging; defer to local codes and licensed practice.']] as [string, unknown][]) summary.addRow({ k, v }).commit();
  summary.commit();
  const secs = sheet('Sections', [{ header: 'Section id', key: 'id', width: 38 }, { header: 'Route', key: 'route' }, { header: 'Street', key: 'street', width: 24 }, { header: 'From chainage (m)', key: 'from', fmt: M },
    { header: 'To chainage (m)', key: 'to', fmt: M }, { header: 'Length (m)', key: 'len', fmt: M }, { header: 'Status', key: 'status' }, { header: 'Max offset (m)', key: 'max', fmt: M },
    { header: 'P95 offset (m)', key: 'p95', fmt: M }, { header: 'Position 95 % radius (m)', key: 'acc', fmt: M }, { header: 'Laid on', key: 'laid', fmt: D }, { header: 'Approval', key: 'review' }]);
  for (const s of l.sections) secs.addRow({ id: s.id, route: s.route, street: s.street, from: num(s.from_chainage_m), to: num(s.to_chainage_m), len: num(s.length_m), status: s.status,
    max: num(s.max_offset_m), p95: num(s.p95_offset_m), acc: num(s.accuracy_m), laid: s.laid_on ? new Date(`${s.laid_on}T00:00:00Z`) : null, review: s.review }).commit();
  secs.commit();
  const ducts = sheet('Ducts', [{ header: 'Section id', key: 'id', width: 38 }, { header: 'Duct size (outer/inner)', key: 'size' }, { header: 'Colour', key: 'colour' }, { header: 'Duct length (m)', key: 'm', fmt: M }]);
  const bySize = new Map<string, number>();
  for (const d of l.ducts) { ducts.addRow({ id: d.section_id, size: d.size, colour: d.colour, m: num(d.metres) }).commit(); bySize.set(d.size, (bySize.get(d.size) ?? 0) + d.metres); }
  for (const [size, m] of [...bySize].sort()) ducts.addRow({ id: 'TOTAL', size, colour: 'all', m: num(m) }).commit();
  ducts.commit();
  const dep = sheet('Depths', [{ header: 'Route', key: 'route' }, { header: 'Chainage (m)', key: 'ch', fmt: M }, { header: 'Cover (m)', key: 'cover', fmt: M }, { header: 'Trench depth (m)', key: 'td', fmt: M }, { header: 'Measured at', key: 'at', fmt: 'yyyy-mm-dd hh:mm' }, { header: 'Source', key: 'src' }]);
  for (const d of l.depths) dep.addRow({ route: d.route, ch: num(d.chainage_m), cover: num(d.cover_m), td: num(d.trench_depth_m), at: d.measured_at ?? null, src: d.source }).commit();
  dep.commit();
  const rc = sheet('Road crossings', [{ header: 'Route', key: 'route' }, { header: 'Built', key: 'built' }, { header: 'Built on', key: 'on', fmt: D }, { header: 'Length (m)', key: 'len', fmt: M }, { header: 'Ducts', key: 'n' }, { header: 'Addresses served', key: 'a', width: 30 }]);
  for (const c of l.crossings) rc.addRow({ route: c.route, built: c.built ? 'yes' : 'no', on: c.built_on ?? null, len: num(c.length_m), n: c.duct_count, a: c.address_ref }).commit();
  rc.commit();
  const tp = sheet('Test pits and utilities', [{ header: 'Kind', key: 'kind' }, { header: 'Route', key: 'route' }, { header: 'Chainage (m)', key: 'ch', fmt: M }, { header: 'Name or owner', key: 'name', width: 24 },
    { header: 'Depth (m)', key: 'depth', fmt: M }, { header: 'Clearance (m)', key: 'clear', fmt: M }, { header: 'Method', key: 'method' }, { header: 'Date', key: 'on', fmt: D }, { header: 'Findings or note', key: 'note', width: 30 }]);
  for (const p of l.pits) tp.addRow({ kind: 'test pit', route: p.route, ch: num(p.chainage_m), name: p.name, depth: num(p.depth_m), clear: null, method: p.method, on: p.dug_on ? new Date(`${isoDay(p.dug_on as string)}T00:00:00Z`) : null, note: p.findings }).commit();
  for (const u of l.utilities) tp.addRow({ kind: 'utility crossing', route: u.route, ch: num(u.chainage_m), name: u.owner, depth: num(u.depth_m), clear: num(u.clearance_m), method: u.method, on: u.found_on ? new Date(`${isoDay(u.found_on as string)}T00:00:00Z`) : null, note: u.note }).commit();
  tp.commit();
  const rs = sheet('Restoration', [{ header: 'Route', key: 'route' }, { header: 'From chainage (m)', key: 'from', fmt: M }, { header: 'To chainage (m)', key: 'to', fmt: M }, { header: 'Restored at', key: 'at', fmt: 'yyyy-mm-dd hh:mm' },
    { header: 'Required thickness (mm)', key: 'req' }, { header: 'Laid thickness (mm)', key: 'laid' }, { header: 'Compaction passes', key: 'passes' }, { header: 'Crew', key: 'crew' }]);
  for (const r of l.restorations) rs.addRow({ route: r.route, from: num(r.from_chainage_m), to: num(r.to_chainage_m), at: r.restored_at, req: r.required_thickness_mm, laid: r.laid_thickness_mm, passes: r.compaction_passes, crew: r.crew }).commit();
  rs.commit();
  const hh = sheet('Households passed', [{ header: 'Address key', key: 'key' }, { header: 'Street', key: 'street', width: 24 }, { header: 'Number', key: 'number' }, { header: 'Households (units)', key: 'units' },
    { header: 'Serving route', key: 'route' }, { header: 'Passed', key: 'passed' }, { header: 'Passed by approved sections', key: 'pa' }, { header: 'Connected', key: 'c' }, { header: 'Connected on', key: 'on', fmt: D }]);
  for (const a of l.addresses) hh.addRow({ key: a.key, street: a.street, number: a.number, units: a.units, route: a.route, passed: a.passed ? 'yes' : 'no', pa: a.passed_approved ? 'yes' : 'no', c: a.connected ? 'yes' : 'no', on: a.connected_on ? new Date(`${isoDay(a.connected_on as string)}T00:00:00Z`) : null }).commit();
  hh.commit();
  const dv = sheet('Deviations', [{ header: 'Section id', key: 'id', width: 38 }, { header: 'Route', key: 'route' }, { header: 'From chainage (m)', key: 'from', fmt: M }, { header: 'To chainage (m)', key: 'to', fmt: M }, { header: 'Status', key: 'status' }, { header: 'Max offset (m)', key: 'max', fmt: M }]);
  for (const s of l.sections.filter((x) => x.status !== 'as_planned')) dv.addRow({ id: s.id, route: s.route, from: num(s.from_chainage_m), to: num(s.to_chainage_m), status: s.status, max: num(s.max_offset_m) }).commit();
  dv.commit();
  const w = inp.project.records.trenchWidthMm / 1000, dpt = inp.project.records.trenchDepthMm / 1000;
  const q = sheet('Quantities', [{ header: 'Quantity', key: 'k', width: 44 }, { header: 'Value', key: 'v', fmt: '0.000' }, { header: 'Unit', key: 'u' }]);
  q.addRow({ k: 'Trench length', v: num(trenchM), u: 'm' }).commit();
  q.addRow({ k: 'Road crossings built', v: l.crossings.filter((c) => c.built).length, u: 'count' }).commit();
  for (const [size, m] of [...bySize].sort()) q.addRow({ k: `Duct ${size}`, v: num(m), u: 'm' }).commit();
  q.addRow({ k: `Spoil volume (trench ${w * 1000} mm × ${dpt * 1000} mm × length)`, v: num(trenchM * w * dpt), u: 'm³' }).commit();
  q.addRow({ k: `Backfill volume (trench ${w * 1000} mm × ${dpt * 1000} mm × length)`, v: num(trenchM * w * dpt), u: 'm³' }).commit();
  q.commit();
  await wb.commit();
  await fixZipTimes(tmp, file, inp.createdAt);
  await rm(tmp, { force: true });
}

async function sha256File(file: string): Promise<{ sha256: string; bytes: number }> {
  const h = createHash('sha256');
  let bytes = 0;
  for await (const c of createReadStream(file)) { h.update(c as Buffer); bytes += (c as Buffer).length; }
  return { sha256: h.digest('hex'), bytes };
}

const castOf = (name: string, type: string) =>
  type === 'real' ? `CAST("${name}" AS float)` : type === 'integer' ? `CAST("${name}" AS integer)` : type === 'date' ? `CAST("${name}" AS date)` : type === 'boolean' ? `"${name}"` : `CAST("${name}" AS character(254))`;
const PRJ_EPSG = (crs: string) => crs.replace(/^EPSG:/i, '');
const xml = (t: string) => t.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

export function readmeText(inp: BuildInput, counts: Record<string, number>, crsNote: string, accuracy?: ReturnType<typeof accuracyStatement>): string {
  const lines = [
    `Trenchbook handover package: ${inp.project.name}, revision ${inp.revision}, created ${stamp(inp.createdAt)}Z by ${inp.createdByName}.`,
    '',
    'CAUTION: these are records, not a locate. Records must be verified on site before digging (detection, hand-dug trial holes). Defer to local codes and licensed practice.',
    '',
    crsNote,
    'Units: metres unless a field says otherwise; dates as YYYY-MM-DD.',
    ...(accuracy ? [
      '',
      `Positional accuracy (95 % horizontal radius of each section; manifest.json has the figures): ${accuracy.bands.filter((b) => b.metres > 0).map((b) => `${b.radius95}: ${b.metres} m`).join('; ')}.`,
      `By source: ${accuracy.bySource.map((g) => `${g.source} ${g.metres} m${g.radius95 ? ` (${g.radius95.min}–${g.radius95.max} m)` : ''}`).join('; ')}. Where the radius is large, locate on site before relying on the line.`,
    ] : []),
    '',
    'Folders: geojson/ (RFC 7946, one FeatureCollection per layer), kml/ (KML 2.2), shp/ (shapefiles with .prj), gpkg/ (one GeoPackage, every layer), workbook/ (schedules), originals/ (uploads and photos, unchanged). manifest.json lists every file with its size and SHA-256.',
    '',
    'Layers and fields (field name = shapefile short name, type, unit: description):',
  ];
  for (const l of LAYERS) {
    lines.push('', `${l.name} (${l.title}, ${l.geometry}, ${counts[l.name] ?? 0} features)`);
    for (const fl of l.fields) lines.push(`  ${fl.name} = ${fl.short}, ${fl.type}${fl.unit ? `, ${fl.unit}` : ''}: ${fl.description}`);
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** Builds the package into a temporary folder; the caller stores the ZIP and removes the folder. */
export async function buildPackage(db: Knex, inp: BuildInput, progress: Progress): Promise<BuildOutput> {
  const t0 = performance.now();
  const l = await load(db, inp.project, inp.scope);
  const loadMs = performance.now() - t0;
  const tmpDir = await mkdtemp(path.join(os.tmpdir(), 'tb-handover-'));
  try {
    const dir = path.join(tmpDir, 'pkg');
    for (const d of ['geojson', 'kml', 'shp', 'gpkg', 'workbook']) await mkdir(path.join(dir, d), { recursive: true });
    const counts: Record<string, number> = {};
    let i = 0;
    const timings = { load: loadMs, geojson: 0, kml: 0, shp: 0, gpkg: 0, workbook: 0, zip: 0 };
    for (const def of LAYERS) {
      const feats = l.layers.get(def.name) ?? [];
      let t0 = performance.now();
      await writeText(path.join(dir, 'geojson', `${def.name}.geojson`), async (w) => { counts[def.name] = (await writeGeoJsonLayer(def, feats, w)).count; });
      timings.geojson += performance.now() - t0;
      t0 = performance.now();
      await writeText(path.join(dir, 'kml', `${def.name}.kml`), (w) => writeKmlLayer(def, feats, w));
      timings.kml += performance.now() - t0;
      await progress(0.05 + (0.3 * ++i) / LAYERS.length, `Layer ${def.title} written (${feats.length})`);
    }
    const crsTargets: { suffix: string; srs: string }[] = [{ suffix: '', srs: 'EPSG:4326' }];
    if (inp.scope.projectCrs && inp.project.defaultCrs && inp.project.defaultCrs !== 'EPSG:4326') crsTargets.push({ suffix: `_${PRJ_EPSG(inp.project.defaultCrs)}`, srs: inp.project.defaultCrs });
    const day = isoDay(inp.createdAt)!;
    // GDAL takes the field types from the values it sees: an empty layer reads a seed feature of the right
    // types that the WHERE drops, and every field is cast to its type
    const sources = new Map<string, { src: string; empty: boolean }>();
    for (const def of LAYERS) {
      const empty = counts[def.name] === 0;
      let src = path.join(dir, 'geojson', `${def.name}.geojson`);
      if (empty) {
        src = path.join(tmpDir, `${def.name}.seed.geojson`);
        const seed = Object.fromEntries(def.fields.map((fl) => [fl.name, fl.type === 'real' ? 0.5 : fl.type === 'integer' ? 1 : fl.type === 'boolean' ? true : fl.type === 'date' ? '2000-01-01' : 'x']));
        const geometry = def.geometry === 'Point' ? { type: 'Point', coordinates: [0, 0] } : { type: 'LineString', coordinates: [[0, 0], [1, 1]] };
        await writeText(src, async (w) => w(JSON.stringify({ type: 'FeatureCollection', name: def.name, features: [{ type: 'Feature', geometry, properties: seed }] })));
      }
      sources.set(def.name, { src, empty });
    }
    // every layer through one OGR VRT, so that each format is one ogr2ogr process, not one per layer
    const vrt = async (file: string, short: boolean, suffix: string) => {
      await writeText(file, async (w) => {
        await w('<OGRVRTDataSource>\n');
        for (const def of LAYERS) {
          const { src, empty } = sources.get(def.name)!;
          const select = `SELECT ${def.fields.map((fl) => `${castOf(fl.name, fl.type)} AS "${short ? fl.short : fl.name}"`).join(', ')} FROM "${def.name}"${empty ? ' WHERE 1 = 0' : ''}`;
          await w(`  <OGRVRTLayer name="${xml(def.name + suffix)}">\n    <SrcDataSource>${xml(src)}</SrcDataSource>\n    <SrcSQL dialect="OGRSQL">${xml(select)}</SrcSQL>\n` +
            `    <GeometryType>wkb${def.geometry}</GeometryType>\n    <LayerSRS>EPSG:4326</LayerSRS>\n  </OGRVRTLayer>\n`);
        }
        await w('</OGRVRTDataSource>\n');
      });
      return file;
    };
    for (const t of crsTargets) {
      let t0 = performance.now();
      await ogr(['-f', 'ESRI Shapefile', '-t_srs', t.srs, '-lco', `DBF_DATE_LAST_UPDATE=${day}`, '-lco', 'ENCODING=UTF-8', path.join(dir, 'shp'), await vrt(path.join(tmpDir, `shp${t.suffix}.vrt`), true, t.suffix)], inp.createdAt);
      timings.shp += performance.now() - t0;
      t0 = performance.now();
      await ogr(['-f', 'GPKG', '-t_srs', t.srs, path.join(dir, 'gpkg', `handover${t.suffix}.gpkg`), await vrt(path.join(tmpDir, `gpkg${t.suffix}.vrt`), false, '')], inp.createdAt);
      timings.gpkg += performance.now() - t0;
      await progress(0.35 + 0.25 / crsTargets.length, 'Shapefiles and GeoPackage written');
    }
    let tw = performance.now();
    await writeWorkbook(path.join(dir, 'workbook', 'schedules.xlsx'), l, inp);
    timings.workbook = performance.now() - tw;
    tw = performance.now();
    await progress(0.7, 'Workbook written');

    const snapshot = snapshotOf(l);
    const report = changeReport(inp.previous, snapshot);
    // files in a fixed order: generated ones by folder and name, then the originals
    const generated: string[] = [];
    for (const d of ['geojson', 'kml', 'shp', 'gpkg', 'workbook']) for (const f of (await readdir(path.join(dir, d))).sort()) generated.push(`${d}/${f}`);
    const files: { path: string; bytes: number; sha256: string }[] = [];
    for (const g of generated) files.push({ path: g, ...(await sha256File(path.join(dir, g))) });
    const origSeen = new Set<string>();
    const originals = l.originals.filter((o) => !origSeen.has(o.zipName) && origSeen.add(o.zipName));
    for (const o of originals) {
      const h = createHash('sha256');
      let bytes = 0;
      for await (const c of originalsStore().get(o.storageKey)) { h.update(c as Buffer); bytes += (c as Buffer).length; }
      files.push({ path: o.zipName, bytes, sha256: h.digest('hex') });
    }
    // positional accuracy: metres known to within each 95 % radius, overall and by source class
    const accuracy = accuracyStatement(l.sections.map((sec) => ({
      lengthM: sec.length_m, radius95M: sec.accuracy_m,
      classes: (sec.source_upload_ids ?? []).map((u) => l.uploadClasses.get(u)).filter((c): c is AccuracyClass => c !== undefined),
    })));
    const crsNote = `Coordinates: GeoJSON and KML in WGS 84 longitude/latitude (EPSG:4326, as RFC 7946 and KML 2.2 require); shapefiles and GeoPackage in EPSG:4326${crsTargets.length > 1 ? ` and, with the suffix _${PRJ_EPSG(inp.project.defaultCrs)}, in the project's ${inp.project.defaultCrs}` : ''}. Chainages and lengths are geodesic metres along the ground.`;
    const readme = readmeText(inp, counts, crsNote, accuracy);
    files.push({ path: 'README.txt', bytes: Buffer.byteLength(readme), sha256: createHash('sha256').update(readme).digest('hex') });
    const manifest = {
      project: { id: inp.project.id, name: inp.project.name, area: inp.project.areaName },
      revision: inp.revision,
      createdAt: inp.createdAt.toISOString(),
      createdBy: inp.createdByName,
      generatorVersion: GENERATOR_VERSION,
      note: inp.note,
      scope: inp.scope,
      recordCounts: Object.fromEntries(LAYERS.map((d) => [d.name, counts[d.name] ?? 0])),
      positionalAccuracy: accuracy,
      coordinateSystem: crsNote,
      caution: 'Records must be verified on site before digging; defer to local codes and licensed practice.',
      files,
    };
    const manifestText = `${JSON.stringify(manifest, null, 2)}\n`;
    await progress(0.8, 'Packing the ZIP');
    const zipPath = path.join(tmpDir, 'package.zip');
    const zip = new ZipArchive({ zlib: { level: 6 } });
    const out = createWriteStream(zipPath);
    zip.pipe(out);
    const opts = (name: string) => ({ name, date: inp.createdAt, mode: 0o644 });
    zip.append(manifestText, opts('manifest.json'));
    zip.append(readme, opts('README.txt'));
    for (const g of generated) zip.append(createReadStream(path.join(dir, g)), opts(g));
    for (const o of originals) zip.append(originalsStore().get(o.storageKey), opts(o.zipName));
    await zip.finalize();
    if (!out.writableFinished) await once(out, 'finish');
    timings.zip = performance.now() - tw;
    const z = await sha256File(zipPath);
    await progress(0.95, 'Package written');
    return { zipPath, tmpDir, sizeBytes: (await stat(zipPath)).size, sha256: z.sha256, manifest: manifest as unknown as Record<string, unknown>, changeReport: report, snapshot, timings };
  } catch (err) {
    await rm(tmpDir, { recursive: true, force: true });
    throw err;
  }
}
