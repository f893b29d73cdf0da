import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import type { Principal } from '@/lib/auth/principal';
import { backfillMaterialPatchSchema, backfillMaterialSchema, colourSequenceSchema, ductSizePatchSchema, ductSizeSchema, utilityKindPatchSchema, utilityKindSchema } from '@/lib/records/catalogue-schemas';
import { ductBundleSchema } from '@/lib/records/duct-schemas';
import { addBackfillMaterial, addColourSequence, addDuctSize, addUtilityKind, changeBackfillMaterial, changeDuctSize, changeUtilityKind, projectCatalogues } from '@/lib/services/catalogues';
import { createDuctBundle } from '@/lib/services/duct-bundles';
import { importPlan } from '@/lib/services/planned';
import { changeProject, createProject, createProjectSchema, updateProjectSchema } from '@/lib/services/projects';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// Editing a project's catalogues: the contractor's admins and engineers add and retire; everyone who sees
// the project reads; nothing is deleted; every change is audited.
const db = getDb();
let project: Project;
let otherProject: Project;
let admin: Principal;
let engineer: Principal;
let surveyor: Principal;
let ownerAdmin: Principal;
let otherEngineer: Principal;
let routeId: string;

async function makeProject(name: string) {
  const a = await makePrincipal(db, 'admin', 'contractor');
  const partner = await registerPartner(db, a, `${name} owner ${Date.now()}`);
  const p = (await getProject(db, (await createProject(db, a, createProjectSchema.parse({ name: `${name} ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  return { admin: a, partner, project: p };
}

/** A refusal: its code and message, and not one catalogue row or audit entry more. */
async function refused(work: () => Promise<unknown>, code: string, message: RegExp) {
  const tables = ['duct_sizes', 'colour_sequences', 'colour_sequence_entries', 'utility_kinds', 'backfill_materials', 'audit_log'];
  const before = await Promise.all(tables.map((t) => count(db, t)));
  const err = (await work().catch((e: unknown) => e)) as AppError;
  expect(err).toBeInstanceOf(AppError);
  expect(err.code).toBe(code);
  expect(err.message).toMatch(message);
  expect(await Promise.all(tables.map((t) => count(db, t)))).toEqual(before);
}
const issues = (schema: { safeParse: (v: unknown) => { error?: { issues: { path: PropertyKey[]; message: string }[] } } }, v: unknown) =>
  schema.safeParse(v).error?.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
const lastAudit = async (objectId: string) => db('audit_log').where({ object_id: objectId }).orderBy('id', 'desc').first();

beforeAll(async () => {
  const m = await makeProject('Catalogues');
  project = m.project;
  admin = m.admin;
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  ownerAdmin = await makePrincipal(db, 'admin', 'owner', m.partner);
  const o = await makeProject('Other catalogues');
  otherProject = o.project;
  otherEngineer = await makePrincipal(db, 'engineer', 'contractor', o.admin.organisationName);
  const design = { type: 'Feature', properties: { ref: 'C-1' }, geometry: { type: 'LineString', coordinates: [[9.171, 52.141], [9.172, 52.141]] } };
  const form = await formOf([{ name: 'design.geojson', bytes: JSON.stringify(design) }]);
  try {
    await importPlan(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
  routeId = (await db('planned_routes').where({ project_id: project.id }).first('id')).id;
});

afterAll(async () => {
  await closeDb();
});

describe('reading the catalogues', () => {
  it("gives the project's own copies of all four, and its colour sequence", async () => {
    const c = await projectCatalogues(db, project);
    expect(c.ductSizes.map((s) => `${s.outerMm}/${s.innerMm}`)).toEqual(['7/4', '7/3.5', '10/8', '10/6', '12/8', '14/10', '16/12']);
    expect(c.colourSequences.map((s) => s.name)).toEqual(['TIA-598 (12 colours)']);
    expect(c.colourSequenceId).toBe(c.colourSequences[0].id);
    expect(c.utilityKinds.map((k) => k.key)).toEqual(['water', 'sewer', 'gas', 'power', 'telecom', 'district_heating', 'other']);
    expect(c.backfillMaterials[0].label).toBe('Crushed stone 4–8 mm');
  });
});

describe('duct sizes', () => {
  let sizeId: string;
  it('adds a size with an audit entry', async () => {
    const s = await addDuctSize(db, engineer, project, ductSizeSchema.parse({ outerMm: 8, innerMm: 5.5 }));
    sizeId = s.id;
    expect(s).toMatchObject({ outerMm: 8, innerMm: 5.5, common: false, retired: false });
    expect(await lastAudit(s.id)).toMatchObject({ object_type: 'duct_size', action: 'create', after: { size: '8/5.5 mm', common: false, retired: false } });
  });

  it('refuses bad fields, a size it already has, and people who do not keep the catalogue', async () => {
    expect(issues(ductSizeSchema, { outerMm: 7, innerMm: 7 })).toEqual(['innerMm: The inner diameter must be below the outer.']);
    expect(issues(ductSizeSchema, { outerMm: 0, innerMm: 1 })).toContain('outerMm: The outer diameter must be above 0 mm.');
    expect(issues(ductSizeSchema, { outerMm: '7', innerMm: 4 })).toEqual(['outerMm: The outer diameter must be a number of millimetres.']);
    expect(issues(ductSizePatchSchema, {})).toEqual([': Nothing to change: send retired, common or label.']);
    await refused(() => addDuctSize(db, engineer, project, ductSizeSchema.parse({ outerMm: 7, innerMm: 4 })), 'conflict', /already has 7\/4 mm/);
    await refused(() => addDuctSize(db, surveyor, project, ductSizeSchema.parse({ outerMm: 9, innerMm: 6 })), 'forbidden', /Your role \(surveyor\) may not do this/);
    await refused(() => addDuctSize(db, ownerAdmin, project, ductSizeSchema.parse({ outerMm: 9, innerMm: 6 })), 'forbidden', /kept by the contractor's admins and engineers/);
  });

  it('retires a size: forms no longer take it for a new bundle; bringing it back works', async () => {
    const s = await changeDuctSize(db, admin, project, sizeId, { retired: true, common: true });
    expect(s).toMatchObject({ retired: true, common: true });
    expect(await lastAudit(sizeId)).toMatchObject({ action: 'update', before: { retired: false, common: false }, after: { retired: true, common: true } });
    const input = ductBundleSchema.parse({ routeId, fromChainageM: 0, toChainageM: 20, ducts: [{ ductSizeId: sizeId, colourPosition: 1, purpose: 'feeder' }], tracerWire: false, warningTape: true, protectiveFill: false });
    await expect(createDuctBundle(db, surveyor, project, input)).rejects.toThrow(/the size 8\/5\.5 mm is retired from the catalogue/);
    await changeDuctSize(db, engineer, project, sizeId, { retired: false });
    expect((await createDuctBundle(db, surveyor, project, input)).ducts[0]).toMatchObject({ outerMm: 8, innerMm: 5.5 });
  });

  it('does not find a size of another project', async () => {
    await refused(() => changeDuctSize(db, otherEngineer, otherProject, sizeId, { retired: true }), 'not_found', /No such duct size/);
    const scope = byProjectRecord('duct_sizes', 'sizeId');
    expect(await scope({ projectId: otherProject.id, sizeId }, db)).toBeUndefined();
    expect(await scope({ projectId: project.id, sizeId }, db)).toEqual({ projectId: project.id });
  });
});

describe('colour sequences', () => {
  it('adds a sequence; chosen as the project’s, new bundles take their colours from it', async () => {
    const seq = await addColourSequence(db, engineer, project, colourSequenceSchema.parse({ name: 'Four-colour site code', repeatMarking: 'tracer', colours: [{ name: 'red', hex: '#D22B2B' }, { name: 'green', hex: '#1e8c3a' }, { name: 'blue', hex: '#1f5fbf' }, { name: 'white', hex: '#f4f4f4' }] }));
    expect(seq.colours.map((c) => [c.position, c.name, c.hex])).toEqual([[1, 'red', '#d22b2b'], [2, 'green', '#1e8c3a'], [3, 'blue', '#1f5fbf'], [4, 'white', '#f4f4f4']]);
    expect(await lastAudit(seq.id)).toMatchObject({ object_type: 'colour_sequence', action: 'create', after: { name: 'Four-colour site code', colours: ['red', 'green', 'blue', 'white'] } });
    project = await changeProject(db, admin, project.id, updateProjectSchema.parse({ records: { colourSequenceId: seq.id } }));
    const input = (colourPosition: number) => ductBundleSchema.parse({ routeId, fromChainageM: 30, toChainageM: 40, ducts: [{ outerMm: 7, innerMm: 4, colourPosition, purpose: 'spare' }], tracerWire: false, warningTape: true, protectiveFill: false });
    await expect(createDuctBundle(db, surveyor, project, input(9))).rejects.toThrow(/the sequence Four-colour site code names colours 1–8/);
    const b = await createDuctBundle(db, surveyor, project, input(5));
    expect(b.ducts[0]).toMatchObject({ colourLabel: 'red with tracer', colourHex: '#d22b2b', colourMarking: 'tracer' });
    expect(b.colourSequenceId).toBe(seq.id);
  });

  it('refuses bad sequences and a name it already has', async () => {
    const base = { name: 'X', repeatMarking: 'stripe', colours: [{ name: 'red', hex: '#d22b2b' }] };
    expect(issues(colourSequenceSchema, { ...base, colours: [{ name: 'red', hex: 'red' }] })).toEqual(['colours.0.hex: Give the colour as #rrggbb, e.g. #1f5fbf.']);
    expect(issues(colourSequenceSchema, { ...base, colours: [] })).toEqual(['colours: List at least one colour.']);
    expect(issues(colourSequenceSchema, { ...base, colours: [base.colours[0], base.colours[0]] })).toEqual(['colours: Each colour appears once in a sequence.']);
    expect(issues(colourSequenceSchema, { ...base, repeatMarking: 'dots' })).toEqual(['repeatMarking: Say how positions after the last colour are marked: stripe or tracer.']);
    expect(issues(colourSequenceSchema, { ...base, name: ' ' })).toEqual(['name: Name the sequence.']);
    await refused(() => addColourSequence(db, engineer, project, colourSequenceSchema.parse({ ...base, name: 'tia-598 (12 COLOURS)' })), 'conflict', /already has a sequence called/);
    await refused(() => addColourSequence(db, surveyor, project, colourSequenceSchema.parse(base)), 'forbidden', /surveyor/);
  });
});

describe('utility kinds and backfill materials', () => {
  it('adds and relabels or retires a utility kind, each audited', async () => {
    const k = await addUtilityKind(db, engineer, project, utilityKindSchema.parse({ key: 'street_lighting', label: 'Street lighting' }));
    expect((await projectCatalogues(db, project)).utilityKinds.at(-1)).toMatchObject({ key: 'street_lighting', label: 'Street lighting', retired: false });
    const changed = await changeUtilityKind(db, admin, project, k.id, utilityKindPatchSchema.parse({ label: 'Street lighting cable', retired: true }));
    expect(changed).toMatchObject({ label: 'Street lighting cable', retired: true });
    expect(await lastAudit(k.id)).toMatchObject({ object_type: 'utility_kind', action: 'update', before: { label: 'Street lighting', retired: false } });
    expect(issues(utilityKindSchema, { key: 'Street Lighting', label: 'x' })).toEqual(['key: A key is lower-case letters, digits and _, starting with a letter (at most 40).']);
    expect(issues(utilityKindSchema, { key: 'ok', label: '' })).toEqual(['label: Give the label.']);
    await refused(() => addUtilityKind(db, engineer, project, utilityKindSchema.parse({ key: 'gas', label: 'Gas again' })), 'conflict', /already has the kind gas/);
    await refused(() => changeUtilityKind(db, otherEngineer, otherProject, k.id, { retired: false }), 'not_found', /No such utility kind/);
  });

  it('adds and retires a backfill material, refusing a label it already has', async () => {
    const m = await addBackfillMaterial(db, engineer, project, backfillMaterialSchema.parse({ label: 'Recycled glass sand' }));
    expect(await lastAudit(m.id)).toMatchObject({ object_type: 'backfill_material', action: 'create', after: { label: 'Recycled glass sand' } });
    await refused(() => addBackfillMaterial(db, engineer, project, backfillMaterialSchema.parse({ label: 'crushed stone 4–8 MM' })), 'conflict', /already has crushed stone/);
    await refused(() => changeBackfillMaterial(db, engineer, project, m.id, backfillMaterialPatchSchema.parse({ label: 'Fine sand' })), 'conflict', /already has Fine sand/);
    expect(await changeBackfillMaterial(db, engineer, project, m.id, backfillMaterialPatchSchema.parse({ retired: true }))).toMatchObject({ label: 'Recycled glass sand', retired: true });
    await refused(() => addBackfillMaterial(db, ownerAdmin, project, backfillMaterialSchema.parse({ label: 'Anything' })), 'forbidden', /contractor's admins and engineers/);
    await refused(() => changeBackfillMaterial(db, otherEngineer, otherProject, m.id, { retired: false }), 'not_found', /No such backfill material/);
  });
});
