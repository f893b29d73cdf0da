// npm run bench:handover — the handover package build (issue 16) on a generated project of about 30 km:
// 2,000 approved sections of 15 m on 2,000 routes, 5,000 addresses, 50 MB of originals (10 uploads of 5 MB),
// in a database of its own (trenchbook_bench_handover). Measures the whole build in a process of its own
// (seconds, peak RSS) with the time of each format, and side by side in the same run GDAL's ogr2ogr writing
// the same layers (sections, routes, addresses) from the same database as GeoJSON, KML, SHP and GPKG.
// Run it under the build lock: flock /tmp/tb-build.lock npm run bench:handover
import { execFileSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

const root = path.resolve(__dirname, '..');
const DB = 'trenchbook_bench_handover';
const url = execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'url', DB], { encoding: 'utf8' }).trim();
const storage = path.join(root, '.data/bench-handover-storage');
process.env.NEXTAUTH_SECRET ??= 'bench-secret-not-for-production';
const env = { ...process.env, DATABASE_URL: url, STORAGE_DIR: storage, EXPORTS_DIR: path.join(root, '.data/bench-handover-exports') };

async function generate(): Promise<string> {
  process.env.DATABASE_URL = url;
  process.env.STORAGE_DIR = storage;
  const { getDb, closeDb } = await import('../db/client');
  const { makePrincipal, registerPartner } = await import('../tests/helpers/fixtures');
  const { createProject, createProjectSchema } = await import('../lib/services/projects');
  const { originalsStore } = await import('../lib/storage/originals-store');
  const { createHash } = await import('node:crypto');
  const db = getDb();
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const partner = await registerPartner(db, admin, `Bench owner ${Date.now()}`);
  const project = await createProject(db, admin, createProjectSchema.parse({ name: `Bench handover ${Date.now()}`, partnerOrganisation: partner }));
  // 2,000 routes of 15 m in a 40 × 50 grid (30 km), each with one approved as-built section along it
  await db.raw(
    `insert into planned_routes (project_id, ref, street, kind, geom, length_m, first_version, geometry_version)
     select ?, 'R-' || i, 'Bench Street ' || (i / 40), 'street', ST_SetSRID(ST_MakeLine(ST_MakePoint(9.9 + (i % 40) * 0.0003, 52.9 + (i / 40) * 0.0003), ST_MakePoint(9.9 + (i % 40) * 0.0003 + 0.00022, 52.9 + (i / 40) * 0.0003)), 4326), 15, 1, 1
       from generate_series(0, 1999) i`, [project.id]);
  const uploads: string[] = [];
  for (let k = 0; k < 10; k++) {
    const bytes = randomBytes(5 * 1024 * 1024);
    const sha = createHash('sha256').update(bytes).digest('hex');
    const [u] = await db('uploads').insert({ id: (await import('node:crypto')).randomUUID(), project_id: project.id, sha256: sha, size_bytes: bytes.length, file_name: `walk-${k}.gpx`, status: 'stored', accuracy_class: 'rtk', sigma_m: 0.02, content: 'trench' }).returning('id');
    const key = `uploads/${project.id}/${u.id}/0-walk-${k}.gpx`;
    await originalsStore().put(key, bytes);
    await db('upload_files').insert({ upload_id: u.id, file_name: `walk-${k}.gpx`, storage_key: key, sha256: sha, size_bytes: bytes.length });
    uploads.push(u.id);
  }
  await db.raw(
    `insert into sections (project_id, planned_route_ref, status, from_chainage_m, to_chainage_m, geom, length_m, max_offset_m, p95_offset_m, accuracy_m, source_upload_ids, laid_on, first_run, last_run, review)
     select r.project_id, r.ref, 'as_planned', 0, 15, ST_Translate(r.geom, 0, 0.000002), 15, 0.2, 0.15, 0.05, array[(?::uuid[])[1 + (row_number() over () % 10)]], '2026-11-03', 1, 1, 'approved'
       from planned_routes r where r.project_id = ?`, [uploads, project.id]);
  await db.raw(
    `insert into addresses (project_id, key, street, number, units, geom, passed, passed_approved)
     select ?, 'A-' || i, 'Bench Street ' || (i / 100), (i % 100)::text, 1, ST_SetSRID(ST_MakePoint(9.9 + (i % 100) * 0.00012, 52.9 + (i / 100) * 0.00029 + 0.00008), 4326), i % 3 <> 0, i % 3 <> 0
       from generate_series(0, 4999) i`, [project.id]);
  await closeDb();
  return project.id;
}

