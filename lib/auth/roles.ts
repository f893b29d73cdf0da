/**
 * Roles and what each may do. Rights come from the role; visibility comes from the organisation
 * (see `canSeeProject`). `can('engineer', 'project.read') === true`.
 */
export const ROLES = ['admin', 'engineer', 'surveyor', 'owner', 'maintenance'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  engineer: 'Engineer',
  surveyor: 'Surveyor',
  owner: 'Network owner',
  maintenance: 'Maintenance',
};

export const ORG_KINDS = ['owner', 'contractor'] as const;
export type OrgKind = (typeof ORG_KINDS)[number];

const ALL: readonly Role[] = ROLES;

/** Each action and the roles allowed to do it. */
export const PERMISSIONS = {
  'project.read': ALL,
  'project.manage': ['admin'],
  'user.manage': ['admin'],
  'audit.read': ['admin'],
  'audit.export': ['admin'],
  'job.read': ALL,
  'token.manage': ALL,
  'upload.read': ALL,
  'upload.create': ['admin', 'engineer', 'surveyor'],
  'upload.manage': ['admin', 'engineer', 'surveyor'],
  'crs.read': ALL,
  'plan.read': ALL,
  'plan.import': ['admin', 'engineer'],
  'reconcile.run': ['admin', 'engineer'],
  'section.read': ALL,
  'section.review': ['admin', 'engineer'],
  'section.correct': ['admin', 'engineer'],
  // trench records (ducts, depths, crossings, pits, photos, restoration, production): the contractor's
  // surveyors and engineers write them (routes add side: 'contractor'), everyone who sees the project reads
  'record.read': ALL,
  'record.write': ['admin', 'engineer', 'surveyor'],
  // catalogues (duct sizes, colour sequences, utility kinds, backfill materials) per project
  'catalogue.manage': ['admin', 'engineer'],
  'check.read': ALL,
  // the address register and households passed: admins and engineers import, the contractor's people record
  // drops as installed (routes add side: 'contractor'), everyone who sees the project reads
  'address.read': ALL,
  'address.import': ['admin', 'engineer'],
  'address.connect': ['admin', 'engineer', 'surveyor'],
  // handover packages: the contractor's admins and engineers build them (side: 'contractor'), the owner's
  // people accept or return them (side: 'owner'), everyone who sees the project reads and downloads
  'handover.read': ALL,
  'handover.build': ['admin', 'engineer'],
  'handover.review': ['admin', 'owner'],
  // the last e-mails the server sent (the local fake SMTP server's inbox in development)
  'mail.read': ['admin'],
  // the duct lookup at an address, across every project the organisation sees
  'lookup.read': ALL,
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;

export function can(role: Role, action: Action): boolean {
  return (PERMISSIONS[action] as readonly Role[]).includes(role);
}

export interface ProjectOrgs {
  ownerOrgId: string;
  contractorOrgId: string;
}

/** A user sees a project when their organisation is its owner or its contractor. */
export function canSeeProject(organisationId: string, project: ProjectOrgs): boolean {
  return project.ownerOrgId === organisationId || project.contractorOrgId === organisationId;
}
