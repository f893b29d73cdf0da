import { NextResponse, type NextRequest } from 'next/server';
import { ZodError, type z } from 'zod';
import type { Knex } from 'knex';
import { getDb, type Db } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { can, canSeeProject, type Action } from '@/lib/auth/roles';
import type { Principal } from '@/lib/auth/principal';
import { AppError, errorBody } from './errors';
import { authenticate } from './authenticate';
import { assertNoNul, readJsonBody } from './read-body';
import { env } from '@/lib/env';

type Params = Record<string, string | string[]>;

export interface RouteContext<B, Q> {
  req: NextRequest;
  params: Record<string, string>;
  principal: Principal;
  db: Knex;
  body: B;
  query: Q;
  /** the project the route is scoped to, already checked for visibility and role */
  project: Project;
}

interface Options<B extends z.ZodType | undefined, Q extends z.ZodType | undefined> {
  /** the action the principal's role must allow */
  action: Action;
  /**
   * Resolves what the route's object belongs to: a project, or an organisation (users, tokens);
   * undefined means "not found". Omit for routes that are not about one object.
   */
  scope?: (params: Record<string, string>, db: Db) => Promise<Scope | undefined>;
  body?: B;
  query?: Q;
  /**
   * 'contractor': only people of the project's contractor organisation may do it (what was built is
   * recorded by those who built it; the owner's people read). 'owner': only the network owner's people
   * (accepting or returning a handover package). Checked after the role, 403.
   */
  side?: 'contractor' | 'owner';
}

export type Scope = { projectId: string } | { organisationId: string };

type Infer<T> = T extends z.ZodType ? z.infer<T> : undefined;

/**
 * The one wrapper for API route handlers: awaits params, authenticates (session cookie or Bearer token),
 * checks visibility (404) before role (403) for project objects, validates body and query with zod and
 * maps every error to `{"error":{"code","message"}}`.
 *
 * export const GET = withRoute({ action: 'project.read', scope: byProjectParam }, async ({ project }) => ({ project }))
 */
export function withRoute<B extends z.ZodType | undefined = undefined, Q extends z.ZodType | undefined = undefined>(
  opts: Options<B, Q>,
  handler: (ctx: RouteContext<Infer<B>, Infer<Q>>) => Promise<Response | object>,
) {
  return async (req: NextRequest, context: { params: Promise<Params> }): Promise<Response> => {
    try {
      const raw = (await context.params) ?? {};
      const params = Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v.join('/') : v]));
      const db = getDb();
      const principal = await authenticate(req, db);

      let project: Project | undefined;
      if (opts.scope) {
        const scope = await opts.scope(params, db);
        let visible = false;
        if (scope && 'projectId' in scope) {
          project = await getProject(db, scope.projectId);
          visible = project !== undefined && canSeeProject(principal.organisationId, project);
        } else if (scope) {
          visible = scope.organisationId === principal.organisationId;
        }
        if (!visible) throw new AppError('not_found', 'Not found, or not visible to your organisation.');
      }
      if (!can(principal.role, opts.action)) {
        throw new AppError('forbidden', `Your role (${principal.role}) may not do this.`);
      }
      if (opts.side === 'contractor' && project && principal.organisationId !== project.contractorOrgId) {
        throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) record what was built; the network owner's people read it.`);
      }
      if (opts.side === 'owner' && project && principal.organisationId !== project.ownerOrgId) {
        throw new AppError('forbidden', `Only the network owner's people (${project.ownerOrgName}) accept or return what is handed over.`);
      }

      const search = Object.fromEntries(req.nextUrl.searchParams.entries());
      assertNoNul(search, 'query');
      const query = opts.query ? opts.query.parse(search) : undefined;
      const body = opts.body ? opts.body.parse(await readJsonBody(req, env().JSON_MAX_BYTES)) : undefined;
      const out = await handler({
        req,
        params,
        principal,
        db,
        body: body as Infer<B>,
        query: query as Infer<Q>,
        project: project as Project,
      });
      return out instanceof Response ? out : NextResponse.json(out);
    } catch (err) {
      return errorResponse(err);
    }
  };
}

/** For the few public routes (health, invitations): the same error mapping, no authentication. */
export function withPublicRoute(handler: (req: NextRequest, params: Record<string, string>) => Promise<Response | object>) {
  return async (req: NextRequest, context: { params: Promise<Params> }): Promise<Response> => {
    try {
      const raw = (await context.params) ?? {};
      const params = Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, String(v)]));
      const out = await handler(req, params);
      return out instanceof Response ? out : NextResponse.json(out);
    } catch (err) {
      return errorResponse(err);
    }
  };
}

export function errorResponse(err: unknown): Response {
  if (err instanceof AppError) {
    return NextResponse.json(errorBody(err.code, err.message, err.details), { status: err.status });
  }
  if (err instanceof ZodError) {
    const details = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
    const first = details[0];
    const message = first ? `${first.path || 'input'}: ${first.message}` : 'Invalid input.';
    return NextResponse.json(errorBody('invalid', message, details), { status: 422 });
  }
  console.error('[trenchbook] unhandled error in route', err);
  return NextResponse.json(errorBody('internal', 'Something went wrong on our side; it has been logged.'), {
    status: 500,
  });
}

/** Scope helper: the route's `projectId` param is the project. */
export const byProjectParam = async (params: Record<string, string>): Promise<Scope | undefined> =>
  isUuid(params.projectId) ? { projectId: params.projectId } : undefined;

export function isUuid(s: string | undefined): s is string {
  return typeof s === 'string' && /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s);
}
