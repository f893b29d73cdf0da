import type { Knex } from 'knex';
import { getProject, type Project } from '@/db/projects';
import type { Principal } from '@/lib/auth/principal';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';
import { gridScenario } from '../unit/matching/scenario';

/**
 * A project with a generated street grid as its plan and one long handheld walk as its upload (the
 * matching tests' scenario), so that a reconciliation runs for a few seconds: long enough to kill
 * something in the middle of it.
 */
export async function projectWithLongWalk(db: Knex, fixes = 60_000): Promise<{ admin: Principal; project: Project }> {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const partner = await registerPartner(db, admin, `Fault owner ${Date.now()}`);
  const project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Faults ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  const gs = gridScenario(5, { blocks: 5, fixes });
  const plan = {
    type: 'FeatureCollection',
    features: gs.routes.map((r) => ({ type: 'Feature', properties: { route_id: r.ref, kind: r.kind }, geometry: { type: 'LineString', coordinates: r.coords } })),
  };
  const planForm = await formOf([{ name: 'plan.geojson', bytes: JSON.stringify(plan) }], { mapping: JSON.stringify({ ref: 'route_id', kind: 'kind' }) });
  await importPlan(db, admin, project, planForm).finally(() => planForm.cleanup());
  const pts = gs.handheld
    .map((h) => `<trkpt lat="${h.fix.lat.toFixed(7)}" lon="${h.fix.lon.toFixed(7)}"><time>${new Date((h.fix.t ?? 0) * 1000).toISOString()}</time></trkpt>`)
    .join('');
  const gpx = `<?xml version="1.0" encoding="UTF-8"?><gpx version="1.1" creator="trenchbook faults" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>${pts}</trkseg></trk></gpx>`;
  const form = await formOf([{ name: 'walk.gpx', bytes: gpx }], { accuracy: 'handheld_gnss', surveyDate: '2026-11-03' });
  await receiveUpload(db, admin, project, form).finally(() => form.cleanup());
  return { admin, project };
}
