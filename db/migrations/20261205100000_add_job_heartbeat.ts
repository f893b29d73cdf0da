import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // A job row follows its copy in the queue (pg-boss) by id, and a running job beats every few seconds, so a
  // sweep can tell a job still at work from one whose worker or database went away.
  await knex.schema.alterTable('jobs', (t) => {
    t.uuid('queue_job_id');
    t.timestamp('heartbeat_at', { useTz: true });
  });
  await knex.raw("create index jobs_unfinished_idx on jobs (created_at) where status in ('queued', 'running')");
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index jobs_unfinished_idx');
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('queue_job_id');
    t.dropColumn('heartbeat_at');
  });
}
