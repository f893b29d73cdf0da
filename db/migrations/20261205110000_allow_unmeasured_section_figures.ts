import type { Knex } from 'knex';

// A not-built stretch has no offset and no position accuracy, and an unplanned line has no plan to be
// offset from: those figures were stored as 0, which reads as a perfect measurement. They become NULL.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sections', (t) => {
    t.double('max_offset_m').nullable().alter();
    t.double('p95_offset_m').nullable().alter();
    t.double('accuracy_m').nullable().alter();
  });
  await knex('sections').where({ status: 'not_built' }).update({ max_offset_m: null, p95_offset_m: null, accuracy_m: null });
  await knex('sections').where({ status: 'unplanned' }).update({ max_offset_m: null, p95_offset_m: null });
}

export async function down(knex: Knex): Promise<void> {
  await knex('sections').whereNull('max_offset_m').update({ max_offset_m: 0 });
  await knex('sections').whereNull('p95_offset_m').update({ p95_offset_m: 0 });
  await knex('sections').whereNull('accuracy_m').update({ accuracy_m: 0 });
  await knex.schema.alterTable('sections', (t) => {
    t.double('max_offset_m').notNullable().alter();
    t.double('p95_offset_m').notNullable().alter();
    t.double('accuracy_m').notNullable().alter();
  });
}