/** In a process of its own: one whole build, its seconds, peak RSS and per-format times. */
async function buildOnce(projectId: string) {
  const { getDb, closeDb } = await import('../db/client');
  const { getProject } = await import('../db/projects');
  const { buildPackage } = await import('../lib/services/handover-build');
  const db = getDb();
  const project = (await getProject(db, projectId))!;
  const t0 = performance.now();
  const out = await buildPackage(db, { project, revision: 1, createdAt: new Date('2026-12-06T12:00:00Z'), createdByName: 'bench', scope: {}, note: '', previous: null }, async () => undefined);
  const seconds = (performance.now() - t0) / 1000;
  rmSync(out.tmpDir, { recursive: true, force: true });
  await closeDb();
  console.log(JSON.stringify({ seconds, peakRssMb: process.resourceUsage().maxRSS / 1024, sizeMb: out.sizeBytes / 1048576, timings: out.timings }));
}

function ogrSideBySide(projectId: string) {
  const dir = mkdtempSync(path.join(tmpdir(), 'tb-bench-ogr-'));
  const u = new URL(url);
  const pg = `PG:host=${u.hostname} port=${u.port} dbname=${u.pathname.slice(1)} user=${u.username} password=${decodeURIComponent(u.password)}`;
  const layers = [
    ['as_built_sections', `select id::text as section_id, planned_route_ref as route, from_chainage_m, to_chainage_m, length_m, status, max_offset_m, p95_offset_m, accuracy_m, laid_on, review, geom from sections where project_id = '${projectId}' and review = 'approved' and retired_in_run is null order by planned_route_ref`],
    ['planned_routes', `select ref as route, kind, street, geom from planned_routes where project_id = '${projectId}' order by ref`],
    ['addresses', `select key as address_key, street, number, units, passed, passed_approved, connected, geom from addresses where project_id = '${projectId}' order by key`],
  ];
  const out: Record<string, number> = {};
  for (const [fmt, ext] of [['GeoJSON', 'geojson'], ['KML', 'kml'], ['ESRI Shapefile', 'shp'], ['GPKG', 'gpkg']]) {
    const t0 = performance.now();
    for (const [name, sql] of layers) {
      const target = ext === 'gpkg' ? path.join(dir, 'all.gpkg') : path.join(dir, `${name}.${ext}`);
      execFileSync('ogr2ogr', ['-f', fmt, ...(ext === 'gpkg' ? ['-append'] : []), '-nln', name, target, pg, '-sql', sql]);
    }
    out[ext] = (performance.now() - t0) / 1000;
  }
  rmSync(dir, { recursive: true, force: true });
  return out;
}

async function main() {
  if (process.argv[2] === '--build') return buildOnce(process.argv[3]);
  execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'recreatedb', DB], { stdio: 'inherit' });
  rmSync(storage, { recursive: true, force: true });
  execFileSync('npm', ['run', '--silent', 'db:migrate'], { cwd: root, env, stdio: ['ignore', 'ignore', 'inherit'] });
  const projectId = await generate();
  console.log('generated: 2,000 sections (30 km), 2,000 routes, 5,000 addresses, 50 MB of originals');
  const runs = [1, 2, 3].map(() => JSON.parse(execFileSync('node', ['--import', 'tsx', __filename, '--build', projectId], { cwd: root, env, encoding: 'utf8' }).trim().split('\n').at(-1)!));
  const ogr = ogrSideBySide(projectId);
  for (const [i, r] of runs.entries()) console.log(`build ${i + 1}: ${r.seconds.toFixed(2)} s, peak RSS ${r.peakRssMb.toFixed(0)} MB, ZIP ${r.sizeMb.toFixed(1)} MB; ms: ${Object.entries(r.timings as Record<string, number>).map(([k, v]) => `${k} ${v.toFixed(0)}`).join(', ')}`);
  const best = runs.sort((a, b) => a.seconds - b.seconds)[0];
  console.log('format   ours (all 8 layers)   ogr2ogr (3 layers from PostgreSQL)');
  for (const k of ['geojson', 'kml', 'shp', 'gpkg']) console.log(`${k.padEnd(8)} ${(best.timings[k] / 1000).toFixed(2).padStart(8)} s ${ogr[k].toFixed(2).padStart(18)} s`);
  console.log(`targets: whole build < 10 s (${best.seconds.toFixed(2)} s), peak RSS < 300 MB (${Math.max(...runs.map((r) => r.peakRssMb)).toFixed(0)} MB)`);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
