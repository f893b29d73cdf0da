import type { Knex } from 'knex';

// The ground the trench records stand on: the project's record settings, each person's unit choice, and
// the catalogues (duct sizes, colour sequences, utility kinds, backfill materials). A catalogue row with
// project_id NULL is the template that every new project copies; a project's own rows are edited by its
// admins and engineers. Values are repeated here (a migration imports nothing from app code).

// Usual microduct sizes, outer/inner mm [practice]: 7, 14 and 16 mm outer are the most common.
const DUCT_SIZES: [number, number, boolean][] = [
  [7, 4, true], [7, 3.5, true], [10, 6, false], [10, 8, false], [12, 8, false], [14, 10, true], [16, 12, true],
];

// TIA-598 (Optical Fiber Cable Color Coding), positions 1–12 in order; 13–24 repeat them with a stripe or
// tracer. The hex values are our screen renderings, not part of the standard.
const TIA_598: [string, string][] = [
  ['blue', '#1f5fbf'], ['orange', '#f08a00'], ['green', '#1e8c3a'], ['brown', '#7a4a1e'], ['slate', '#708090'], ['white', '#f4f4f4'],
  ['red', '#d22b2b'], ['black', '#1a1a1a'], ['yellow', '#f2d21b'], ['violet', '#7d3cb5'], ['rose', '#f19cbb'], ['aqua', '#3fc6d4'],
];

const UTILITY_KINDS: [string, string][] = [
  ['water', 'Water'], ['sewer', 'Sewer'], ['gas', 'Gas'], ['power', 'Power'], ['telecom', 'Telecom'], ['district_heating', 'District heating'], ['other', 'Other'],
];

// Common backfill and bedding materials in micro-trenching [practice].
const BACKFILL: string[] = ['Crushed stone 4–8 mm', 'Crushed stone 2–5 mm', 'Fine sand', 'Flowable fill (lean mix)'];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('duct_sizes', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').references('id').inTable('projects').onDelete('CASCADE');
    t.double('outer_mm').notNullable();
    t.double('inner_mm').notNullable();
    t.boolean('common').notNullable().defaultTo(false);
    t.boolean('retired').notNullable().defaultTo(false);
    t.check('inner_mm > 0 AND inner_mm < outer_mm AND outer_mm <= 100', [], 'duct_sizes_range');
    t.index(['project_id'], 'duct_sizes_project_idx');
  });
  await knex.raw('CREATE UNIQUE INDEX duct_sizes_project_size_unique ON duct_sizes (COALESCE(project_id, \'00000000-0000-0000-0000-000000000000\'::uuid), outer_mm, inner_mm)');

  await knex.schema.createTable('colour_sequences', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').references('id').inTable('projects').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('standard').notNullable().defaultTo('');
    // what marks positions beyond the sequence's length: the base colour repeated with a stripe or a tracer
    t.text('repeat_marking').notNullable().defaultTo('stripe').checkIn(['stripe', 'tracer'], 'colour_sequences_marking_check');
    t.index(['project_id'], 'colour_sequences_project_idx');
  });
  await knex.schema.createTable('colour_sequence_entries', (t) => {
    t.bigIncrements('id');
    t.uuid('sequence_id').notNullable().references('id').inTable('colour_sequences').onDelete('CASCADE');
    t.integer('position').notNullable();
    t.text('name').notNullable();
    t.text('hex').notNullable();
    t.check('position >= 1', [], 'colour_sequence_entries_position_check');
    t.check("hex ~ '^#[0-9a-f]{6}$'", [], 'colour_sequence_entries_hex_check');
    t.unique(['sequence_id', 'position'], { indexName: 'colour_sequence_entries_seq_position_unique' });
  });

  await knex.schema.createTable('utility_kinds', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').references('id').inTable('projects').onDelete('CASCADE');
    t.text('key').notNullable();
    t.text('label').notNullable();
    t.integer('sort').notNullable().defaultTo(0);
    t.boolean('retired').notNullable().defaultTo(false);
    t.index(['project_id'], 'utility_kinds_project_idx');
  });
  await knex.raw('CREATE UNIQUE INDEX utility_kinds_project_key_unique ON utility_kinds (COALESCE(project_id, \'00000000-0000-0000-0000-000000000000\'::uuid), key)');

  await knex.schema.createTable('backfill_materials', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').references('id').inTable('projects').onDelete('CASCADE');
    t.text('label').notNullable();
    t.integer('sort').notNullable().defaultTo(0);
    t.boolean('retired').notNullable().defaultTo(false);
    t.index(['project_id'], 'backfill_materials_project_idx');
  });
  await knex.raw('CREATE UNIQUE INDEX backfill_materials_project_label_unique ON backfill_materials (COALESCE(project_id, \'00000000-0000-0000-0000-000000000000\'::uuid), label)');

  // the templates (project_id NULL)
  await knex('duct_sizes').insert(DUCT_SIZES.map(([o, i, common]) => ({ project_id: null, outer_mm: o, inner_mm: i, common })));
  const [tia] = await knex('colour_sequences').insert({ project_id: null, name: 'TIA-598 (12 colours)', standard: 'TIA-598', repeat_marking: 'stripe' }).returning('id');
  await knex('colour_sequence_entries').insert(TIA_598.map(([name, hex], i) => ({ sequence_id: tia.id, position: i + 1, name, hex })));
  await knex('utility_kinds').insert(UTILITY_KINDS.map(([key, label], i) => ({ project_id: null, key, label, sort: i })));
  await knex('backfill_materials').insert(BACKFILL.map((label, i) => ({ project_id: null, label, sort: i })));

  // The record settings. Defaults: a slot about 24 mm wide and 480 mm deep [practice]; hot bituminous
  // material laid at about 195 °C [practice], ±15 °C; 3 compaction passes [practice]; the rest are our own
  // starting values for an admin to set.
  await knex.schema.alterTable('projects', (t) => {
    t.integer('trench_width_mm').notNullable().defaultTo(24);
    t.integer('trench_depth_mm').notNullable().defaultTo(480);
    t.double('min_clearance_m').notNullable().defaultTo(0.3);
    t.double('gap_threshold_m').notNullable().defaultTo(5);
    t.integer('restoration_max_delay_min').notNullable().defaultTo(60);
    t.double('laying_temp_target_c').notNullable().defaultTo(195);
    t.double('laying_temp_tolerance_c').notNullable().defaultTo(15);
    t.integer('compaction_passes_default').notNullable().defaultTo(3);
    t.integer('surface_thickness_mm').notNullable().defaultTo(40);
    t.uuid('colour_sequence_id').references('id').inTable('colour_sequences').onDelete('SET NULL');
  });
  await knex.raw(`ALTER TABLE projects
    ADD CONSTRAINT projects_trench_width_range CHECK (trench_width_mm BETWEEN 5 AND 300),
    ADD CONSTRAINT projects_trench_depth_range CHECK (trench_depth_mm BETWEEN 50 AND 2000),
    ADD CONSTRAINT projects_min_clearance_range CHECK (min_clearance_m BETWEEN 0 AND 5),
    ADD CONSTRAINT projects_gap_threshold_range CHECK (gap_threshold_m BETWEEN 0.5 AND 1000),
    ADD CONSTRAINT projects_restoration_delay_range CHECK (restoration_max_delay_min BETWEEN 1 AND 10080),
    ADD CONSTRAINT projects_laying_temp_range CHECK (laying_temp_target_c BETWEEN 80 AND 300 AND laying_temp_tolerance_c BETWEEN 1 AND 100),
    ADD CONSTRAINT projects_compaction_passes_range CHECK (compaction_passes_default BETWEEN 0 AND 20),
    ADD CONSTRAINT projects_surface_thickness_range CHECK (surface_thickness_mm BETWEEN 5 AND 500)`);

  await knex.schema.alterTable('users', (t) => {
    // a person's own choice of units; NULL follows the project's
    t.text('unit_system').checkIn(['metric', 'imperial'], 'users_unit_system_check');
  });

  // every existing project gets its own copy of the templates
  const projects: { id: string }[] = await knex('projects').select('id');
  for (const p of projects) await copyTemplates(knex, p.id);
}

