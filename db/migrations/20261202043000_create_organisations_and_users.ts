import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('organisations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.text('kind').notNullable().checkIn(['owner', 'contractor'], 'organisations_kind_check');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('CREATE UNIQUE INDEX organisations_name_lower_unique ON organisations (lower(name))');

  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.text('email').notNullable();
    t.text('name').notNullable();
    t.text('role')
      .notNullable()
      .checkIn(['admin', 'engineer', 'surveyor', 'owner', 'maintenance'], 'users_role_check');
    t.text('password_hash');
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id'], 'users_organisation_idx');
  });
  await knex.raw('CREATE UNIQUE INDEX users_email_lower_unique ON users (lower(email))');

  // One-time links: invitations to set a first password, and password resets.
  await knex.schema.createTable('user_links', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('purpose').notNullable().checkIn(['invitation', 'reset'], 'user_links_purpose_check');
    t.text('token_hash').notNullable().unique('user_links_token_hash_unique');
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('api_tokens', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('prefix').notNullable();
    t.text('token_hash').notNullable().unique('api_tokens_token_hash_unique');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_used_at', { useTz: true });
    t.timestamp('revoked_at', { useTz: true });
    t.index(['user_id'], 'api_tokens_user_idx');
  });

  await knex.schema.createTable('sign_in_attempts', (t) => {
    t.bigIncrements('id');
    t.text('email').notNullable();
    t.text('ip').notNullable();
    t.boolean('succeeded').notNullable();
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['email', 'at'], 'sign_in_attempts_email_at_idx');
    t.index(['ip', 'at'], 'sign_in_attempts_ip_at_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sign_in_attempts');
  await knex.schema.dropTable('api_tokens');
  await knex.schema.dropTable('user_links');
  await knex.schema.dropTable('users');
  await knex.schema.dropTable('organisations');
}
