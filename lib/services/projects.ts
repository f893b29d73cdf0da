import { z } from 'zod';
import type { Knex } from 'knex';
import { findOrganisationByName, getOrganisation, type Organisation } from '@/db/organisations';
import { getProject, insertProject, sridExists, updateProject, type Project, type ProjectValues } from '@/db/projects';
import { writeAudit } from '@/db/audit';
import { colourSequenceOfProject, copyCatalogueTemplates } from '@/db/catalogues';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { OrgKind } from '@/lib/auth/roles';

import { ACCURACY_CLASSES } from '@/lib/records/accuracy-classes';
import { RANGES, rangedNumber } from '@/lib/records/plausible-ranges';
import { householdSettingsSchema } from '@/lib/records/household-settings';
import { recordSettingsSchema } from '@/lib/records/record-settings';
import { requestHouseholds } from './households';

const timeZones = new Set<string>([...Intl.supportedValuesOf('timeZone'), 'UTC']);

const extentSchema = z
  .tuple([z.number().min(-180).max(180), z.number().min(-90).max(90), z.number().min(-180).max(180), z.number().min(-90).max(90)])
  .refine(([w, , e]) => w < e, 'West must be less than east (extents across the antimeridian are not supported).')
  .refine(([, s, , n]) => s < n, 'South must be less than north.');

// '25832' and 'EPSG:25832' both name the grid: surveyors often type the bare code
const crsSchema = z
  .string()
  .trim()
  .regex(/^(EPSG:)?\d{4,6}$/i, 'Give the EPSG code of the grid, e.g. 25832 or EPSG:25832.')
  .transform((s) => Number(s.replace(/^EPSG:/i, '')));

const sigmasSchema = z.partialRecord(z.enum(ACCURACY_CLASSES), rangedNumber(RANGES.sigmaM));

const PARTNER_MOVED = 'The network owner and the contractor change only by a proposal that the other organisation confirms (POST /api/projects/{id}/org-changes).';

const settingsShape = {
  name: z.string().trim().min(1, 'Name the project.').max(200),
  /** the partner organisation, picked from the registered ones: its id, or its exact name (API clients) */
  partnerOrganisationId: z.uuid('Pick the partner organisation from the list.').optional(),
  partnerOrganisation: z.string().trim().min(1).max(200).optional(),
  areaName: z.string().trim().max(200).default(''),
  defaultCrs: crsSchema.default(4326),
  extent: extentSchema.nullable().default(null),
  timeZone: z.string().refine((tz) => timeZones.has(tz), 'Unknown time zone; use an IANA name such as Europe/Berlin.').default('UTC'),
  unitSystem: z.enum(['metric', 'imperial']).default('metric'),
  minCoverDepthM: rangedNumber(RANGES.minCoverDepthM).default(0.3),
  lateralToleranceM: rangedNumber(RANGES.lateralToleranceM).default(0.5),
  defaultAccuracyClass: z.enum(ACCURACY_CLASSES).default('unknown'),
  accuracySigmas: sigmasSchema.default({}),
};

export const createProjectSchema = z
  .object(settingsShape)
  .refine((v) => v.partnerOrganisationId !== undefined || v.partnerOrganisation !== undefined, {
    message: 'Pick the partner organisation from the list.',
    path: ['partnerOrganisationId'],
  });
export const updateProjectSchema = z
  .object({
    name: settingsShape.name,
    areaName: z.string().trim().max(200),
    defaultCrs: crsSchema,
    extent: extentSchema.nullable(),
    timeZone: z.string().refine((tz) => timeZones.has(tz), 'Unknown time zone; use an IANA name such as Europe/Berlin.'),
    unitSystem: settingsShape.unitSystem.unwrap(),
    minCoverDepthM: rangedNumber(RANGES.minCoverDepthM),
    lateralToleranceM: rangedNumber(RANGES.lateralToleranceM),
    defaultAccuracyClass: z.enum(ACCURACY_CLASSES),
    accuracySigmas: sigmasSchema,
    records: recordSettingsSchema,
    households: householdSettingsSchema,
    // named only to be refused: a typed name once moved the project to a new (misspelt) organisation
    partnerOrganisation: z.unknown(),
    partnerOrganisationId: z.unknown(),
    ownerOrgId: z.unknown(),
    contractorOrgId: z.unknown(),
  })
  .partial()
  .superRefine((v, ctx) => {
    for (const k of ['partnerOrganisation', 'partnerOrganisationId', 'ownerOrgId', 'contractorOrgId'] as const) {
      if (v[k] !== undefined) ctx.addIssue({ code: 'custom', path: [k], message: PARTNER_MOVED });
    }
  });

type CreateInput = z.infer<typeof createProjectSchema>;
type UpdateInput = z.infer<typeof updateProjectSchema>;

const partnerKind = (own: OrgKind): OrgKind => (own === 'owner' ? 'contractor' : 'owner');

