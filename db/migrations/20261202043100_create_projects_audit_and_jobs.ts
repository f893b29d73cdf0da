import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('projects', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.uuid('owner_org_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.uuid('contractor_org_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.text('area_name').notNullable().defaultTo('');
    t.integer('default_srid').notNullable().defaultTo(4326);
    t.specificType('extent', 'geometry(Polygon, 4326)');
    t.text('time_zone').notNullable().defaultTo('UTC');
    t.text('unit_system').notNullable().defaultTo('metric').checkIn(['metric', 'imperial'], 'projects_unit_system_check');
    t.double('min_cover_depth_m').notNullable().defaultTo(0.3);
    t.double('lateral_tolerance_m').notNullable().defaultTo(0.5);
    t.text('default_accuracy_class')
      .notNullable()
      .defaultTo('unknown')
      .checkIn(['handheld_gnss', 'rtk_gnss', 'total_station', 'digitised', 'unknown'], 'projects_accuracy_class_check');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['owner_org_id'], 'projects_owner_org_idx');
    t.index(['contractor_org_id'], 'projects_contractor_org_idx');
  });
  await knex.raw('CREATE UNIQUE INDEX projects_owner_name_unique ON projects (owner_org_id, lower(name))');
  await knex.raw('CREATE INDEX projects_extent_gist ON projects USING GIST (extent)');

  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid('actor_user_id').references('id').inTable('users').onDelete('SET NULL');
    t.text('actor_label').notNullable();
    t.uuid('organisation_id').references('id').inTable('organisations').onDelete('SET NULL');
    t.uuid('project_id').references('id').inTable('projects').onDelete('CASCADE');
    t.text('object_type').notNullable();
    t.text('object_id').notNullable();
    t.text('action').notNullable();
    t.jsonb('before');
    t.jsonb('after');
    t.index(['project_id', 'at'], 'audit_log_project_at_idx');
    t.index(['organisation_id', 'at'], 'audit_log_organisation_at_idx');
  });

  await knex.schema.createTable('jobs', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('kind').notNullable();
    t.text('status')
      .notNullable()
      .defaultTo('queued')
      .checkIn(['queued', 'running', 'completed', 'failed'], 'jobs_status_check');
    t.double('progress').notNullable().defaultTo(0);
    t.text('message').notNullable().defaultTo('');
    t.jsonb('input').notNullable().defaultTo('{}');
    t.jsonb('result');
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('started_at', { useTz: true });
    t.timestamp('finished_at', { useTz: true });
    t.index(['project_id', 'created_at'], 'jobs_project_created_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('jobs');
  await knex.schema.dropTable('audit_log');
  await knex.schema.dropTable('projects');
}
