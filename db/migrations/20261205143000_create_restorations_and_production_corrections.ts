import type { Knex } from 'knex';

// Surface restoration and daily production (issue 14).
// A restoration is the reinstatement of one stretch of the slot: edges cleaned, crushed-stone backfill
// compacted, hot bituminous material laid. Its laying temperatures are several readings of their own.
// Daily production is derived from the records; what a person corrects by hand is kept beside it with the
// reason (the derived figure stays visible), newest correction first.

function stamps(knex: Knex, t: Knex.CreateTableBuilder): void {
  t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
  t.uuid('updated_by').references('id').inTable('users').onDelete('SET NULL');
  t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('restorations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.double('from_chainage_m').notNullable();
    t.double('to_chainage_m').notNullable();
    t.timestamp('restored_at', { useTz: true }).notNullable();
    t.uuid('backfill_material_id').references('id').inTable('backfill_materials').onDelete('SET NULL');
    t.integer('compaction_passes').notNullable();
    t.integer('required_thickness_mm').notNullable();
    t.integer('laid_thickness_mm');
    t.timestamp('edges_cleaned_at', { useTz: true });
    t.timestamp('surface_laid_at', { useTz: true });
    t.text('crew').notNullable().defaultTo('');
    t.text('note').notNullable().defaultTo('');
    stamps(knex, t);
    t.check('from_chainage_m >= 0 AND to_chainage_m > from_chainage_m', [], 'restorations_stretch_check');
    t.check('compaction_passes >= 0 AND compaction_passes <= 20', [], 'restorations_passes_range');
    t.check('required_thickness_mm >= 5 AND required_thickness_mm <= 500', [], 'restorations_required_thickness_range');
    t.check('laid_thickness_mm IS NULL OR (laid_thickness_mm >= 1 AND laid_thickness_mm <= 500)', [], 'restorations_laid_thickness_range');
    t.check('edges_cleaned_at IS NULL OR surface_laid_at IS NULL OR surface_laid_at >= edges_cleaned_at', [], 'restorations_order_check');
    t.index(['project_id', 'route_id', 'from_chainage_m'], 'restorations_project_route_chainage_idx');
    t.index(['project_id', 'restored_at'], 'restorations_project_restored_at_idx');
    t.index(['backfill_material_id'], 'restorations_backfill_material_idx');
  });

  await knex.schema.createTable('restoration_temperatures', (t) => {
    t.bigIncrements('id');
    t.uuid('restoration_id').notNullable().references('id').inTable('restorations').onDelete('CASCADE');
    t.timestamp('measured_at', { useTz: true });
    t.double('temp_c').notNullable();
    t.check('temp_c >= 0 AND temp_c <= 400', [], 'restoration_temperatures_range');
    t.index(['restoration_id'], 'restoration_temperatures_restoration_idx');
  });

  await knex.schema.createTable('production_corrections', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.date('day').notNullable();
    t.text('crew').notNullable().defaultTo('');
    t.text('quantity').notNullable().checkIn(['sawn_m', 'laid_m', 'backfilled_m', 'restored_m', 'crossings', 'pits'], 'production_corrections_quantity_check');
    t.double('value').notNullable();
    t.text('reason').notNullable();
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.check('value >= 0 AND value <= 100000', [], 'production_corrections_value_range');
    t.check("length(btrim(reason)) > 0", [], 'production_corrections_reason_check');
    t.index(['project_id', 'day'], 'production_corrections_project_day_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('production_corrections');
  await knex.schema.dropTableIfExists('restoration_temperatures');
  await knex.schema.dropTableIfExists('restorations');
}
