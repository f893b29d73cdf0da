import type { Knex } from 'knex';

// Road crossings and photos (issue 14).
// A road crossing is the short cut across the street to a house, sawn before the lengthways cut. Its record
// hangs on the plan's crossing route (a stretch, normally the whole route); one record a route, and a
// crossing route without one is "not built yet". A photo is a point record: placed from its EXIF GPS
// position, by hand, or at a chainage, and optionally attached to a crossing or a test pit. Its original is
// kept byte for byte in the originals store (key and SHA-256 here), beside a small JPEG thumbnail.

function stamps(knex: Knex, t: Knex.CreateTableBuilder): void {
  t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
  t.uuid('updated_by').references('id').inTable('users').onDelete('SET NULL');
  t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('road_crossings', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.double('from_chainage_m').notNullable();
    t.double('to_chainage_m').notNullable();
    t.boolean('built').notNullable().defaultTo(false);
    t.date('built_on');
    // measured on site; the plan's length is the route's
    t.double('length_m');
    t.boolean('sawn_before_main');
    t.integer('duct_count');
    t.uuid('duct_size_id').references('id').inTable('duct_sizes').onDelete('SET NULL');
    // the address the crossing serves, until the address register links it properly
    t.text('address_ref');
    t.text('note').notNullable().defaultTo('');
    stamps(knex, t);
    t.check('from_chainage_m >= 0 AND to_chainage_m > from_chainage_m', [], 'road_crossings_stretch_check');
    t.check('built OR built_on IS NULL', [], 'road_crossings_built_on_check');
    t.check('length_m IS NULL OR (length_m > 0 AND length_m <= 500)', [], 'road_crossings_length_range');
    t.check('duct_count IS NULL OR (duct_count >= 1 AND duct_count <= 48)', [], 'road_crossings_duct_count_range');
    t.unique(['route_id'], { indexName: 'road_crossings_route_unique' });
    t.index(['project_id', 'route_id', 'from_chainage_m'], 'road_crossings_project_route_chainage_idx');
    t.index(['duct_size_id'], 'road_crossings_duct_size_idx');
  });

  await knex.schema.createTable('photos', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.double('chainage_m').notNullable();
    t.double('offset_m').notNullable().defaultTo(0);
    t.specificType('geom', 'geometry(Point, 4326)').notNullable();
    // how it was placed: its own EXIF GPS position, a position given by hand, a typed chainage, or the
    // crossing or pit it shows
    t.text('placed_by').notNullable().checkIn(['exif', 'hand', 'chainage', 'crossing', 'pit'], 'photos_placed_by_check');
    t.uuid('crossing_id').references('id').inTable('road_crossings').onDelete('SET NULL');
    // test pits live in another migration of the same issue: a plain id, checked by the service
    t.uuid('pit_id');
    t.timestamp('taken_at', { useTz: true });
    t.text('caption').notNullable().defaultTo('');
    t.text('file_name').notNullable();
    t.text('mime_type').notNullable().checkIn(['image/jpeg', 'image/png'], 'photos_mime_type_check');
    t.bigInteger('size_bytes').notNullable();
    t.text('sha256').notNullable();
    t.integer('width').notNullable();
    t.integer('height').notNullable();
    t.text('storage_key').notNullable();
    t.text('thumbnail_key').notNullable();
    stamps(knex, t);
    t.check("sha256 ~ '^[0-9a-f]{64}$'", [], 'photos_sha256_check');
    t.unique(['project_id', 'sha256'], { indexName: 'photos_project_sha256_unique' });
    t.unique(['storage_key'], { indexName: 'photos_storage_key_unique' });
    t.unique(['thumbnail_key'], { indexName: 'photos_thumbnail_key_unique' });
    t.index(['project_id', 'route_id', 'chainage_m'], 'photos_project_route_chainage_idx');
    t.index(['crossing_id'], 'photos_crossing_idx');
    t.index(['pit_id'], 'photos_pit_idx');
  });
  await knex.raw('CREATE INDEX photos_geom_gist ON photos USING GIST (geom)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('photos');
  await knex.schema.dropTableIfExists('road_crossings');
}
