import type { Knex } from 'knex';

// E-mail (issue 16, helper E2). `mail_outbox`: every message the server means to send, written in the same
// transaction as the change it tells of (a package issued, accepted or returned; an invitation link), and
// sent afterwards by the worker's mail loop with retries, so a restart or an SMTP hiccup loses nothing.
// `mail_received`: what the local fake SMTP server (development and tests, no SMTP configured) received,
// kept in the database so it survives a restart of the fake server.

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('mail_outbox', (t) => {
    t.bigIncrements('id');
    // what it tells of: handover_issued, handover_accepted, handover_returned, invitation, reset
    t.text('kind').notNullable();
    t.specificType('to_addresses', 'text[]').notNullable();
    t.text('subject').notNullable();
    t.text('body').notNullable();
    t.uuid('project_id').references('id').inTable('projects').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('last_error');
    t.timestamp('sent_at', { useTz: true });
    // after this many failed attempts the message is given up (kept, with its last error, for the admin)
    t.boolean('given_up').notNullable().defaultTo(false);
    t.text('message_id');
    t.check('cardinality(to_addresses) >= 1', [], 'mail_outbox_to_check');
    t.index(['sent_at', 'given_up', 'next_attempt_at'], 'mail_outbox_due_idx');
  });
  await knex.schema.createTable('mail_received', (t) => {
    t.bigIncrements('id');
    t.text('envelope_from').notNullable().defaultTo('');
    t.specificType('envelope_to', 'text[]').notNullable();
    t.text('subject').notNullable().defaultTo('');
    t.text('body').notNullable().defaultTo('');
    t.text('raw').notNullable();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['received_at'], 'mail_received_at_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_received');
  await knex.schema.dropTable('mail_outbox');
}
