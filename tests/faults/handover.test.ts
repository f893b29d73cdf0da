import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getJob } from '@/db/jobs';
import { loadPrincipal } from '@/lib/auth/principal';
import { stopBoss } from '@/lib/jobs/boss';
import { createHandover, createHandoverSchema } from '@/lib/services/handovers';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { getProject, type Project } from '@/db/projects';
import { sleep, startWorker, waitFor, type Proc } from './processes';

// The handover build (issue 16) whose worker is killed mid-build: the package ends failed with the sweep's
// reason, and the store holds no file of it, whole or half-written.

const db = getDb();
let project: Project;
let engineerId: string;
const workers: Proc[] = [];

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  engineerId = engineer.id;
  const partner = await registerPartner(db, admin, `Handover fault owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Handover faults ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  // 6,000 approved sections: enough that building takes seconds
  await db.raw(
    `insert into sections (project_id, planned_route_ref, status, from_chainage_m, to_chainage_m, geom, length_m, accuracy_m, laid_on, first_run, last_run, review)
     select ?, null, 'unplanned', 0, 15, ST_SetSRID(ST_MakeLine(ST_MakePoint(9.9 + i * 0.0002, 52.9), ST_MakePoint(9.9 + i * 0.0002, 52.90013)), 4326), 15, 0.05, '2026-11-03', 1, 1, 'approved'
       from generate_series(1, 6000) i`, [project.id]);
});
afterAll(async () => {
  for (const w of workers) await w.stop();
  await stopBoss();
  await closeDb();
});

describe('a handover build whose worker is killed', () => {
  it('kill -9 mid-build: the package is failed with a reason after the sweep, and no file of it is stored', async () => {
    const w1 = await startWorker();
    workers.push(w1);
    const engineer = (await loadPrincipal(db, engineerId))!;
    const out = await createHandover(db, engineer, project, createHandoverSchema.parse({ scope: {} }));
    await waitFor('the build to be under way', async () => (await getJob(db, out.job.id))?.status === 'running' && ((await getJob(db, out.job.id))?.progress ?? 0) > 0.05, 60_000, 50);
    await sleep(200);
    await w1.kill9();
    expect((await db('handovers').where({ id: out.handover.id }).first()).status).toBe('building');

    const w2 = await startWorker();
    workers.push(w2);
    const row = await waitFor('the sweep to fail the package', async () => {
      const h = await db('handovers').where({ id: out.handover.id }).first();
      return h.status === 'failed' ? h : undefined;
    }, 60_000, 250);
    expect(row.failure_reason).toMatch(/The build stopped: .*worker or the database went away/);
    expect(row.storage_key).toBeNull();
    expect(row.sha256).toBeNull();
    const folder = path.join(process.env.STORAGE_DIR!, 'handovers', project.id);
    // nothing of it in the store: neither the ZIP nor a half-written .part
    expect(existsSync(folder) ? readdirSync(folder, { recursive: true }) : []).toEqual([]);
    expect((await db('audit_log').where({ object_id: out.handover.id }).select('action')).map((a: { action: string }) => a.action).sort()).toEqual(['build', 'fail']);
    await w2.stop();
  });
});
