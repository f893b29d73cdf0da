import geodesic from 'geographiclib-geodesic';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject } from '@/db/projects';
import { listCurrentSections } from '@/db/sections';
import { correctionSchema } from '@/lib/services/corrections';
import { importPlan } from '@/lib/services/planned';
import { changeProject, createProject, createProjectSchema, updateProjectSchema } from '@/lib/services/projects';
import { runReconciliation } from '@/lib/services/reconcile';
import { exclusionSchema } from '@/lib/services/exclusions';
import { receiveUpload, uploadFieldsSchema } from '@/lib/services/uploads';
import { DATE_RANGE, plausibleDate, RANGES, rangeProblem } from '@/lib/records/plausible-ranges';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-ranges');
const db = getDb();
afterAll(() => closeDb());

const issues = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  r.success ? [] : r.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`);

describe('plausible ranges of the project settings', () => {
  const base = { name: 'Ranges', partnerOrganisation: 'Any registered owner' };
  // [field, floor, ceiling] as chosen in lib/records/plausible-ranges.ts, with reasons there
  const cases: [string, number, number, (v: number) => object][] = [
    ['lateralToleranceM', 0.05, 50, (v) => ({ lateralToleranceM: v })],
    ['minCoverDepthM', 0.05, 2, (v) => ({ minCoverDepthM: v })],
    ['accuracySigmas.rtk_gnss', 0.005, 100, (v) => ({ accuracySigmas: { rtk_gnss: v } })],
    ['accuracySigmas.handheld_gnss', 0.005, 100, (v) => ({ accuracySigmas: { handheld_gnss: v } })],
  ];

  for (const [field, floor, ceiling, make] of cases) {
    it(`${field}: accepts ${floor} and ${ceiling}, refuses just outside, 0, 1e-300 and 1e-320 with the range in the message`, () => {
      for (const schema of [createProjectSchema, updateProjectSchema]) {
        const withBase = (v: number) => (schema === createProjectSchema ? { ...base, ...make(v) } : make(v));
        expect(issues(schema.safeParse(withBase(floor)))).toEqual([]);
        expect(issues(schema.safeParse(withBase(ceiling)))).toEqual([]);
        for (const bad of [floor * 0.99, ceiling * 1.01, 0, -1, 1e-300, 1e-320, 1e300]) {
          const got = issues(schema.safeParse(withBase(bad)));
          expect(got, `${field} = ${bad}`).toHaveLength(1);
          expect(got[0]).toContain(`${field}: `);
          expect(got[0]).toContain(`${floor}–${ceiling} m`);
        }
      }
    });
  }

  it('says which bound was crossed, in words', () => {
    expect(rangeProblem(RANGES.lateralToleranceM, 1e-300)).toBe('The lateral tolerance must be at least 0.05 m (plausible: 0.05–50 m).');
    expect(rangeProblem(RANGES.minCoverDepthM, 7)).toBe('The minimum cover depth must be at most 2 m (plausible: 0.05–2 m).');
    expect(rangeProblem(RANGES.sigmaM, 0.01)).toBeUndefined();
  });

  it('keeps the database from storing a σ, tolerance or depth outside the range even when the service is bypassed', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const p = await createProject(db, admin, createProjectSchema.parse({ name: `Check ${Date.now()}`, partnerOrganisation: await registerPartner(db, admin, `Range owner ${Date.now()}`) }));
    const bad: Record<string, unknown>[] = [
      { accuracy_sigmas: JSON.stringify({ rtk_gnss: 1e-320 }) },
      { accuracy_sigmas: JSON.stringify({ rtk_gnss: 'tiny' }) },
      { lateral_tolerance_m: 1e-300 },
      { min_cover_depth_m: 0 },
    ];
    for (const b of bad) await expect(db('projects').where({ id: p.id }).update(b), JSON.stringify(b)).rejects.toMatchObject({ code: '23514' });
    await expect(db('uploads').insert({ id: randomUUID(), content: 'trench', project_id: p.id, sha256: 'x'.repeat(64), size_bytes: 1, file_name: 'x', accuracy_class: 'rtk_gnss', sigma_m: 1e-320, status: 'failed' })).rejects.toMatchObject({ code: '23514' });
    const stored = (await getProject(db, p.id))!;
    expect(stored.accuracySigmas).toEqual({});
    expect(stored.lateralToleranceM).toBe(0.5);
  });
});

describe('a stored project cannot give sections an accuracy of 0', () => {
  it('at the σ floor, an RTK-built section has accuracy 2.4477 × 0.005 m ≈ 0.0122 m, not 0', async () => {
    const G = geodesic.Geodesic.WGS84;
    const corner = [9.131, 52.114];
    const east = (s: number) => {
      const q = G.Direct(corner[1], corner[0], 90, s); // positions by GeographicLib's direct problem
      return [q.lon2!, q.lat2!];
    };
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
    const created = await createProject(db, admin, createProjectSchema.parse({ name: `Floor ${Date.now()}`, partnerOrganisation: await registerPartner(db, admin, `Floor owner ${Date.now()}`) }));
    // the floor is the least a person can store: 1e-320 is refused by the schema, and by the database's
    // CHECK when a caller skips the schema
    expect(updateProjectSchema.safeParse({ accuracySigmas: { rtk_gnss: 1e-320 } }).success).toBe(false);
    await expect(changeProject(db, admin, created.id, { accuracySigmas: { rtk_gnss: 1e-320 } })).rejects.toMatchObject({ code: '23514' });
    await changeProject(db, admin, created.id, updateProjectSchema.parse({ accuracySigmas: { rtk_gnss: RANGES.sigmaM.min } }));
    const project = (await getProject(db, created.id))!;
    const design = JSON.stringify({ type: 'Feature', properties: { route_id: 'FL-1', street: 'Floor Lane' }, geometry: { type: 'LineString', coordinates: [east(0), east(60)] } });
    const planForm = await formOf([{ name: 'floor.geojson', bytes: design }]);
    await importPlan(db, engineer, project, planForm).finally(() => planForm.cleanup());
    const csv = ['id,lat,lon', ...Array.from({ length: 31 }, (_, i) => { const [lon, lat] = east(2 * i); return `${i},${lat.toFixed(9)},${lon.toFixed(9)}`; })].join('\n');
    const upForm = await formOf([{ name: 'floor-rtk.csv', bytes: csv }], { accuracy: 'rtk_gnss', surveyDate: '2026-11-20' });
    const { upload } = await receiveUpload(db, engineer, project, upForm).finally(() => upForm.cleanup());
    expect(upload.sigmaM).toBe(0.005);
    await runReconciliation(db, project.id, null, { userId: engineer.id, label: 'test', organisationId: engineer.organisationId }, async () => {});
    const built = (await listCurrentSections(db, project.id)).filter((s) => s.status !== 'not_built');
    expect(built.length).toBeGreaterThan(0);
    // the 95 % radius of a circular normal error is the Rayleigh quantile σ·√(−2 ln 0.05) = 2.4477 σ [published]
    for (const s of built) {
      expect(s.accuracyM).toBeGreaterThan(0.012);
      expect(s.accuracyM).toBeCloseTo(Math.sqrt(-2 * Math.log(0.05)) * 0.005, 5);
    }
  });
});

describe('plausible ranges of other typed numbers and dates', () => {
  it('correction chainages: 0 to 100 km', () => {
    expect(correctionSchema.safeParse({ kind: 'split', atChainageM: 100_000, reason: 'at the limit' }).success).toBe(true);
    for (const v of [-0.5, 100_000.5, 1e300]) {
      const got = issues(correctionSchema.safeParse({ kind: 'split', atChainageM: v, reason: 'out of range' }));
      expect(got, String(v)).toHaveLength(1);
      expect(got[0]).toContain('0–100,000 m');
    }
    expect(issues(correctionSchema.safeParse({ kind: 'mark_built', fromChainageM: 0, toChainageM: 2e5, reason: 'too far' }))[0]).toContain('toChainageM');
  });

  it('exclusion distances: 0 to 100 km along the trace', () => {
    expect(exclusionSchema.safeParse({ kind: 'distance', from: 0, to: 100_000, reason: 'whole trace' }).success).toBe(true);
    const got = issues(exclusionSchema.safeParse({ kind: 'distance', from: 0, to: 1e300, reason: 'typo' }));
    expect(got).toEqual(['to: The distance along the trace must be at most 100,000 m (plausible: 0–100,000 m).']);
    expect(issues(exclusionSchema.safeParse({ kind: 'distance', from: -1, to: 5, reason: 'typo' }))[0]).toContain('from: The distance along the trace must be at least 0 m');
  });

  it('survey and lay dates: from 1990 to tomorrow, and real calendar dates', () => {
    const now = () => new Date('2026-12-05T10:00:00Z');
    const d = plausibleDate('the survey date', now);
    expect(d.safeParse('2026-12-06').success).toBe(true);
    expect(d.safeParse(DATE_RANGE.min).success).toBe(true);
    expect(issues(d.safeParse('2026-12-07'))).toEqual([': The survey date cannot be in the future.']);
    expect(issues(d.safeParse('1989-12-31'))).toEqual([': The survey date cannot be before 1990-01-01.']);
    expect(d.safeParse('2024-02-31').success).toBe(false);
    expect(uploadFieldsSchema.safeParse({ surveyDate: '2207-11-05' }).success).toBe(false);
    expect(uploadFieldsSchema.safeParse({ surveyDate: '2026-11-05' }).success).toBe(true);
    expect(correctionSchema.safeParse({ kind: 'mark_built', laidOn: '1926-11-05', reason: 'typo in the year' }).success).toBe(false);
  });
});
