// npm run bench:lookup — the duct lookup (issue 17) through the HTTP API, on a generated town in a database of
// its own (trenchbook_bench_lookup): 1,000,000 addresses on 2,500 streets and 50,000 as-built sections of 40 m
// on 50,000 planned routes (1 installed bundle of 4 ducts and 2 cover readings each), over five projects:
// four of the owner whose maintenance user asks, one of another owner sharing the same streets (never shown).
//
// Measures, with the production build (`next build` first) served by scripts/server.ts as `npm start` serves it:
//   - address search (GET /api/lookup/addresses?q=…) with typed mistakes: p50/p95/p99, one client;
//   - nearby lookup (GET /api/lookup/nearby?lon=&lat=) at random spots: p50/p95/p99, one client and 16 clients;
//   - in the same run, a bare node:http + pg server running the same nearby statement (NEARBY_SECTIONS_SQL)
//     with the same pool size: the ceiling the API's throughput is compared with.
// Targets (issue 17, this 2-core machine): nearby p95 < 10 ms with one client; at 16 clients at least 25 % of the
// bare server's throughput; address search p95 < 30 ms with one client.
// Run it under the build lock: flock /tmp/tb-build.lock npm run bench:lookup
//   --keep keeps the generated town (about a gigabyte); --reuse measures again on the kept one without generating
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';

const root = path.resolve(__dirname, '..');
const DB = 'trenchbook_bench_lookup';
const url = execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'url', DB], { encoding: 'utf8' }).trim();
const API_PORT = 3215;
const BARE_PORT = 3216;
const POOL = 10; // the app's pool size (db/client.ts), given to the bare server too
process.env.NEXTAUTH_SECRET ??= 'bench-secret-not-for-production';
const env = { ...process.env, DATABASE_URL: url, STORAGE_DIR: path.join(root, '.data/bench-lookup-storage'), EXPORTS_DIR: path.join(root, '.data/bench-lookup-exports') };

// the town: rows of streets 80 m apart running east, each row 200 routes of 40 m; 10 streets of 800 m a row
const ROWS = 250;
const ROUTES_PER_ROW = 200;
const LON0 = 9.9;
const LAT0 = 52.8;
const M_LON = 1 / 67_300; // degrees of longitude per metre near 52.8° N (rough: positions only need to be plausible)
const M_LAT = 1 / 111_250;
const FIRST = ['Alder', 'Birch', 'Cedar', 'Dove', 'Elm', 'Fern', 'Glen', 'Hazel', 'Ivy', 'Juniper', 'Kestrel', 'Larch', 'Maple', 'Nettle', 'Oak', 'Poplar', 'Quince', 'Rowan', 'Sorrel', 'Thorn',
  'Umber', 'Vale', 'Willow', 'Yew', 'Ash', 'Bramble', 'Clover', 'Daisy', 'Ember', 'Flint', 'Gorse', 'Heath', 'Iris', 'Jasper', 'Kiln', 'Linden', 'Marsh', 'Nutmeg', 'Orchard', 'Pebble',
  'Quarry', 'Reed', 'Sedge', 'Tansy', 'Upton', 'Violet', 'Wren', 'Yarrow', 'Zinnia', 'Acorn'];
const SECOND = ['brook', 'field', 'wood', 'ford', 'hill', 'mead', 'croft', 'gate', 'well', 'stone'];
const KIND = ['Street', 'Lane', 'Road', 'Way', 'Close'];
const streetName = (k: number) => `${FIRST[k % 50]}${SECOND[Math.floor(k / 50) % 10]} ${KIND[Math.floor(k / 500) % 5]}`;

/** A small seeded generator (mulberry32): the same spots and queries every run. */
function rng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = seed;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