/** The picked partner organisation; refuses an unknown one (nothing is created here) or one of the wrong side. */
async function resolvePartner(trx: Knex.Transaction, actor: Principal, input: { partnerOrganisationId?: string; partnerOrganisation?: string }): Promise<string> {
  const kind = partnerKind(actor.organisationKind);
  const side = kind === 'owner' ? 'network owner' : 'contractor';
  const path = input.partnerOrganisationId !== undefined ? 'partnerOrganisationId' : 'partnerOrganisation';
  let found: Organisation | undefined;
  if (input.partnerOrganisationId !== undefined) found = await getOrganisation(trx, input.partnerOrganisationId);
  else if (input.partnerOrganisation !== undefined) found = await findOrganisationByName(trx, input.partnerOrganisation);
  if (!found) {
    const what = input.partnerOrganisationId !== undefined ? 'That organisation' : `"${input.partnerOrganisation}"`;
    throw new AppError('invalid', `${what} is not a registered organisation: pick the ${side} from the list, or register it first.`, [
      { path, message: `Pick a registered ${side}, or register it first.` },
    ]);
  }
  if (found.id === actor.organisationId || found.kind !== kind) {
    throw new AppError('invalid', `"${found.name}" cannot be the partner: the partner must be a ${side}.`, [{ path, message: `Pick a ${side} organisation.` }]);
  }
  return found.id;
}

async function checkSrid(trx: Knex.Transaction, srid: number | undefined): Promise<void> {
  if (srid !== undefined && !(await sridExists(trx, srid))) {
    throw new AppError('invalid', `EPSG:${srid} is not in the coordinate system catalogue.`, [
      { path: 'defaultCrs', message: `EPSG:${srid} is not in the catalogue.` },
    ]);
  }
}

function auditView(p: Project) {
  const { createdAt: _c, updatedAt: _u, ...rest } = p;
  return rest;
}

async function guardUniqueName(err: unknown, name: string): Promise<never> {
  if ((err as { code?: string }).code === '23505') {
    throw new AppError('conflict', `A project named "${name}" already exists for this network owner.`, [
      { path: 'name', message: 'This name is taken.' },
    ]);
  }
  throw err;
}

/** Creates a project of the admin's organisation with the picked partner organisation. */
export async function createProject(db: Knex, actor: Principal, input: CreateInput): Promise<Project> {
  return db
    .transaction(async (trx) => {
      await checkSrid(trx, input.defaultCrs);
      const partnerId = await resolvePartner(trx, actor, input);
      const own = actor.organisationId;
      const values: ProjectValues = {
        name: input.name,
        ownerOrgId: actor.organisationKind === 'owner' ? own : partnerId,
        contractorOrgId: actor.organisationKind === 'contractor' ? own : partnerId,
        areaName: input.areaName,
        defaultSrid: input.defaultCrs,
        extent: input.extent,
        timeZone: input.timeZone,
        unitSystem: input.unitSystem,
        minCoverDepthM: input.minCoverDepthM,
        lateralToleranceM: input.lateralToleranceM,
        defaultAccuracyClass: input.defaultAccuracyClass,
        accuracySigmas: input.accuracySigmas,
      };
      const created = await insertProject(trx, values);
      await copyCatalogueTemplates(trx, created.id);
      const project = (await getProject(trx, created.id))!;
      await writeAudit(trx, auditActor(actor), {
        projectId: project.id,
        objectType: 'project',
        objectId: project.id,
        action: 'create',
        after: auditView(project),
      });
      return project;
    })
    .catch((e) => guardUniqueName(e, input.name));
}

export async function changeProject(db: Knex, actor: Principal, projectId: string, input: UpdateInput): Promise<Project> {
  return db
    .transaction(async (trx) => {
      const before = (await getProject(trx, projectId))!;
      await checkSrid(trx, input.defaultCrs);
      const patch: Partial<ProjectValues> = {
        name: input.name,
        areaName: input.areaName,
        defaultSrid: input.defaultCrs,
        extent: input.extent,
        timeZone: input.timeZone,
        unitSystem: input.unitSystem,
        minCoverDepthM: input.minCoverDepthM,
        lateralToleranceM: input.lateralToleranceM,
        defaultAccuracyClass: input.defaultAccuracyClass,
        accuracySigmas: input.accuracySigmas,
        records: input.records,
        households: input.households,
      };
      if (input.records?.colourSequenceId && !(await colourSequenceOfProject(trx, projectId, input.records.colourSequenceId))) {
        throw new AppError('invalid', 'That colour sequence is not in this project\'s catalogue.', [{ path: 'records.colourSequenceId', message: 'Pick a colour sequence of this project.' }]);
      }
      const after = await updateProject(trx, projectId, patch);
      await writeAudit(trx, auditActor(actor), {
        projectId,
        objectType: 'project',
        objectId: projectId,
        action: 'update',
        before: auditView(before),
        after: auditView(after),
      });
      return after;
    })
    .catch((e) => guardUniqueName(e, input.name ?? ''))
    .then(async (after) => {
      // the rule's distances changed: households passed are derived again
      const h = input.households;
      if (h && Object.values(h).some((v) => v !== undefined)) await requestHouseholds(db, projectId, actor.id);
      return after;
    });
}
