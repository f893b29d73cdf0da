import path from 'node:path';
import proj4 from 'proj4';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { uploadFeatureCollection } from '@/db/uploads';
import { epsgField } from '@/lib/api/form-fields';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { previewUpload, receiveUpload, retrySettingsSchema, retryUpload } from '@/lib/services/uploads';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-upload-form');
const db = getDb();
let surveyor: Principal;
let project: Project;

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const created = await createProject(db, admin, createProjectSchema.parse({ name: `Grid ${Date.now()}`, partnerOrganisation: await registerPartner(db, admin, `Grid owner ${Date.now()}`), defaultCrs: '25832' }));
  project = (await getProject(db, created.id))!;
});
afterAll(() => closeDb());

async function send(name: string, text: string, fields: Record<string, string> = {}) {
  const form = await formOf([{ name, bytes: text }], fields);
  try {
    return await receiveUpload(db, surveyor, project, form);
  } finally {
    await form.cleanup();
  }
}

describe('the coordinate system field', () => {
  it('takes the bare EPSG number as well as EPSG:<number>, in any case and with spaces', () => {
    for (const v of ['25832', 'EPSG:25832', ' epsg:25832 ']) expect(epsgField.parse(v), v).toBe('EPSG:25832');
    for (const v of ['EPSG:', '25832x', 'UTM 32', '258', 'EPSG:25832:1']) {
      const r = epsgField.safeParse(v);
      expect(r.success, v).toBe(false);
      expect(r.error!.issues[0].message).toBe('Give the EPSG number of the coordinate system, e.g. 25833 or EPSG:25833.');
    }
  });

  it('a project takes its default grid as 25832, and shows it as EPSG:25832', () => {
    expect(project.defaultCrs).toBe('EPSG:25832');
    expect(createProjectSchema.parse({ name: 'x', partnerOrganisation: 'y', defaultCrs: 'epsg:3035' }).defaultCrs).toBe(3035);
  });

  it('reads an easting/northing CSV sent with crs 25832 where proj4 puts it', async () => {
    const csv = 'pt,easting,northing\n1,507200.00,5773400.00\n2,507230.00,5773420.00\n';
    const { upload } = await send('bare-code.csv', csv, { crs: '25832', columns: JSON.stringify({ id: 'pt', x: 'easting', y: 'northing' }) });
    expect(upload.crs).toBe('EPSG:25832');
    const fc = await uploadFeatureCollection(db, upload.id);
    const got = fc.features.map((f) => (f.geometry as { coordinates: number[] }).coordinates);
    // the reference: proj4's UTM zone 32N on GRS80 (ETRS89 and WGS 84 coincide here within a metre)
    const utm32 = '+proj=utm +zone=32 +ellps=GRS80 +units=m +no_defs';
    const want = [[507200, 5773400], [507230, 5773420]].map((p) => proj4(utm32, 'WGS84', p));
    for (const [i, w] of want.entries()) {
      expect(got[i][0]).toBeCloseTo(w[0], 7);
      expect(got[i][1]).toBeCloseTo(w[1], 7);
    }
  });
});

describe('a refused CSV', () => {
  const csv = 'Pt,Easting,Northing,Height\nA,507300.0,5773500.0,50.0\nB,507301.0,5773501.0,50.1\n';

  it('without a grid, the preview refusal carries the columns the server recognised', async () => {
    const form = await formOf([{ name: 'no-grid.csv', bytes: csv }]);
    const err = await previewUpload(db, project, form).catch((e) => e).finally(() => form.cleanup());
    expect(err.code).toBe('crs_required');
    expect(err.details.columns).toEqual({ map: { id: 'Pt', x: 'Easting', y: 'Northing', z: 'Height' }, guessed: true, headers: ['Pt', 'Easting', 'Northing', 'Height'] });
  });

  it('is read again from its stored original with the bare number 25832', async () => {
    const err = await send('retry-me.csv', csv).catch((e) => e);
    expect(err.code).toBe('crs_required');
    const { upload } = await retryUpload(db, surveyor, project, err.details.uploadId, retrySettingsSchema.parse({ crs: '25832' }));
    expect(upload).toMatchObject({ status: 'stored', crs: 'EPSG:25832', pointCount: 2 });
  });
});