async function generate(): Promise<{ token: string; visibleProjectIds: string[] }> {
  process.env.DATABASE_URL = url;
  const { getDb, closeDb } = await import('../db/client');
  const { makePrincipal, registerPartner } = await import('../tests/helpers/fixtures');
  const { createProject, createProjectSchema } = await import('../lib/services/projects');
  const { createToken } = await import('../lib/services/tokens');
  const { normaliseStreet } = await import('../lib/households/normalise');
  const db = getDb();
  const admin = await makePrincipal(db, 'admin', 'contractor', 'Bench Trenching Ltd');
  const ownerA = await registerPartner(db, admin, 'Benchford Fibre Net');
  const ownerB = await registerPartner(db, admin, 'Other Fibre Co');
  const projects: string[] = [];
  for (let p = 0; p < 5; p++) {
    const project = await createProject(db, admin, createProjectSchema.parse({ name: `Benchford phase ${p + 1}`, partnerOrganisation: p < 4 ? ownerA : ownerB }));
    projects.push(project.id);
  }
  const uploads: string[][] = [];
  for (const projectId of projects) {
    const pair: string[] = [];
    for (const [cls, sigma] of [['rtk_gnss', 0.02], ['handheld_gnss', 4]] as const) {
      const [u] = await db('uploads').insert({ id: randomUUID(), project_id: projectId, sha256: cls.padEnd(64, '0'), size_bytes: 1, file_name: `${cls}.gpx`, status: 'stored', accuracy_class: cls, sigma_m: sigma, content: 'trench' }).returning('id');
      pair.push(u.id);
    }
    uploads.push(pair);
  }
  // rows 0–49 belong to project 1, 50–99 to project 2, …; project 5 (the other owner's) takes rows 200–249
  const projectOfRow = (r: number) => projects[Math.floor(r / 50)];
  // street names on the routes: 10 streets a row
  const names = Array.from({ length: ROWS * 10 }, (_, k) => streetName(k));
  await db.raw(`create table bench_streets (k int, r int, c0 int, project_id uuid, name text, name_norm text, postcode text)`);
  for (let i = 0; i < names.length; i += 500) {
    await db('bench_streets').insert(names.slice(i, i + 500).map((name, j) => {
      const k = i + j;
      const r = Math.floor(k / 10);
      return { k, r, c0: (k % 10) * 20, project_id: projectOfRow(r), name, name_norm: normaliseStreet(name), postcode: String(40000 + Math.floor(k / 4)) };
    }));
  }
  await db.raw(
    `insert into planned_routes (project_id, ref, street, kind, geom, length_m, first_version, geometry_version)
     select b.project_id, 'R-' || b.r || '-' || g.c, b.name, 'street',
            ST_SetSRID(ST_MakeLine(ST_MakePoint(?::float8 + g.c * 40 * ?::float8, ?::float8 + b.r * 80 * ?::float8), ST_MakePoint(?::float8 + (g.c + 1) * 40 * ?::float8, ?::float8 + b.r * 80 * ?::float8)), 4326), 40, 1, 1
       from bench_streets b join generate_series(0, ${ROUTES_PER_ROW - 1}) g(c) on b.c0 = (g.c / 20) * 20`,
    [LON0, M_LON, LAT0, M_LAT, LON0, M_LON, LAT0, M_LAT]);
  await db.raw(`insert into address_streets (project_id, name, name_norm, locality) select project_id, name, name_norm, 'Benchford' from bench_streets`);
  // 400 numbers a street: odd on the north side, even on the south, 15 m off the centreline, every 4 m
  await db.raw(
    `insert into addresses (project_id, key, street_id, street, number, number_base, postcode, locality, units, geom)
     select b.project_id, 'A-' || b.k || '-' || n, s.id, b.name, n::text, n, b.postcode, 'Benchford', 1 + (n % 7 = 0)::int * 5,
            ST_SetSRID(ST_MakePoint(?::float8 + (b.c0 * 40 + ((n - 1) / 2) * 4 + 2) * ?::float8, ?::float8 + (b.r * 80 + case when n % 2 = 1 then 15 else -15 end) * ?::float8), 4326)
       from bench_streets b join address_streets s on s.project_id = b.project_id and s.name_norm = b.name_norm, generate_series(1, 400) n`,
    [LON0, M_LON, LAT0, M_LAT]);
  // one section along each route (1.5 m north of the design), RTK on even rows, walked on odd ones
  await db.raw(
    `insert into sections (project_id, planned_route_ref, status, from_chainage_m, to_chainage_m, geom, length_m, max_offset_m, p95_offset_m, accuracy_m, source_upload_ids, laid_on, first_run, last_run, review)
     select r.project_id, r.ref, 'as_planned', 0, 40, ST_Translate(r.geom, 0, 1.5 * ?::float8), 40, 1.6, 1.5,
            case when split_part(r.ref, '-', 2)::int % 2 = 0 then 0.05 else 9.8 end,
            array[(?::uuid[])[1 + (split_part(r.ref, '-', 2)::int / 50) * 2 + split_part(r.ref, '-', 2)::int % 2]], '2026-10-01'::date + (split_part(r.ref, '-', 3)::int % 60), 1, 1,
            case when split_part(r.ref, '-', 3)::int % 3 = 0 then 'pending' else 'approved' end
       from planned_routes r where r.project_id = any(?::uuid[])`,
    [M_LAT, uploads.flat(), projects]);
  await db.raw(
    `insert into depth_readings (project_id, route_id, chainage_m, geom, cover_m, source)
     select r.project_id, r.id, ch, ST_LineInterpolatePoint(r.geom, ch / 40.0), 0.42 + (ch / 1000.0), 'typed'
       from planned_routes r, (values (10.0), (30.0)) v(ch) where r.project_id = any(?::uuid[])`, [projects]);
  await db.raw(
    `insert into duct_bundles (project_id, route_id, from_chainage_m, to_chainage_m, kind, tracer_wire, warning_tape, protective_fill)
     select project_id, id, 0, 40, 'installed', false, true, false from planned_routes where project_id = any(?::uuid[])`, [projects]);
  await db.raw(
    `insert into duct_bundle_ducts (bundle_id, position, outer_mm, inner_mm, colour_name, colour_hex)
     select b.id, d.pos, d.outer_mm, d.inner_mm, d.name, d.hex from duct_bundles b,
       (values (1, 14, 10, 'red', '#d52b1e'), (2, 7, 4, 'green', '#009a44'), (3, 7, 4, 'blue', '#0057b8'), (4, 7, 4, 'yellow', '#ffd100')) d(pos, outer_mm, inner_mm, name, hex)
      where b.project_id = any(?::uuid[])`, [projects]);
  await db.raw('drop table bench_streets');
  await db.raw('analyze');
  const maintenance = await makePrincipal(db, 'maintenance', 'owner', ownerA);
  const { secret } = await createToken(db, maintenance, { name: 'bench' });
  await closeDb();
  return { token: secret, visibleProjectIds: projects.slice(0, 4) };
}

