import { randomUUID } from 'node:crypto';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { createToken } from '@/lib/services/tokens';
import { PATCH as accuracyRoute } from '@/app/api/projects/[projectId]/uploads/[uploadId]/route';
import type { Principal } from '@/lib/auth/principal';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

// Issue 19, part 1 (the class set afterwards): an upload's accuracy class is changed on its page, its σ
// follows the project's figure for the class, the change is audited and the project is reconciled again.

const db = getDb();
let plan: RecordPlan;

async function upload(status = 'stored'): Promise<string> {
  const id = randomUUID();
  await db('uploads').insert({ id, project_id: plan.project.id, sha256: randomUUID().replace(/-/g, '').padEnd(64, '0'), size_bytes: 1, file_name: 'survey.csv', status, accuracy_class: 'unknown', sigma_m: 5, content: 'trench' });
  return id;
}

async function patch(who: Principal, uploadId: string, body: unknown) {
  const token = (await createToken(db, who, { name: 'accuracy' })).secret;
  return accuracyRoute(
    new NextRequest(`http://127.0.0.1/api/projects/${plan.project.id}/uploads/${uploadId}`, { method: 'PATCH', headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: JSON.stringify(body) }),
    { params: Promise.resolve({ projectId: plan.project.id, uploadId }) },
  );
}

const audits = (id: string) => db('audit_log').where({ object_type: 'upload', object_id: id, action: 'accuracy' }).select('before', 'after');
const queuedRuns = () => db('jobs').where({ project_id: plan.project.id, kind: 'reconcile', status: 'queued' }).count<{ n: number }[]>('* as n').then(([r]) => Number(r.n));

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Upload accuracy', [9.6, 52.6]);
  // the project's own σ for RTK (a typed setting, not the catalogue default): the upload must take this one
  await db('projects').where({ id: plan.project.id }).update({ accuracy_sigmas: JSON.stringify({ rtk_gnss: 0.015 }) });
});
afterAll(() => closeDb());

describe("an upload's accuracy class, set afterwards", () => {
  it("takes the class and the project's σ for it, is audited, and has the project reconciled again", async () => {
    const id = await upload();
    await db('jobs').where({ project_id: plan.project.id, kind: 'reconcile', status: 'queued' }).delete();
    const res = await patch(plan.engineer, id, { accuracy: 'rtk_gnss' });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.upload).toMatchObject({ accuracyClass: 'rtk_gnss', sigmaM: 0.015 });
    expect(body.reconciling).toBe(true);
    expect(await db('uploads').where({ id }).first('accuracy_class', 'sigma_m')).toEqual({ accuracy_class: 'rtk_gnss', sigma_m: 0.015 });
    expect(await audits(id)).toEqual([{ before: { accuracyClass: 'unknown', sigmaM: 5 }, after: { accuracyClass: 'rtk_gnss', sigmaM: 0.015 } }]);
    expect(await queuedRuns()).toBe(1);

    // the same class again changes nothing: no audit entry, no new run
    const again = await patch(plan.engineer, id, { accuracy: 'rtk_gnss' });
    expect(again.status).toBe(200);
    expect((await again.json()).reconciling).toBe(false);
    expect(await audits(id)).toHaveLength(1);
  });

  it('refuses the owner (403), a class not in the catalogue (422 naming the field) and a withdrawn upload (409), changing nothing', async () => {
    const id = await upload();
    expect((await patch(plan.owner, id, { accuracy: 'rtk_gnss' })).status).toBe(403);
    const bad = await patch(plan.engineer, id, { accuracy: 'laser' });
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.details[0].path).toBe('accuracy');
    const gone = await upload('withdrawn');
    const refused = await patch(plan.engineer, gone, { accuracy: 'rtk_gnss' });
    expect(refused.status).toBe(409);
    expect((await refused.json()).error.message).toContain('withdrawn');
    for (const u of [id, gone]) {
      expect(await db('uploads').where({ id: u }).first('accuracy_class', 'sigma_m')).toEqual({ accuracy_class: 'unknown', sigma_m: 5 });
      expect(await audits(u)).toEqual([]);
    }
  });
});
