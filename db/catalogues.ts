import type { Db } from './client';

// The catalogues of the trench records. Rows with project_id NULL are the templates (seeded by migration
// 20261205130000) that every new project copies; a project's own rows are what its forms offer.

export interface DuctSize {
  id: string;
  outerMm: number;
  innerMm: number;
  common: boolean;
  retired: boolean;
}

export interface ColourEntry {
  position: number;
  name: string;
  hex: string;
}

export interface ColourSequence {
  id: string;
  name: string;
  standard: string;
  repeatMarking: 'stripe' | 'tracer';
  colours: ColourEntry[];
}

export interface UtilityKind {
  id: string;
  key: string;
  label: string;
  retired: boolean;
}

export interface BackfillMaterial {
  id: string;
  label: string;
  retired: boolean;
}

/** Gives a new project its own copy of every catalogue template, and the first colour sequence. */
export async function copyCatalogueTemplates(db: Db, projectId: string): Promise<void> {
  await db.raw('INSERT INTO duct_sizes (project_id, outer_mm, inner_mm, common) SELECT ?, outer_mm, inner_mm, common FROM duct_sizes WHERE project_id IS NULL AND NOT retired', [projectId]);
  await db.raw('INSERT INTO utility_kinds (project_id, key, label, sort) SELECT ?, key, label, sort FROM utility_kinds WHERE project_id IS NULL AND NOT retired', [projectId]);
  await db.raw('INSERT INTO backfill_materials (project_id, label, sort) SELECT ?, label, sort FROM backfill_materials WHERE project_id IS NULL AND NOT retired', [projectId]);
  const templates: { id: string; name: string; standard: string; repeat_marking: string }[] = await db('colour_sequences').whereNull('project_id').orderBy('name');
  let first: string | null = null;
  for (const s of templates) {
    const [row] = await db('colour_sequences').insert({ project_id: projectId, name: s.name, standard: s.standard, repeat_marking: s.repeat_marking }).returning('id');
    await db.raw('INSERT INTO colour_sequence_entries (sequence_id, position, name, hex) SELECT ?, position, name, hex FROM colour_sequence_entries WHERE sequence_id = ?', [row.id, s.id]);
    first ??= row.id;
  }
  await db('projects').where({ id: projectId }).update({ colour_sequence_id: first });
}

export async function listDuctSizes(db: Db, projectId: string): Promise<DuctSize[]> {
  const rows = await db('duct_sizes').where({ project_id: projectId }).orderBy([{ column: 'outer_mm' }, { column: 'inner_mm', order: 'desc' }]);
  return rows.map((r) => ({ id: r.id, outerMm: r.outer_mm, innerMm: r.inner_mm, common: r.common, retired: r.retired }));
}

export async function listColourSequences(db: Db, projectId: string): Promise<ColourSequence[]> {
  const seqs = await db('colour_sequences').where({ project_id: projectId }).orderBy('name');
  if (seqs.length === 0) return [];
  const entries = await db('colour_sequence_entries').whereIn('sequence_id', seqs.map((s) => s.id)).orderBy(['sequence_id', 'position']);
  return seqs.map((s) => ({
    id: s.id,
    name: s.name,
    standard: s.standard,
    repeatMarking: s.repeat_marking,
    colours: entries.filter((e) => e.sequence_id === s.id).map((e) => ({ position: e.position, name: e.name, hex: e.hex })),
  }));
}

/** The sequence if it belongs to the project. */
export async function colourSequenceOfProject(db: Db, projectId: string, id: string): Promise<ColourSequence | undefined> {
  return (await listColourSequences(db, projectId)).find((s) => s.id === id);
}

export async function listUtilityKinds(db: Db, projectId: string): Promise<UtilityKind[]> {
  const rows = await db('utility_kinds').where({ project_id: projectId }).orderBy(['sort', 'label']);
  return rows.map((r) => ({ id: r.id, key: r.key, label: r.label, retired: r.retired }));
}

export async function listBackfillMaterials(db: Db, projectId: string): Promise<BackfillMaterial[]> {
  const rows = await db('backfill_materials').where({ project_id: projectId }).orderBy(['sort', 'label']);
  return rows.map((r) => ({ id: r.id, label: r.label, retired: r.retired }));
}
