import type { Knex } from 'knex';

// An address import is the whole register by default (addresses missing from the file are marked removed);
// a partial import only adds and updates. The import keeps which it was.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('address_imports', (t) => {
    t.boolean('partial').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('address_imports', (t) => {
    t.dropColumn('partial');
  });
}
