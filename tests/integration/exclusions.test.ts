import geodesic from 'geographiclib-geodesic';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { formatInZone, wallTimeToUtc } from '@/lib/records/zoned-time';
import { excludeFromMatching, exclusionSchema, removeExclusion, uploadFixOverview } from '@/lib/services/exclusions';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-exclusions');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
let engineer: Principal;
let surveyor: Principal;
let project: Project;
let walkId: string;
let pointsId: string;

const CORNER: [number, number] = [9.142, 52.121];
const east = (s: number): [number, number] => {
  const p = G.Direct(CORNER[1], CORNER[0], 90, s);
  return [p.lon2!, p.lat2!];
};
/** 116 fixes east along the route, fix i at 2026-11-05 09:00:00 + i s UTC (10:00:00 + i s in Berlin, CET). */
const WALK_FIXES = 116;
function walkGpx(): string {
  const pts = Array.from({ length: WALK_FIXES }, (_, i) => {
    const [lon, lat] = east(i * 1.3);
    return `<trkpt lat="${lat.toFixed(8)}" lon="${lon.toFixed(8)}"><time>${new Date(Date.UTC(2026, 10, 5, 9, 0, i)).toISOString()}</time></trkpt>`;
  });
  return `<?xml version="1.0"?><gpx version="1.1" creator="exclusions" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>${pts.join('')}</trkseg></trk></gpx>`;
}
/** Survey points without times, 2 m apart. */
function pointsCsv(): string {
  const rows = ['id,lat,lon'];
  for (let s = 0; s <= 60; s += 2) {
    const [lon, lat] = east(s);
    rows.push(`${s},${lat.toFixed(9)},${lon.toFixed(9)}`);
  }
  return rows.join('\n') + '\n';
}

async function upload(name: string, text: string, accuracy: string) {
  const form = await formOf([{ name, bytes: text }], { accuracy, surveyDate: '2026-11-05' });
  try {
    return (await receiveUpload(db, surveyor, project, form)).upload;
  } finally {
    await form.cleanup();
  }
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `EX owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Exclusions ${Date.now()}`, partnerOrganisation: partner, timeZone: 'Europe/Berlin' }))).id))!;
  const form = await formOf([{ name: 'design.geojson', bytes: JSON.stringify({ type: 'Feature', properties: { route_id: 'X-1' }, geometry: { type: 'LineString', coordinates: [east(0), east(160)] } }) }]);
  try {
    await importPlan(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
  walkId = (await upload('walk.gpx', walkGpx(), 'handheld_gnss')).id;
  pointsId = (await upload('points.csv', pointsCsv(), 'rtk_gnss')).id;
});
afterAll(() => closeDb());

describe('times on the project clock', () => {
  const ZONES = ['Europe/Berlin', 'America/New_York', 'Australia/Lord_Howe', 'Asia/Kolkata', 'America/Sao_Paulo', 'UTC'];
  // wall times every 10 minutes across 2026's changes of the clocks (the spring gap and the autumn fold,
  // Lord Howe's half-hour shift included), and across a few ordinary days
  const walls: string[] = [];
  const around = (day: string) => {
    for (let m = 0; m < 24 * 60; m += 10) walls.push(`${day} ${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}:00`);
  };
  ['2026-03-08', '2026-03-29', '2026-04-05', '2026-10-04', '2026-10-25', '2026-11-01', '2026-11-05', '2026-06-30'].forEach(around);

  it('reads a wall-clock time as the instant PostgreSQL\'s timestamp AT TIME ZONE gives, gaps and folds included', async () => {
    for (const tz of ZONES) {
      // PostgreSQL and its IANA tz database: the independent side of this check
      const { rows } = await db.raw(`select w, (w::timestamp at time zone ?) as t from unnest(?::text[]) as w`, [tz, walls]);
      const mismatches = rows.filter((r: { w: string; t: Date }) => wallTimeToUtc(r.w, tz) !== r.t.toISOString());
      expect(mismatches.map((r: { w: string; t: Date }) => `${tz} ${r.w}: ours ${wallTimeToUtc(r.w, tz)}, PostgreSQL ${r.t.toISOString()}`)).toEqual([]);
    }
  });

  it('shows an instant as the wall-clock time PostgreSQL shows in the zone', async () => {
    const instants = walls.map((w) => new Date(`${w.replace(' ', 'T')}Z`).toISOString());
    for (const tz of ZONES) {
      const { rows } = await db.raw(`select i, to_char(i::timestamptz at time zone ?, 'YYYY-MM-DD HH24:MI:SS') as wall from unnest(?::text[]) as i`, [tz, instants]);
      const mismatches = rows.filter((r: { i: string; wall: string }) => formatInZone(r.i, tz) !== r.wall);
      expect(mismatches).toEqual([]);
    }
  });

  it('refuses dates that do not exist', () => {
    for (const bad of ['2026-02-30 10:00', '2026-13-01 10:00', '2026-11-05 24:00', '2026-11-05 10:60', '5.11.2026 10:00', '']) expect(wallTimeToUtc(bad, 'Europe/Berlin')).toBeNull();
    expect(wallTimeToUtc('2026-11-05T10:00:38', 'Europe/Berlin')).toBe('2026-11-05T09:00:38.000Z');
  });
});

