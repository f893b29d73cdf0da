// npm run bench:ingest — the upload pipeline on a generated 100,000-point GPX, against a naive baseline and
// GDAL's ogr2ogr loading the same file into PostGIS, all measured in this run on this machine.
// Each contender runs in its own child process so peak RSS belongs to it alone.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const root = path.resolve(__dirname, '..');
const POINTS = Number(process.env.BENCH_POINTS ?? 100_000);
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const NAIVE_POINTS = Number(process.env.BENCH_NAIVE_POINTS ?? 20_000);
const DB = 'trenchbook_bench';
const sh = (...a: string[]) => execFileSync('bash', [path.join(root, 'scripts/db.sh'), ...a], { encoding: 'utf8' }).trim();

function makeGpx(n: number, variant: number): string {
  const parts: string[] = [];
  parts.push(`<?xml version="1.0" encoding="UTF-8"?>\n<gpx version="1.1" creator="bench ${variant}" xmlns="http://www.topografix.com/GPX/1/1">\n<trk><name>bench walk</name><trkseg>\n`);
  for (let i = 0; i < n; i++) {
    const t = new Date(Date.UTC(2026, 10, 3, 6, 0, 0) + i * 1000).toISOString();
    parts.push(`<trkpt lat="${(52.1 + (i % 5000) * 1e-5).toFixed(7)}" lon="${(9.1 + Math.floor(i / 5000) * 1e-4 + (i % 7) * 1e-6).toFixed(7)}"><ele>${(50 + (i % 100) * 0.01).toFixed(2)}</ele><time>${t}</time><hdop>1.${i % 10}</hdop></trkpt>\n`);
  }
  parts.push('</trkseg></trk></gpx>\n');
  return parts.join('');
}

async function child(mode: string, file: string): Promise<void> {
  const { getDb, closeDb } = await import('../db/client');
  const db = getDb();
  // modules load and the caller is authenticated before the clock starts, as in a running server
  const { receiveUpload } = await import('../lib/services/uploads');
  const { getProject } = await import('../db/projects');
  const { loadPrincipal } = await import('../lib/auth/principal');
  const { DOMParser } = await import('@xmldom/xmldom');
  const { gpx } = await import('@tmcw/togeojson');
  let started = process.hrtime.bigint();
  let points = 0;
  if (mode === 'ours') {
    const ids = JSON.parse(process.env.BENCH_IDS!);
    const actor = (await loadPrincipal(db, ids.userId))!;
    const project = (await getProject(db, ids.projectId))!;
    started = process.hrtime.bigint();
    // what receiveMultipart does while the body streams in: hash the bytes as they land in the temp file
    const bytes = readFileSync(file);
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const form = { files: [{ field: 'file', fileName: path.basename(file), tmpPath: file, size: bytes.length, sha256 }], fields: { accuracy: 'handheld_gnss' }, cleanup: async () => {} };
    const { upload } = await receiveUpload(db, actor, project, form);
    points = upload.pointCount;
  } else if (mode === 'naive') {
    // the obvious way: DOM-parse the whole file, then one INSERT per point
    const doc = new DOMParser().parseFromString(readFileSync(file, 'utf8'), 'text/xml') as unknown as Document;
    const fc = gpx(doc);
    await db.raw('create table if not exists bench_naive_points (id bigserial primary key, geom geometry(PointZ, 4326), t timestamptz)');
    await db.transaction(async (trx) => {
      for (const f of fc.features) {
        if (f.geometry?.type !== 'LineString') continue;
        const times = (f.properties?.coordinateProperties?.times ?? []) as string[];
        for (const [i, c] of f.geometry.coordinates.entries()) {
          await trx.raw('insert into bench_naive_points (geom, t) values (ST_SetSRID(ST_MakePoint(?, ?, ?), 4326), ?)', [c[0], c[1], c[2] ?? 0, times[i] ?? null]);
          points++;
        }
      }
    });
  }
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  await closeDb();
  process.stdout.write(JSON.stringify({ seconds, points, maxRssMb: process.resourceUsage().maxRSS / 1024 }) + '\n');
}