/** Same statements as db/catalogues.ts's copyCatalogueTemplates, frozen here. */
async function copyTemplates(knex: Knex, projectId: string): Promise<void> {
  await knex.raw('INSERT INTO duct_sizes (project_id, outer_mm, inner_mm, common) SELECT ?, outer_mm, inner_mm, common FROM duct_sizes WHERE project_id IS NULL AND NOT retired', [projectId]);
  await knex.raw('INSERT INTO utility_kinds (project_id, key, label, sort) SELECT ?, key, label, sort FROM utility_kinds WHERE project_id IS NULL AND NOT retired', [projectId]);
  await knex.raw('INSERT INTO backfill_materials (project_id, label, sort) SELECT ?, label, sort FROM backfill_materials WHERE project_id IS NULL AND NOT retired', [projectId]);
  const templates: { id: string; name: string; standard: string; repeat_marking: string }[] = await knex('colour_sequences').whereNull('project_id').orderBy('name');
  let first: string | null = null;
  for (const s of templates) {
    const [row] = await knex('colour_sequences').insert({ project_id: projectId, name: s.name, standard: s.standard, repeat_marking: s.repeat_marking }).returning('id');
    await knex.raw('INSERT INTO colour_sequence_entries (sequence_id, position, name, hex) SELECT ?, position, name, hex FROM colour_sequence_entries WHERE sequence_id = ?', [row.id, s.id]);
    first ??= row.id;
  }
  await knex('projects').where({ id: projectId }).update({ colour_sequence_id: first });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => t.dropColumn('unit_system'));
  await knex.raw(`ALTER TABLE projects
    DROP CONSTRAINT projects_trench_width_range, DROP CONSTRAINT projects_trench_depth_range, DROP CONSTRAINT projects_min_clearance_range,
    DROP CONSTRAINT projects_gap_threshold_range, DROP CONSTRAINT projects_restoration_delay_range, DROP CONSTRAINT projects_laying_temp_range,
    DROP CONSTRAINT projects_compaction_passes_range, DROP CONSTRAINT projects_surface_thickness_range`);
  await knex.schema.alterTable('projects', (t) => {
    for (const c of ['trench_width_mm', 'trench_depth_mm', 'min_clearance_m', 'gap_threshold_m', 'restoration_max_delay_min', 'laying_temp_target_c', 'laying_temp_tolerance_c', 'compaction_passes_default', 'surface_thickness_mm', 'colour_sequence_id']) t.dropColumn(c);
  });
  await knex.schema.dropTable('backfill_materials');
  await knex.schema.dropTable('utility_kinds');
  await knex.schema.dropTable('colour_sequence_entries');
  await knex.schema.dropTable('colour_sequences');
  await knex.schema.dropTable('duct_sizes');
}