describe('stretches left out of matching', () => {
  it('shows the fixes: how many, first and last time', async () => {
    const o = await uploadFixOverview(db, walkId);
    expect(o.total).toBe(WALK_FIXES);
    expect(o.span).toEqual({ firstT: Date.UTC(2026, 10, 5, 9, 0, 0) / 1000, lastT: Date.UTC(2026, 10, 5, 9, 0, WALK_FIXES - 1) / 1000 });
    // metres along the trace at the last fix: the walk's own length by GeographicLib
    const last = o.fixes[o.fixes.length - 1];
    const inv = G.Inverse(CORNER[1], CORNER[0], east((WALK_FIXES - 1) * 1.3)[1], east((WALK_FIXES - 1) * 1.3)[0]);
    expect(last.alongM).toBeCloseTo(inv.s12!, 0);
  });

  it('refuses a range with no fix, saying when the fixes are, and stores nothing', async () => {
    const rows = await count(db, 'upload_exclusions');
    const audits = await count(db, 'audit_log');
    // 09:00 on the project's clock is 08:00 UTC: an hour before the walk began
    const early = await refusal(excludeFromMatching(db, engineer, project.id, walkId, exclusionSchema.parse({ kind: 'time', from: wallTimeToUtc('2026-11-05 09:00:00', project.timeZone), to: wallTimeToUtc('2026-11-05 09:30:00', project.timeZone), reason: 'typed on the wrong clock' })));
    expect(early.code).toBe('empty_range');
    expect(early.status).toBe(422);
    expect(early.message).toContain('its fixes run from 2026-11-05 10:00:00 to 2026-11-05 10:01:55');
    const far = await refusal(excludeFromMatching(db, engineer, project.id, walkId, exclusionSchema.parse({ kind: 'distance', from: 500, to: 600, reason: 'beyond the end' })));
    expect(far.code).toBe('empty_range');
    expect(far.message).toMatch(/longest trace is 149\.\d m long/);
    const untimed = await refusal(excludeFromMatching(db, engineer, project.id, pointsId, exclusionSchema.parse({ kind: 'time', from: '2026-11-05T09:00:00Z', to: '2026-11-05T10:00:00Z', reason: 'no times here' })));
    expect(untimed.message).toMatch(/carry no times/);
    expect(await count(db, 'upload_exclusions')).toBe(rows);
    expect(await count(db, 'audit_log')).toBe(audits);
  });

  it('leaves out the fixes of a range typed on the project clock, and takes them back in when it is removed', async () => {
    const jobs = async () => Number((await db('jobs').where({ project_id: project.id, kind: 'reconcile' }).count('* as n'))[0].n);
    // 10:00:38–10:01:25 in Berlin (CET) is fixes 38 to 85: 48 fixes, counted from the walk's own timing
    const input = exclusionSchema.parse({ kind: 'time', from: wallTimeToUtc('2026-11-05 10:00:38', 'Europe/Berlin'), to: wallTimeToUtc('2026-11-05 10:01:25', 'Europe/Berlin'), reason: 'walk back to the van' });
    const { exclusion } = await excludeFromMatching(db, engineer, project.id, walkId, input);
    expect(exclusion.fixesLeftOut).toBe(85 - 38 + 1);
    const listed = (await uploadFixOverview(db, walkId)).exclusions;
    expect(listed).toEqual([expect.objectContaining({ id: exclusion.id, kind: 'time', from: '2026-11-05T09:00:38.000Z', to: '2026-11-05T09:01:25.000Z', fixesLeftOut: 48, createdByName: engineer.name })]);
    const queued = await jobs();
    await db('jobs').where({ project_id: project.id, kind: 'reconcile', status: 'queued' }).update({ status: 'completed' });

    await removeExclusion(db, engineer, project.id, walkId, exclusion.id);
    expect(await db('upload_exclusions').where({ id: exclusion.id })).toHaveLength(0);
    const audit = await db('audit_log').where({ project_id: project.id, object_id: walkId, action: 'include_range' });
    expect(audit).toHaveLength(1);
    expect(audit[0].before).toMatchObject({ id: exclusion.id, kind: 'time', reason: 'walk back to the van' });
    // the project is reconciled again without the range
    expect(await jobs()).toBe(queued + 1);
    const again = await refusal(removeExclusion(db, engineer, project.id, walkId, exclusion.id));
    expect(again.status).toBe(404);
    // another upload's range cannot be removed through this one
    const other = await excludeFromMatching(db, engineer, project.id, pointsId, exclusionSchema.parse({ kind: 'distance', from: 0, to: 5, reason: 'setting up' }));
    expect(other.exclusion.fixesLeftOut).toBe(3);
    expect((await refusal(removeExclusion(db, engineer, project.id, walkId, other.exclusion.id))).status).toBe(404);
  });
});