function runChild(mode: string, file: string, env: Record<string, string>) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', __filename, '--child', mode, file], { cwd: root, env: { ...process.env, ...env }, encoding: 'utf8', maxBuffer: 1 << 24 });
  if (r.status !== 0) throw new Error(`${mode} failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').at(-1)!) as { seconds: number; points: number; maxRssMb: number };
}

function ogr2ogr(file: string, url: string) {
  const u = new URL(url);
  const pg = `PG:host=${u.hostname} port=${u.port} user=${u.username} password=${u.password} dbname=${u.pathname.slice(1)}`;
  const started = process.hrtime.bigint();
  const r = spawnSync('ogr2ogr', ['-f', 'PostgreSQL', pg, file, 'track_points', '-nln', `ogr_${Date.now()}`, '-gt', '65536', '-lco', 'SPATIAL_INDEX=NONE'], { encoding: 'utf8', env: { ...process.env, PG_USE_COPY: 'YES' } });
  if (r.status !== 0) throw new Error(`ogr2ogr failed: ${r.stderr}`);
  return { seconds: Number(process.hrtime.bigint() - started) / 1e9, points: POINTS };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function main() {
  sh('start');
  sh('recreatedb', DB);
  const url = sh('url', DB);
  execFileSync('npm', ['run', '--silent', 'db:migrate'], { cwd: root, env: { ...process.env, DATABASE_URL: url }, stdio: 'ignore' });
  process.env.DATABASE_URL = url;
  const storage = path.join(os.tmpdir(), 'trenchbook-bench-storage');
  const env = { DATABASE_URL: url, STORAGE_DIR: storage, NEXTAUTH_SECRET: 'bench-secret-not-for-production' };

  const { getDb, closeDb } = await import('../db/client');
  const { addUser } = await import('../lib/services/operators');
  const { loadPrincipal } = await import('../lib/auth/principal');
  const { createProject, createProjectSchema } = await import('../lib/services/projects');
  const db = getDb();
  const { userId } = await addUser(db, { email: 'bench@bench.example', name: 'Bench', role: 'surveyor', org: 'Bench Contractor', orgKind: 'contractor', token: false });
  // the partner is picked from registered organisations, so the bench registers its own
  await addUser(db, { email: 'bench-owner@bench.example', name: 'Bench Owner', role: 'owner', org: 'Bench Owner', orgKind: 'owner', token: false });
  const project = await createProject(db, (await loadPrincipal(db, userId))!, createProjectSchema.parse({ name: 'Bench', partnerOrganisation: 'Bench Owner' }));
  await closeDb();

  const dir = path.join(os.tmpdir(), 'trenchbook-bench');
  mkdirSync(dir, { recursive: true });
  const files = Array.from({ length: RUNS }, (_, i) => {
    const f = path.join(dir, `walk-${i}.gpx`);
    writeFileSync(f, makeGpx(POINTS, i));
    return f;
  });
  const naiveFile = path.join(dir, 'walk-naive.gpx');
  writeFileSync(naiveFile, makeGpx(NAIVE_POINTS, 99));
  const mb = (readFileSync(files[0]).length / 1024 / 1024).toFixed(1);

  const ours = files.map((f) => runChild('ours', f, { ...env, BENCH_IDS: JSON.stringify({ userId, projectId: project.id }) }));
  const ogr = files.map((f) => ogr2ogr(f, url));
  const naive = [runChild('naive', naiveFile, env)];

  const oursS = median(ours.map((r) => r.seconds));
  const ogrS = median(ogr.map((r) => r.seconds));
  const naivePps = naive[0].points / naive[0].seconds;
  const oursPps = POINTS / oursS;
  const ogrPps = POINTS / ogrS;
  console.log(`bench:ingest — ${POINTS.toLocaleString('en')}-point GPX (${mb} MB), median of ${RUNS} runs, ${os.cpus().length} cores`);
  console.log(`  Trenchbook upload pipeline (hash, store original, parse, bulk insert, one transaction):`);
  console.log(`    ${oursS.toFixed(3)} s   ${Math.round(oursPps).toLocaleString('en')} points/s   peak RSS ${Math.max(...ours.map((r) => r.maxRssMb)).toFixed(0)} MB   (runs: ${ours.map((r) => r.seconds.toFixed(3)).join(', ')} s)`);
  console.log(`  GDAL ogr2ogr -f PostgreSQL (same file, parse + COPY): ${ogrS.toFixed(3)} s   ${Math.round(ogrPps).toLocaleString('en')} points/s`);
  console.log(`  naive baseline (DOM parse + one INSERT per point), on a ${NAIVE_POINTS.toLocaleString('en')}-point file: ${naive[0].seconds.toFixed(2)} s   ${Math.round(naivePps).toLocaleString('en')} points/s   peak RSS ${naive[0].maxRssMb.toFixed(0)} MB`);
  console.log(`  ratios: ${(oursPps / ogrPps).toFixed(2)}x ogr2ogr, ${(oursPps / naivePps).toFixed(1)}x naive`);
  sh('recreatedb', DB);
}

if (process.argv[2] === '--child') void child(process.argv[3], process.argv[4]);
else void main();