/** --reuse: the town a --keep run left; a new token for its maintenance user. */
async function reuseGenerated(): Promise<{ token: string; visibleProjectIds: string[] }> {
  process.env.DATABASE_URL = url;
  const { getDb, closeDb } = await import('../db/client');
  const { loadPrincipal } = await import('../lib/auth/principal');
  const { createToken } = await import('../lib/services/tokens');
  const db = getDb();
  const org = await db('organisations').where({ name: 'Benchford Fibre Net' }).first('id');
  if (!org) throw new Error('--reuse: no generated town in trenchbook_bench_lookup; run once with --keep first');
  const user = await db('users').where({ organisation_id: org.id, role: 'maintenance' }).first('id');
  const projects = await db('projects').where({ owner_org_id: org.id }).orderBy('name').select('id');
  const { secret } = await createToken(db, (await loadPrincipal(db, user.id))!, { name: 'bench' });
  await closeDb();
  return { token: secret, visibleProjectIds: projects.map((p: { id: string }) => p.id) };
}

// ---- the bare ceiling: node:http + pg, the same statement, no framework, no auth, no other queries ----
async function bare(port: number, projectIds: string[]) {
  const pg = (await import('pg')).default;
  const { NEARBY_SECTIONS_SQL } = await import('../db/lookup');
  let i = 0;
  const text = NEARBY_SECTIONS_SQL.replace(/\?/g, () => `$${++i}`);
  const pool = new pg.Pool({ connectionString: url, max: POOL });
  http.createServer(async (req, res) => {
    const u = new URL(req.url ?? '/', 'http://x');
    const { rows } = await pool.query(text, [Number(u.searchParams.get('lon')), Number(u.searchParams.get('lat')), projectIds, 50]);
    res.writeHead(200, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ stretches: rows }));
  }).listen(port, '127.0.0.1', () => console.log('ready'));
}

// ---- the load: keep-alive connections, each client one request at a time ----
interface Run { latencies: number[]; seconds: number; errors: number; lastBody: string }

async function drive(port: number, headers: Record<string, string>, next: () => string, clients: number, opts: { requests?: number; seconds?: number }): Promise<Run> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: clients });
  const latencies: number[] = [];
  let errors = 0;
  let lastBody = '';
  let sent = 0;
  const t0 = performance.now();
  const more = () => (opts.requests !== undefined ? sent < opts.requests : performance.now() - t0 < opts.seconds! * 1000);
  const one = (p: string) =>
    new Promise<void>((resolve) => {
      const s = performance.now();
      const req = http.get({ host: '127.0.0.1', port, path: p, headers, agent }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c) => chunks.push(c));
        res.on('end', () => {
          latencies.push(performance.now() - s);
          if (res.statusCode !== 200) errors++;
          lastBody = Buffer.concat(chunks).toString();
          resolve();
        });
      });
      req.on('error', () => { errors++; resolve(); });
    });
  await Promise.all(Array.from({ length: clients }, async () => {
    while (more()) {
      sent++;
      await one(next());
    }
  }));
  agent.destroy();
  return { latencies, seconds: (performance.now() - t0) / 1000, errors, lastBody };
}

