import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // stretches of an upload the engineer keeps out of matching (the walk back to the van); the original keeps them
  await knex.schema.createTable('upload_exclusions', (t) => {
    t.bigIncrements('id');
    t.uuid('upload_id').notNullable().references('id').inTable('uploads').onDelete('CASCADE');
    t.text('kind').notNullable().checkIn(['time', 'distance'], 'upload_exclusions_kind_check');
    t.timestamp('from_time', { useTz: true });
    t.timestamp('to_time', { useTz: true });
    t.double('from_m');
    t.double('to_m');
    t.text('reason').notNullable();
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['upload_id'], 'upload_exclusions_upload_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('upload_exclusions');
}
