import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { closeDb, getDb } from '@/db/client';
import { getJob } from '@/db/jobs';
import { enqueueJob, startWorkers } from '@/lib/jobs/queue';
import { stopBoss } from '@/lib/jobs/boss';
import { changeProject, createProject, createProjectSchema } from '@/lib/services/projects';
import { makePrincipal, registerPartner } from '../helpers/fixtures';

const db = getDb();

beforeAll(async () => {
  await startWorkers(db);
});
afterAll(async () => {
  await stopBoss();
  await closeDb();
});

async function waitFor(jobId: string) {
  for (let i = 0; i < 100; i++) {
    const job = await getJob(db, jobId);
    if (job && (job.status === 'completed' || job.status === 'failed')) return job;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('job did not finish within 20 s');
}

describe('job queue (pg-boss, in-process worker)', () => {
  it('runs an audit export to completion and the CSV parses with an independent reader', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const project = await createProject(db, admin, createProjectSchema.parse({ name: 'Job test, "quoted"', partnerOrganisation: await registerPartner(db, admin, `Owner ${Date.now()}`) }));
    for (const t of [0.6, 0.7, 0.9]) await changeProject(db, admin, project.id, { lateralToleranceM: t });

    const queued = await enqueueJob(db, { projectId: project.id, kind: 'audit-export', createdBy: admin.id });
    expect(queued.status).toBe('queued');
    const done = await waitFor(queued.id);
    expect(done.status).toBe('completed');
    expect(done.progress).toBe(1);
    expect(done.result!.rows).toBe(4);

    const file = path.join(process.env.EXPORTS_DIR!, String(done.result!.storageKey));
    // Python's csv module (RFC 4180 dialect) is the independent reader
    const parsed = JSON.parse(
      execFileSync('python3', ['-c', 'import csv,json,sys; print(json.dumps(list(csv.DictReader(open(sys.argv[1], newline="")))))', file], { encoding: 'utf8' }),
    ) as Record<string, string>[];
    expect(parsed).toHaveLength(4);
    expect(parsed.map((r) => r.action)).toEqual(['create', 'update', 'update', 'update']);
    expect(JSON.parse(parsed[3].after).lateralToleranceM).toBe(0.9);
    expect(JSON.parse(parsed[0].after).name).toBe('Job test, "quoted"');
    expect((await readFile(file, 'utf8')).split('\n')[0]).toBe('id,at,actor,object_type,object_id,action,before,after');
  });

  it('records a failure with its message', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const project = await createProject(db, admin, createProjectSchema.parse({ name: 'Failing job', partnerOrganisation: await registerPartner(db, admin, `Contractor ${Date.now()}`) }));
    const [row] = await db('jobs').insert({ project_id: project.id, kind: 'no-such-kind', created_by: admin.id }).returning('id');
    const { runJob } = await import('@/lib/jobs/queue');
    await runJob(db, row.id);
    const job = await getJob(db, row.id);
    expect(job!.status).toBe('failed');
    expect(job!.message).toContain('no-such-kind');
  });
});
