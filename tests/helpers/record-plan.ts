import geodesic from 'geographiclib-geodesic';
import type { Knex } from 'knex';
import { getProject, type Project } from '@/db/projects';
import type { Principal } from '@/lib/auth/principal';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { makePrincipal, registerPartner } from './fixtures';
import { formOf } from './upload-form';

const G = geodesic.Geodesic.WGS84;

/** A position `east` m east and `north` m north of `origin` (geodesic, GeographicLib). */
export function offsetFrom(origin: [number, number], east: number, north: number): [number, number] {
  const a = G.Direct(origin[1], origin[0], 90, east);
  const b = G.Direct(a.lat2!, a.lon2!, 0, north);
  return [b.lon2!, b.lat2!];
}

export interface RecordPlan {
  project: Project;
  admin: Principal;
  engineer: Principal;
  surveyor: Principal;
  /** of the network owner's organisation: reads, never writes */
  owner: Principal;
  maintenance: Principal;
  routes: Map<string, string>;
  at: (east: number, north: number) => [number, number];
}

/**
 * A contractor's project with a design of one street (S-1, 200 m east) and three road crossings off it
 * (X-1 at 40 m, X-2 at 90 m, X-3 at 150 m, 9 m south each, `1x14mm`), for the record tests.
 */
export async function makeRecordPlan(db: Knex, name: string, origin: [number, number]): Promise<RecordPlan> {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  const surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `${name} owner ${Date.now()}`);
  const owner = await makePrincipal(db, 'owner', 'owner', partner);
  const maintenance = await makePrincipal(db, 'maintenance', 'owner', partner);
  const project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `${name} ${Date.now()}`, partnerOrganisation: partner, timeZone: 'Europe/Berlin' }))).id))!;
  const at = (e: number, n: number) => offsetFrom(origin, e, n);
  const f = (ref: string, bundle: string, type: string, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: ref, street: 'Test Street', bundle, type }, geometry: { type: 'LineString', coordinates: pts.map(([e, n]) => at(e, n)) } });
  const design = {
    type: 'FeatureCollection',
    features: [
      f('S-1', '12x7mm', 'street', [[0, 0], [200, 0]]),
      f('X-1', '1x14mm', 'road crossing', [[40, 0], [40, -9]]),
      f('X-2', '1x14mm', 'road crossing', [[90, 0], [90, -9]]),
      f('X-3', '1x14mm', 'road crossing', [[150, 0], [150, -9]]),
    ],
  };
  const form = await formOf([{ name: 'design.geojson', bytes: JSON.stringify(design) }]);
  try {
    await importPlan(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
  const routes = new Map<string, string>((await db('planned_routes').where({ project_id: project.id }).select('ref', 'id')).map((r: { ref: string; id: string }) => [r.ref, r.id]));
  return { project, admin, engineer, surveyor, owner, maintenance, routes, at };
}
