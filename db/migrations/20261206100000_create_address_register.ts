import type { Knex } from 'knex';

// The address register and households passed (issue 15).
// An address is a point with a key that lasts across imports (the register's own id), its street and house
// number, and the number of households (units) in the building. Streets are their own rows so that search
// can match the street first (a few thousand names, trigram-indexed) and then the number among its
// addresses. Each import is kept with its original file; each address keeps its history (added, changed,
// removed, restored, connected). Serving route, side of the street and passed are derived by the
// households job from the plan, the built sections and the road crossings, never typed; the daily progress
// row is upserted by the same job.

export async function up(knex: Knex): Promise<void> {
  // trusted since PostgreSQL 13; the database script creates it too
  await knex.raw('CREATE EXTENSION IF NOT EXISTS pg_trgm');
  await knex.schema.alterTable('projects', (t) => {
    // how far from its serving street route an address may lie (the route found by its own street's name)
    t.double('serve_distance_m').notNullable().defaultTo(40);
    // how far a built road crossing's route-side end may lie from an address's foot point to serve it
    t.double('crossing_serve_distance_m').notNullable().defaultTo(30);
    // how far short of an address's foot point a built stretch may stop and still pass it
    t.double('foot_tolerance_m').notNullable().defaultTo(2);
    t.check('serve_distance_m >= 1 AND serve_distance_m <= 500', [], 'projects_serve_distance_range');
    t.check('crossing_serve_distance_m >= 1 AND crossing_serve_distance_m <= 200', [], 'projects_crossing_serve_distance_range');
    t.check('foot_tolerance_m >= 0 AND foot_tolerance_m <= 50', [], 'projects_foot_tolerance_range');
  });

  await knex.schema.createTable('address_imports', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('file_name').notNullable();
    t.text('sha256').notNullable();
    t.bigInteger('size_bytes').notNullable();
    // the original file, byte for byte, in the originals store
    t.text('storage_key').notNullable();
    t.text('format').notNullable().checkIn(['csv', 'geojson', 'shapefile'], 'address_imports_format_check');
    t.text('crs').notNullable();
    t.jsonb('mapping').notNullable();
    t.boolean('mapping_guessed').notNullable();
    // { rows, added, changed, removed, restored, unchanged }
    t.jsonb('counts').notNullable();
    t.jsonb('warnings').notNullable().defaultTo('[]');
    t.uuid('imported_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id', 'created_at'], 'address_imports_project_created_idx');
  });

  await knex.schema.createTable('address_streets', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('name').notNullable();
    // normalised for search and matching (lib/households/normalise.ts): lower case, no accents, common
    // abbreviations spelled out
    t.text('name_norm').notNullable();
    t.text('locality').notNullable().defaultTo('');
    t.unique(['project_id', 'name_norm', 'locality'], { indexName: 'address_streets_project_name_locality_unique' });
  });
  await knex.raw('CREATE INDEX address_streets_name_norm_trgm_idx ON address_streets USING GIN (name_norm gin_trgm_ops)');

  await knex.schema.createTable('addresses', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    // the register's own identifier: a re-import updates by it
    t.text('key').notNullable();
    t.uuid('street_id').references('id').inTable('address_streets').onDelete('SET NULL');
    t.text('street').notNullable().defaultTo('');
    // as written, with its letter or suffix ("12a", "7-9"); base and suffix for sorting and search
    t.text('number').notNullable().defaultTo('');
    t.integer('number_base');
    t.text('number_suffix').notNullable().defaultTo('');
    t.text('postcode').notNullable().defaultTo('');
    t.text('locality').notNullable().defaultTo('');
    // households (units) in the building: each dwelling of a multi-dwelling building is one premises
    t.integer('units').notNullable().defaultTo(1);
    t.text('building_type').notNullable().defaultTo('');
    t.specificType('geom', 'geometry(Point, 4326)').notNullable();
    // the design's assignment, when the import has one: the serving route's reference and the side
    t.text('design_route_ref');
    t.text('design_side').checkIn(['route', 'across'], 'addresses_design_side_check');
    // a drop recorded as installed: by hand, or imported as a flag
    t.boolean('connected').notNullable().defaultTo(false);
    t.date('connected_on');
    t.text('connected_source').checkIn(['hand', 'import'], 'addresses_connected_source_check');
    // removed by a later import: kept, with its history, and counted nowhere
    t.uuid('removed_in_import').references('id').inTable('address_imports').onDelete('SET NULL');
    t.uuid('created_in_import').references('id').inTable('address_imports').onDelete('SET NULL');
    t.uuid('updated_in_import').references('id').inTable('address_imports').onDelete('SET NULL');
    // derived by the households job
    t.uuid('serving_route_id').references('id').inTable('planned_routes').onDelete('SET NULL');
    t.text('serving_by').checkIn(['design', 'street', 'nearest'], 'addresses_serving_by_check');
    t.text('side').checkIn(['route', 'across'], 'addresses_side_check');
    t.double('foot_chainage_m');
    t.double('distance_m');
    t.boolean('passed').notNullable().defaultTo(false);
    // passed by sections that are all approved
    t.boolean('passed_approved').notNullable().defaultTo(false);
    t.uuid('passed_via_crossing_id').references('id').inTable('road_crossings').onDelete('SET NULL');
    // why not passed, in words, when it is not
    t.text('not_passed_reason');
    t.timestamp('computed_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'key'], { indexName: 'addresses_project_key_unique' });
    t.check('units >= 1 AND units <= 10000', [], 'addresses_units_range');
    t.check('connected OR connected_on IS NULL', [], 'addresses_connected_on_check');
    t.check('passed OR NOT passed_approved', [], 'addresses_passed_approved_check');
    t.index(['street_id', 'number_base'], 'addresses_street_number_idx');
    t.index(['project_id', 'serving_route_id'], 'addresses_project_serving_route_idx');
  });
  await knex.raw('CREATE INDEX addresses_geom_gist ON addresses USING GIST (geom)');

  await knex.schema.createTable('address_history', (t) => {
    t.bigIncrements('id');
    t.uuid('address_id').notNullable().references('id').inTable('addresses').onDelete('CASCADE');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('import_id').references('id').inTable('address_imports').onDelete('SET NULL');
    t.text('change').notNullable().checkIn(['added', 'changed', 'removed', 'restored', 'connected', 'disconnected'], 'address_history_change_check');
    // the fields that changed, before and after (null for added / removed)
    t.jsonb('before');
    t.jsonb('after');
    t.uuid('changed_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['address_id', 'at'], 'address_history_address_at_idx');
    t.index(['project_id', 'at'], 'address_history_project_at_idx');
  });

  // one row per project and day (the project's own calendar), upserted by every recompute of that day
  await knex.schema.createTable('household_progress', (t) => {
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.date('day').notNullable();
    t.integer('addresses').notNullable();
    t.integer('households').notNullable();
    // households of addresses that have a serving route: the plan's share is passed / served
    t.integer('households_served').notNullable();
    t.integer('addresses_passed').notNullable();
    t.integer('households_passed').notNullable();
    t.integer('households_passed_approved').notNullable();
    t.integer('addresses_connected').notNullable();
    t.integer('households_connected').notNullable();
    t.timestamp('computed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['project_id', 'day'], { constraintName: 'household_progress_pkey' });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('household_progress');
  await knex.schema.dropTable('address_history');
  await knex.schema.dropTable('addresses');
  await knex.schema.dropTable('address_streets');
  await knex.schema.dropTable('address_imports');
  await knex.schema.alterTable('projects', (t) => {
    t.dropChecks(['projects_serve_distance_range', 'projects_crossing_serve_distance_range', 'projects_foot_tolerance_range']);
    t.dropColumns('serve_distance_m', 'crossing_serve_distance_m', 'foot_tolerance_m');
  });
}
