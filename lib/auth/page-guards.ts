import { notFound } from 'next/navigation';
import { getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { isUuid } from '@/lib/api/with-route';
import { can, canSeeProject, type Action } from './roles';
import { requirePrincipal } from './session';
import type { Principal } from './principal';

/** For project pages: the same visibility (404) then role (403 → notFound-like page) rules as the API. */
export async function requireProjectPage(projectId: string, action: Action = 'project.read'): Promise<{ me: Principal; project: Project; allowed: boolean }> {
  const me = await requirePrincipal();
  const project = isUuid(projectId) ? await getProject(getDb(), projectId) : undefined;
  if (!project || !canSeeProject(me.organisationId, project)) notFound();
  return { me, project, allowed: can(me.role, action) };
}
