import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getJob } from '@/db/jobs';
import { stopBoss } from '@/lib/jobs/boss';
import { recomputeHouseholds, requestHouseholds } from '@/lib/services/households';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';
import { sleep, startWorker, waitFor, type Proc } from './processes';

const db = getDb();
const workers: Proc[] = [];
let plan: RecordPlan;
const N = 200_000;

/** The derived columns as they stand: how many passed, and when they were last worked out. */
const derived = async () => {
  const r = await db('addresses').where({ project_id: plan.project.id }).select(db.raw('count(*) filter (where passed)::int as passed, count(distinct computed_at)::int as runs, max(computed_at) as at')).first();
  return { passed: r.passed as number, runs: r.runs as number, at: (r.at as Date).toISOString() };
};

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Households faults', [9.51, 52.51]);
  // many addresses along S-1 (0–200 m, 5–20 m north), so that a recompute runs long enough to be killed
  const [[w0, s0], [e1, n1]] = [plan.at(0, 5), plan.at(200, 20)];
  await db.raw(
    `INSERT INTO addresses (project_id, key, street, number, units, geom)
     SELECT ?::uuid, 'F-' || g, 'Test Street', g::text, 1,
       ST_SetSRID(ST_MakePoint(?::float8 + ?::float8 * ((g::bigint * 7919) % ?::int)::float8 / ?::int, ?::float8 + ?::float8 * ((g::bigint * 104729) % 997)::float8 / 997), 4326)
     FROM generate_series(1, ?::int) g`,
    [plan.project.id, w0, e1 - w0, N, N, s0, n1 - s0, N],
  );
  // built 0–100 m of S-1: about half the addresses are passed
  const wkt = `LINESTRING(${[plan.at(0, 0), plan.at(100, 0)].map((p) => p.join(' ')).join(',')})`;
  await db('sections').insert({ project_id: plan.project.id, planned_route_ref: 'S-1', status: 'as_planned', from_chainage_m: 0, to_chainage_m: 100, geom: db.raw('ST_GeomFromText(?, 4326)', [wkt]), length_m: 100, max_offset_m: 0.1, p95_offset_m: 0.1, accuracy_m: 0.02, first_run: 1, last_run: 1 });
  await recomputeHouseholds(db, plan.project.id, async () => {});
});
afterAll(async () => {
  for (const w of workers) await w.stop();
  await stopBoss();
  await closeDb();
});

describe('a households recompute whose worker is killed', () => {
  it('leaves the derived columns as they were (one transaction), is failed by the sweep, and the next request recomputes', async () => {
    const before = await derived();
    expect(before.runs).toBe(1);
    expect(before.passed).toBeGreaterThan(N * 0.4);
    expect(before.passed).toBeLessThan(N * 0.6);
    // the whole street is built now: the next complete run passes every address
    await db('sections').where({ project_id: plan.project.id }).update({ to_chainage_m: 200 });

    const w1 = await startWorker();
    workers.push(w1);
    const job = await requestHouseholds(db, plan.project.id, null);
    // killed while it writes: the UPDATE of the derived columns has begun inside the transaction
    await waitFor('the recompute to write', async () => (await getJob(db, job.id))?.message?.startsWith('Writing'), 120_000, 20);
    await sleep(150);
    await w1.kill9();
    expect((await getJob(db, job.id))?.status).toBe('running');
    expect(await derived()).toEqual(before);

    const w2 = await startWorker();
    workers.push(w2);
    const failed = await waitFor('the sweep to fail the job', async () => {
      const j = await getJob(db, job.id);
      return j?.status === 'failed' ? j : undefined;
    }, 30_000, 200);
    expect(failed.message).toMatch(/worker or the database went away/);
    expect(await derived()).toEqual(before);

    const again = await requestHouseholds(db, plan.project.id, null);
    const done = await waitFor('the next recompute to end', async () => {
      const j = await getJob(db, again.id);
      return j?.status === 'completed' || j?.status === 'failed' ? j : undefined;
    }, 120_000, 250);
    expect(done.status, done.message).toBe('completed');
    const after = await derived();
    expect(after.passed).toBe(N);
    expect(after.runs).toBe(1);
    expect(after.at > before.at).toBe(true);
    await w2.stop();
  });
});
