import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getJob } from '@/db/jobs';
import { stopBoss } from '@/lib/jobs/boss';
import { requestReconciliation } from '@/lib/services/reconcile';
import { count } from '../helpers/fixtures';
import { projectWithLongWalk } from './fixture';
import { sh, sleep, startWorker, waitFor, type Proc } from './processes';

const db = getDb();
let projectId: string;
const workers: Proc[] = [];

beforeAll(async () => {
  projectId = (await projectWithLongWalk(db)).project.id;
});
afterAll(async () => {
  for (const w of workers) await w.stop();
  await stopBoss();
  await closeDb();
});

const status = async (id: string) => (await getJob(db, id))?.status;
const sectionsOf = () => db('sections').where({ project_id: projectId }).count<{ n: number }[]>('* as n').then(([r]) => Number(r.n));

describe('a reconciliation whose worker or database is killed ends failed with a reason, never stuck', () => {
  it('kill -9 of the worker mid-run: the row is failed by the next worker, nothing half-stored, and the next run completes', async () => {
    const w1 = await startWorker();
    workers.push(w1);
    const job = await requestReconciliation(db, projectId, null);
    await waitFor('the job to run', async () => (await status(job.id)) === 'running');
    await sleep(300);
    await w1.kill9();
    // what happened before this fix: the row says running, and nothing would ever change it
    expect(await status(job.id)).toBe('running');
    const runsBefore = await count(db, 'reconcile_runs');
    expect(await sectionsOf()).toBe(0);

    const w2 = await startWorker();
    workers.push(w2);
    const failed = await waitFor('the sweep to fail the job', async () => {
      const j = await getJob(db, job.id);
      return j?.status === 'failed' ? j : undefined;
    }, 30_000, 200);
    expect(failed.message).toMatch(/worker or the database went away/);
    expect(failed.finishedAt).not.toBeNull();
    // the killed run committed nothing
    expect(await count(db, 'reconcile_runs')).toBe(runsBefore);
    expect(await sectionsOf()).toBe(0);

    const again = await requestReconciliation(db, projectId, null);
    const done = await waitFor('the next run to complete', async () => {
      const j = await getJob(db, again.id);
      return j?.status === 'completed' || j?.status === 'failed' ? j : undefined;
    }, 120_000, 250);
    expect(done.status).toBe('completed');
    expect(await sectionsOf()).toBeGreaterThan(0);
    await w2.stop();
  });

  it('PostgreSQL killed mid-run: once it is back the row ends failed with a reason, and the same worker runs the next job', async () => {
    const worker = await startWorker();
    workers.push(worker);
    const job = await requestReconciliation(db, projectId, null);
    await waitFor('the job to run', async () => (await status(job.id)) === 'running', 60_000);
    await sleep(300);
    sh(['kill']);
    await sleep(1500);
    sh(['start']);
    await db.destroy(); // the test's own pool held connections to the killed server
    await db.initialize();
    const ended = await waitFor('the job to end', async () => {
      const j = await getJob(db, job.id);
      return j?.status === 'failed' || j?.status === 'completed' ? j : undefined;
    }, 60_000, 250).catch(async (err) => {
      console.log('WORKER OUTPUT', workers.at(-1)!.output().slice(-3000), await db('jobs').where({ id: job.id }).first());
      throw err;
    });
    expect(ended.status).toBe('failed');
    expect(ended.message.length).toBeGreaterThan(10);

    expect(worker.child.exitCode).toBeNull();
    const next = await requestReconciliation(db, projectId, null);
    const done = await waitFor('the next run to complete', async () => {
      const j = await getJob(db, next.id);
      return j?.status === 'completed' || j?.status === 'failed' ? j : undefined;
    }, 120_000, 250);
    expect(done.status).toBe('completed');
    // A completed reconciliation queues the households recompute after it: that follow-up must end too,
    // and no job of the project is left queued or running.
    const open = () => db('jobs').where({ project_id: projectId }).whereIn('status', ['queued', 'running'])
      .count<{ n: number }[]>('* as n').then(([r]) => Number(r.n));
    await waitFor('every follow-up job of the project to end', async () => ((await open()) === 0 ? true : undefined), 60_000, 250);
    expect(await open()).toBe(0);
    const followUps = await db('jobs').where({ project_id: projectId, kind: 'households' }).where('created_at', '>=', next.createdAt ?? new Date(0));
    expect(followUps.length).toBeGreaterThan(0);
    expect(followUps.map((j) => j.status)).not.toContain('failed');
  });
});
