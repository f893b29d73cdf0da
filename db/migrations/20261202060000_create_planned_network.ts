import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // each import of the design is a version; routes are known by their reference across versions
  await knex.schema.createTable('plan_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('version').notNullable();
    t.text('file_name').notNullable();
    t.text('sha256').notNullable();
    t.text('format').notNullable();
    t.text('crs').notNullable();
    t.jsonb('mapping').notNullable();
    t.boolean('mapping_guessed').notNullable();
    t.jsonb('changes').notNullable();
    t.jsonb('diagnostics').notNullable();
    t.jsonb('warnings').notNullable().defaultTo('[]');
    t.integer('route_count').notNullable();
    t.double('length_m').notNullable();
    t.uuid('imported_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'version'], { indexName: 'plan_versions_project_version_unique' });
  });

  await knex.schema.createTable('plan_version_files', (t) => {
    t.bigIncrements('id');
    t.uuid('plan_version_id').notNullable().references('id').inTable('plan_versions').onDelete('CASCADE');
    t.text('file_name').notNullable();
    t.text('storage_key').notNullable();
    t.text('sha256').notNullable();
    t.bigInteger('size_bytes').notNullable();
    t.index(['plan_version_id'], 'plan_version_files_version_idx');
  });

  await knex.schema.createTable('planned_routes', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('ref').notNullable();
    t.text('street');
    t.text('ducts');
    t.text('kind').notNullable().checkIn(['street', 'crossing'], 'planned_routes_kind_check');
    t.specificType('geom', 'geometry(LineString, 4326)').notNullable();
    t.double('length_m').notNullable();
    t.integer('first_version').notNullable();
    t.integer('geometry_version').notNullable();
    // set when a revision drops the route: it stays, flagged, with everything recorded against it
    t.integer('removed_in_version');
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'ref'], { indexName: 'planned_routes_project_ref_unique' });
  });
  await knex.raw('CREATE INDEX planned_routes_geom_gist ON planned_routes USING GIST (geom)');

  // every geometry a route has had, by version, so a revision's reshaping can be shown and undone
  await knex.schema.createTable('planned_route_history', (t) => {
    t.bigIncrements('id');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.integer('version').notNullable();
    t.text('change').notNullable().checkIn(['added', 'reshaped', 'retagged', 'removed', 'restored'], 'planned_route_history_change_check');
    t.specificType('geom', 'geometry(LineString, 4326)').notNullable();
    t.text('street');
    t.text('ducts');
    t.text('kind').notNullable();
    t.index(['route_id', 'version'], 'planned_route_history_route_version_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('planned_route_history');
  await knex.schema.dropTable('planned_routes');
  await knex.schema.dropTable('plan_version_files');
  await knex.schema.dropTable('plan_versions');
}
