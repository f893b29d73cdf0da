import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject } from '@/db/projects';
import { listCurrentSections } from '@/db/sections';
import { createDepthReading } from '@/lib/services/depth-readings';
import { createDuctBundle } from '@/lib/services/duct-bundles';
import { projectChecks, sectionFindings } from '@/lib/services/quality-checks';
import { reviewSchema, reviewSection, reviewSections, bulkReviewSchema, runReconciliation, sectionDetail } from '@/lib/services/reconcile';
import { receiveUpload } from '@/lib/services/uploads';
import { depthReadingSchema } from '@/lib/records/depth-schemas';
import { ductBundleSchema } from '@/lib/records/duct-schemas';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-checks');
const db = getDb();
afterAll(() => closeDb());

let plan: RecordPlan;
let street: string;

/** An RTK survey of S-1 from `from` to `to` m, on the line. */
async function survey(from: number, to: number, name: string) {
  const rows = ['id,lat,lon'];
  for (let e = from, i = 0; e <= to; e += 2, i++) {
    const [lon, lat] = plan.at(e, 0.02);
    rows.push(`${i},${lat.toFixed(9)},${lon.toFixed(9)}`);
  }
  const f = await formOf([{ name, bytes: rows.join('\n') }], { accuracy: 'rtk_gnss', surveyDate: '2026-11-20' });
  await receiveUpload(db, plan.surveyor, plan.project, f).finally(() => f.cleanup());
}

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Checks', [9.31, 52.31]);
  street = plan.routes.get('S-1')!;
  // built 0–80 and 120–200 m: a 40 m gap between them
  await survey(0, 80, 'west-rtk.csv');
  await survey(120, 200, 'east-rtk.csv');
  await runReconciliation(db, plan.project.id, null, { userId: plan.engineer.id, label: 'test', organisationId: plan.engineer.organisationId }, async () => {});
});

const built = async () => (await listCurrentSections(db, plan.project.id)).filter((s) => s.plannedRouteRef === 'S-1' && s.status !== 'not_built');
const count = async (check: string) => (await projectChecks(db, (await getProject(db, plan.project.id))!)).checks.find((c) => c.check === check)!.count;

describe('quality checks', () => {
  it('finds the gap between built stretches and the built stretches with no depth reading or duct bundle', async () => {
    const b = await built();
    expect(b.length).toBe(2);
    const { checks } = await projectChecks(db, plan.project);
    const gap = checks.find((c) => c.check === 'gap_between_built')!;
    expect(gap.count).toBe(1);
    expect(gap.findings[0].fromChainageM).toBeGreaterThan(75);
    expect(gap.findings[0].toChainageM).toBeLessThan(125);
    expect(checks.find((c) => c.check === 'no_depth_reading')!.count).toBe(2);
    expect(checks.find((c) => c.check === 'no_duct_bundle')!.count).toBe(2);
    expect(checks.find((c) => c.check === 'cover_below_minimum')!.count).toBe(0);
  });

  it('clears a check when the record arrives, and raises cover below the minimum from a shallow reading', async () => {
    const [west] = await built();
    await createDepthReading(db, plan.surveyor, plan.project, depthReadingSchema.parse({ routeId: street, chainageM: 20, coverM: 0.45 }));
    expect(await count('no_depth_reading')).toBe(1);
    expect(await count('cover_below_minimum')).toBe(0);
    // the project's minimum cover is 0.30 m by default: 0.22 m is below it
    await createDepthReading(db, plan.surveyor, plan.project, depthReadingSchema.parse({ routeId: street, chainageM: 40, coverM: 0.22 }));
    expect(await count('cover_below_minimum')).toBe(1);
    const bundle = { routeId: street, fromChainageM: west.fromChainageM, toChainageM: west.toChainageM, tracerWire: true, warningTape: true, protectiveFill: false, ducts: [{ outerMm: 7, innerMm: 4, colourPosition: 1, purpose: 'distribution' }] };
    await createDuctBundle(db, plan.surveyor, plan.project, ductBundleSchema.parse(bundle));
    expect(await count('no_duct_bundle')).toBe(1);
    const open = await sectionFindings(db, plan.project, west);
    expect(open.map((f) => f.check)).toEqual(['cover_below_minimum']);
    const detail = await sectionDetail(db, west.id);
    expect(detail.openChecks).toHaveLength(1);
    expect(detail.records.depthReadings.map((r) => r.coverM)).toEqual([0.45, 0.22]);
    expect(detail.records.ductBundles.filter((x) => x.kind === 'installed')).toHaveLength(1);
  });

  it('refuses to approve a section with open checks without a comment, and keeps the comment and the checks in the audit log', async () => {
    const [west, east] = await built();
    const before = await db('audit_log').where({ object_id: west.id }).count<{ count: number }[]>('* as count');
    await expect(reviewSection(db, plan.engineer, west.id, reviewSchema.parse({ decision: 'approve' }))).rejects.toMatchObject({
      code: 'invalid',
      message: expect.stringMatching(/1 open quality check \(cover below the minimum\): confirm the approval with a comment/),
      details: [{ path: 'comment' }],
    });
    expect(await db('audit_log').where({ object_id: west.id }).count<{ count: number }[]>('* as count')).toEqual(before);
    expect((await db('sections').where({ id: west.id }).first('review')).review).toBe('pending');
    // bulk: nothing is approved while one of them has open checks and no comment
    await expect(reviewSections(db, plan.engineer, plan.project.id, bulkReviewSchema.parse({ sectionIds: [west.id, east.id], decision: 'approve' }))).rejects.toMatchObject({ code: 'invalid' });
    expect((await db('sections').whereIn('id', [west.id, east.id]).pluck('review')).sort()).toEqual(['pending', 'pending']);

    const ok = await reviewSection(db, plan.engineer, west.id, reviewSchema.parse({ decision: 'approve', comment: 'Shallow at 40 m agreed with the road authority' }));
    expect(ok.review).toBe('approved');
    const entry = await db('audit_log').where({ object_id: west.id, action: 'review_approved' }).first();
    expect(entry.after.comment).toBe('Shallow at 40 m agreed with the road authority');
    expect(entry.after.openChecks[0]).toMatch(/below|minimum/i);
  });
});
