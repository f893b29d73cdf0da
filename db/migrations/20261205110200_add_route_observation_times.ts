import type { Knex } from 'knex';

// The time of each matched observation (epoch seconds, NULL where the fix had none), beside its chainage
// and offset: the section page shows when a stretch was walked, to pick a range to leave out.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('route_observations', (t) => {
    t.specificType('time_s', 'double precision[]');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('route_observations', (t) => {
    t.dropColumn('time_s');
  });
}