/** CPU time (user + system, ms) of processes, from /proc/<pid>/stat (clock ticks of 10 ms on Linux). */
function cpuMs(pids: number[]): number {
  let ticks = 0;
  for (const pid of pids) {
    try {
      const f = readFileSync(`/proc/${pid}/stat`, 'utf8');
      const fields = f.slice(f.lastIndexOf(')') + 2).split(' ');
      ticks += Number(fields[11]) + Number(fields[12]);
    } catch { /* ended meanwhile */ }
  }
  return ticks * 10;
}
const postgresPids = () => execFileSync('pgrep', ['-u', 'postgres', 'postgres'], { encoding: 'utf8' }).trim().split('\n').map(Number);

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
};
const line = (name: string, r: Run) =>
  `${name.padEnd(34)} ${String(r.latencies.length).padStart(6)} req ${(r.latencies.length / r.seconds).toFixed(0).padStart(6)} req/s   p50 ${pct(r.latencies, 50).toFixed(2).padStart(6)}  p95 ${pct(r.latencies, 95).toFixed(2).padStart(6)}  p99 ${pct(r.latencies, 99).toFixed(2).padStart(6)} ms${r.errors ? `  ${r.errors} ERRORS` : ''}`;

/** Starts a server in a process group of its own (listed in `started` at once, so that it is stopped on any failure). */
function startChild(args: string[], extraEnv: Record<string, string>, started: ChildProcess[]): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn('node', ['--import', 'tsx', ...args], { cwd: root, env: { ...env, ...extraEnv }, stdio: ['ignore', 'pipe', 'inherit'], detached: true });
    started.push(child);
    child.stdout!.on('data', (d: Buffer) => { if (/serving|ready/i.test(d.toString())) resolve(child); });
    child.on('exit', (code) => reject(new Error(`${args.join(' ')} ended (${code}) before it was ready`)));
  });
}

