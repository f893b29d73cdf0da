import type { Knex } from 'knex';

// How to reach an organisation about its network (a phone number, an e-mail, an office): the duct lookup
// shows the network owner's to a crew standing in front of its ducts. Free text; empty until an admin sets it.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('organisations', (t) => {
    t.text('contact').notNullable().defaultTo('');
    t.check('length(contact) <= 500', [], 'organisations_contact_length');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('organisations', (t) => {
    t.dropChecks(['organisations_contact_length']);
    t.dropColumn('contact');
  });
}
