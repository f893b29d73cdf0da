import type { Knex } from 'knex';

// The plausible ranges of lib/records/plausible-ranges.ts (RANGES), repeated here because a migration
// imports nothing from app code and must keep meaning what it meant when it landed. Chainages are
// checked where people type them (zod) only: stored ones come from sections the matcher derived.
const TOL = [0.05, 50];
const COVER = [0.05, 2];
const SIGMA = [0.005, 100];

const clamp = (v: number, [lo, hi]: number[]) => Math.min(hi, Math.max(lo, v));
// knex.raw reads a bare ? as a binding: \\? is the jsonpath filter's question mark
const sigmaPath = `'$.* \\? (@.type() != "number" || @ < ${SIGMA[0]} || @ > ${SIGMA[1]})'`;

export async function up(knex: Knex): Promise<void> {
  // Rows stored before the ranges existed are brought into range first, each with an audit entry, so
  // that a project whose σ was 1e-320 stops giving sections an accuracy of 0.
  const projects = await knex('projects').select('id', 'owner_org_id', 'min_cover_depth_m', 'lateral_tolerance_m', 'accuracy_sigmas');
  for (const p of projects) {
    const sigmas: Record<string, unknown> = p.accuracy_sigmas ?? {};
    const fixedSigmas = Object.fromEntries(Object.entries(sigmas).filter(([, v]) => typeof v === 'number' && Number.isFinite(v)).map(([k, v]) => [k, clamp(v as number, SIGMA)]));
    const after = { minCoverDepthM: clamp(p.min_cover_depth_m, COVER), lateralToleranceM: clamp(p.lateral_tolerance_m, TOL), accuracySigmas: fixedSigmas };
    const before = { minCoverDepthM: p.min_cover_depth_m, lateralToleranceM: p.lateral_tolerance_m, accuracySigmas: sigmas };
    if (JSON.stringify(before) === JSON.stringify(after)) continue;
    await knex('projects').where({ id: p.id }).update({ min_cover_depth_m: after.minCoverDepthM, lateral_tolerance_m: after.lateralToleranceM, accuracy_sigmas: JSON.stringify(fixedSigmas) });
    await knex('audit_log').insert({
      actor_label: 'Trenchbook (plausible ranges brought in)', organisation_id: p.owner_org_id, project_id: p.id, object_type: 'project', object_id: p.id,
      action: 'update', before: JSON.stringify(before), after: JSON.stringify(after),
    });
  }
  await knex('uploads').where('sigma_m', '<', SIGMA[0]).update({ sigma_m: SIGMA[0] });
  await knex('uploads').where('sigma_m', '>', SIGMA[1]).update({ sigma_m: SIGMA[1] });
  await knex('section_corrections').where('sigma_m', '<', SIGMA[0]).update({ sigma_m: SIGMA[0] });
  await knex('section_corrections').where('sigma_m', '>', SIGMA[1]).update({ sigma_m: SIGMA[1] });

  await knex.raw(`ALTER TABLE projects
    ADD CONSTRAINT projects_lateral_tolerance_range CHECK (lateral_tolerance_m BETWEEN ${TOL[0]} AND ${TOL[1]}),
    ADD CONSTRAINT projects_min_cover_depth_range CHECK (min_cover_depth_m BETWEEN ${COVER[0]} AND ${COVER[1]}),
    ADD CONSTRAINT projects_accuracy_sigmas_range CHECK (jsonb_typeof(accuracy_sigmas) = 'object' AND NOT jsonb_path_exists(accuracy_sigmas, ${sigmaPath}))`);
  await knex.raw(`ALTER TABLE uploads ADD CONSTRAINT uploads_sigma_range CHECK (sigma_m BETWEEN ${SIGMA[0]} AND ${SIGMA[1]})`);
  await knex.raw(`ALTER TABLE section_corrections ADD CONSTRAINT section_corrections_sigma_range CHECK (sigma_m IS NULL OR sigma_m BETWEEN ${SIGMA[0]} AND ${SIGMA[1]})`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE section_corrections DROP CONSTRAINT section_corrections_sigma_range');
  await knex.raw('ALTER TABLE uploads DROP CONSTRAINT uploads_sigma_range');
  await knex.raw('ALTER TABLE projects DROP CONSTRAINT projects_accuracy_sigmas_range, DROP CONSTRAINT projects_min_cover_depth_range, DROP CONSTRAINT projects_lateral_tolerance_range');
}