async function main() {
  const reuse = process.argv.includes('--reuse');
  const keep = reuse || process.argv.includes('--keep');
  let token: string;
  let visibleProjectIds: string[];
  if (reuse) {
    ({ token, visibleProjectIds } = await reuseGenerated());
    console.log('reusing the generated town of an earlier run (--reuse)');
  } else {
    execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'recreatedb', DB], { stdio: 'inherit' });
    execFileSync('npm', ['run', '--silent', 'db:migrate'], { cwd: root, env, stdio: ['ignore', 'ignore', 'inherit'] });
    const t = performance.now();
    ({ token, visibleProjectIds } = await generate());
    console.log(`generated in ${((performance.now() - t) / 1000).toFixed(0)} s: 1,000,000 addresses on 2,500 streets, 50,000 sections with ducts and cover readings, 5 projects (4 visible to the asking owner)`);
  }

  const children: ChildProcess[] = [];
  const stop = () => { for (const c of children) try { process.kill(-c.pid!, 'SIGTERM'); } catch { /* already gone */ } };
  try {
    await startChild(['scripts/server.ts'], { PORT: String(API_PORT), NEXTAUTH_URL: `http://127.0.0.1:${API_PORT}` }, children);
    await startChild([__filename, '--bare', String(BARE_PORT), JSON.stringify(visibleProjectIds)], {}, children);
    const auth = { authorization: `Bearer ${token}` };
    const random = rng(17);
    // spots anywhere in the owner's four projects' rows (every spot has streets within 50 m)
    const spot = () => `lon=${(LON0 + random() * ROUTES_PER_ROW * 40 * M_LON).toFixed(7)}&lat=${(LAT0 + (random() * 200 * 80 - 20) * M_LAT).toFixed(7)}`;
    const nearby = () => `/api/lookup/nearby?${spot()}`;
    const bareNearby = () => `/?${spot()}`;
    // what people type: a transposed letter, "str." for Street, no postcode, sometimes a postcode
    const typed = () => {
      const k = Math.floor(random() * 2000); // the visible projects' streets
      let name = streetName(k);
      const roll = random();
      if (roll < 0.3) { const i = 1 + Math.floor(random() * (name.indexOf(' ') - 2)); name = name.slice(0, i) + name[i + 1] + name[i] + name.slice(i + 2); }
      else if (roll < 0.5) name = name.replace(/ Street$/, ' Str.');
      const n = 1 + Math.floor(random() * 400);
      return `/api/lookup/addresses?q=${encodeURIComponent(`${name} ${n}${random() < 0.3 ? `, ${40000 + Math.floor(k / 4)}` : ''}`)}`;
    };
    // warm up both servers (Next compiles nothing in production, but pools and plans warm)
    await drive(API_PORT, auth, nearby, 4, { requests: 300 });
    await drive(API_PORT, auth, typed, 4, { requests: 300 });
    await drive(BARE_PORT, {}, bareNearby, 4, { requests: 300 });

    const sample = JSON.parse((await drive(API_PORT, auth, nearby, 1, { requests: 1 })).lastBody);
    if (!Array.isArray(sample.stretches) || sample.stretches.length === 0) throw new Error(`nearby found nothing: ${JSON.stringify(sample).slice(0, 300)}`);
    const found = JSON.parse((await drive(API_PORT, auth, () => '/api/lookup/addresses?q=Alderbrok%20Street%2012', 1, { requests: 1 })).lastBody);
    console.log(`check: a spot finds ${sample.stretches.length} stretches (nearest ${sample.stretches[0].distanceM} m, ${sample.stretches[0].ducts[0]?.summary ?? 'no ducts'}); "Alderbrok Street 12" finds ${found.candidates[0]?.street} ${found.candidates[0]?.number}`);

    const rows: [string, Run][] = [];
    rows.push(['search, 1 client', await drive(API_PORT, auth, typed, 1, { requests: 1000 })]);
    rows.push(['nearby, 1 client', await drive(API_PORT, auth, nearby, 1, { requests: 1000 })]);
    rows.push(['bare nearby, 1 client', await drive(BARE_PORT, {}, bareNearby, 1, { requests: 1000 })]);
    const cpu = async (name: string, pid: number, run: () => Promise<Run>) => {
      const [app0, pg0] = [cpuMs([pid]), cpuMs(postgresPids())];
      const r = await run();
      const [app, pgm] = [cpuMs([pid]) - app0, cpuMs(postgresPids()) - pg0];
      console.log(`${name}: CPU per request ${(app / r.latencies.length).toFixed(2)} ms in the server process, ${(pgm / r.latencies.length).toFixed(2)} ms in PostgreSQL`);
      return r;
    };
    rows.push(['nearby, 16 clients (15 s)', await cpu('nearby through the API', children[0].pid!, () => drive(API_PORT, auth, nearby, 16, { seconds: 15 }))]);
    rows.push(['bare nearby, 16 clients (15 s)', await cpu('bare nearby', children[1].pid!, () => drive(BARE_PORT, {}, bareNearby, 16, { seconds: 15 }))]);
    rows.push(['search, 16 clients (15 s)', await drive(API_PORT, auth, typed, 16, { seconds: 15 })]);
    // the framework's floor: the health route (no sign-in, one `select 1`) through the same server
    rows.push(['health route, 16 clients (5 s)', await cpu('health route (the floor)', children[0].pid!, () => drive(API_PORT, {}, () => '/api/health', 16, { seconds: 5 }))]);
    for (const [name, r] of rows) console.log(line(name, r));
    const get = (name: string) => rows.find(([n]) => n.startsWith(name))![1];
    const share = get('nearby, 16').latencies.length / get('nearby, 16').seconds / (get('bare nearby, 16').latencies.length / get('bare nearby, 16').seconds);
    const ok = (b: boolean) => (b ? 'met' : 'MISSED');
    console.log(`targets: nearby p95 < 10 ms with one client: ${pct(get('nearby, 1').latencies, 95).toFixed(2)} ms (${ok(pct(get('nearby, 1').latencies, 95) < 10)}); ` +
      `16 clients ≥ 25 % of the bare server: ${(share * 100).toFixed(0)} % (${ok(share >= 0.25)}); search p95 < 30 ms: ${pct(get('search, 1').latencies, 95).toFixed(2)} ms (${ok(pct(get('search, 1').latencies, 95) < 30)})`);
    if (rows.some(([, r]) => r.errors > 0)) throw new Error('some requests failed');
  } finally {
    stop();
    // the generated rows take about a gigabyte: emptied unless --keep
    if (!keep) execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'recreatedb', DB], { stdio: 'ignore' });
  }
}

if (process.argv[2] === '--bare') {
  bare(Number(process.argv[3]), JSON.parse(process.argv[4])).catch((err) => {
    console.error(err);
    process.exit(1);
  });
} else {
  main().then(() => process.exit(0), (err) => {
    console.error(err);
    process.exit(1);
  });
}
