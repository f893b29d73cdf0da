import { z } from 'zod';
import type { Knex } from 'knex';
import { findOrganisationByName, insertOrganisation } from '@/db/organisations';
import { getProject, insertProject, sridExists, updateProject, type Project, type ProjectValues } from '@/db/projects';
import { writeAudit } from '@/db/audit';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { OrgKind } from '@/lib/auth/roles';

import { ACCURACY_CLASSES } from '@/lib/records/accuracy-classes';

const timeZones = new Set<string>([...Intl.supportedValuesOf('timeZone'), 'UTC']);

const extentSchema = z
  .tuple([z.number().min(-180).max(180), z.number().min(-90).max(90), z.number().min(-180).max(180), z.number().min(-90).max(90)])
  .refine(([w, , e]) => w < e, 'West must be less than east (extents across the antimeridian are not supported).')
  .refine(([, s, , n]) => s < n, 'South must be less than north.');

const crsSchema = z
  .string()
  .trim()
  .regex(/^EPSG:\d{4,6}$/i, 'Give the coordinate system as EPSG:<code>, e.g. EPSG:25832.')
  .transform((s) => Number(s.split(':')[1]));

const settingsShape = {
  name: z.string().trim().min(1, 'Name the project.').max(200),
  partnerOrganisation: z.string().trim().min(2, 'Name the partner organisation.').max(200),
  areaName: z.string().trim().max(200).default(''),
  defaultCrs: crsSchema.default(4326),
  extent: extentSchema.nullable().default(null),
  timeZone: z.string().refine((tz) => timeZones.has(tz), 'Unknown time zone; use an IANA name such as Europe/Berlin.').default('UTC'),
  unitSystem: z.enum(['metric', 'imperial']).default('metric'),
  minCoverDepthM: z.number().min(0, 'Cover depth cannot be negative.').max(5, 'Cover depth over 5 m is not plausible.').default(0.3),
  lateralToleranceM: z.number().positive('Tolerance must be above zero.').max(50).default(0.5),
  defaultAccuracyClass: z.enum(ACCURACY_CLASSES).default('unknown'),
  accuracySigmas: z.partialRecord(z.enum(ACCURACY_CLASSES), z.number().positive('σ must be above zero.').max(100, 'σ over 100 m is not a survey.')).default({}),
};

export const createProjectSchema = z.object(settingsShape);
export const updateProjectSchema = z
  .object({
    name: settingsShape.name,
    partnerOrganisation: settingsShape.partnerOrganisation,
    areaName: z.string().trim().max(200),
    defaultCrs: crsSchema,
    extent: extentSchema.nullable(),
    timeZone: z.string().refine((tz) => timeZones.has(tz), 'Unknown time zone; use an IANA name such as Europe/Berlin.'),
    unitSystem: settingsShape.unitSystem.unwrap(),
    minCoverDepthM: z.number().min(0).max(5),
    lateralToleranceM: z.number().positive().max(50),
    defaultAccuracyClass: z.enum(ACCURACY_CLASSES),
    accuracySigmas: settingsShape.accuracySigmas.unwrap(),
  })
  .partial();

type CreateInput = z.infer<typeof createProjectSchema>;
type UpdateInput = z.infer<typeof updateProjectSchema>;

const partnerKind = (own: OrgKind): OrgKind => (own === 'owner' ? 'contractor' : 'owner');

/** Finds the partner organisation by name, or creates it; refuses a name that belongs to the wrong side. */
async function resolvePartner(trx: Knex.Transaction, actor: Principal, name: string): Promise<string> {
  const kind = partnerKind(actor.organisationKind);
  const found = await findOrganisationByName(trx, name);
  if (found) {
    if (found.id === actor.organisationId || found.kind !== kind) {
      throw new AppError('invalid', `"${name}" cannot be the partner: the partner must be a ${kind === 'owner' ? 'network owner' : 'contractor'}.`, [
        { path: 'partnerOrganisation', message: `Name a ${kind === 'owner' ? 'network owner' : 'contractor'} organisation.` },
      ]);
    }
    return found.id;
  }
  return (await insertOrganisation(trx, name, kind)).id;
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

/** Creates a project of the admin's organisation with the named partner (created when missing). */
export async function createProject(db: Knex, actor: Principal, input: CreateInput): Promise<Project> {
  return db
    .transaction(async (trx) => {
      await checkSrid(trx, input.defaultCrs);
      const partnerId = await resolvePartner(trx, actor, input.partnerOrganisation);
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
      const project = await insertProject(trx, values);
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
      };
      if (input.partnerOrganisation !== undefined) {
        const partnerId = await resolvePartner(trx, actor, input.partnerOrganisation);
        if (actor.organisationKind === 'owner') patch.contractorOrgId = partnerId;
        else patch.ownerOrgId = partnerId;
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
    .catch((e) => guardUniqueName(e, input.name ?? ''));
}
