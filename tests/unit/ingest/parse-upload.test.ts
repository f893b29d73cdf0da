import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { IngestError, parseUpload } from '@/lib/ingest';
import { ingestOptions } from '../../helpers/crs-from-db';
import { BAD, loadFixture as load } from '../../fixtures/ingest/bad-inputs';


afterAll(() => closeDb());

describe('parseUpload refuses every bad input with its code and a specific message', () => {
  it.each(BAD)('%s → %s', async (name, code, message, opts) => {
    const err = await parseUpload(load(name), ingestOptions(opts ?? {})).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(IngestError);
    expect((err as IngestError).code).toBe(code);
    expect((err as IngestError).message).toMatch(message);
  });
});

describe('parseUpload', () => {
  it('refuses a well-formed file with nothing in it', async () => {
    const e = await parseUpload([{ name: 'a.gpx', bytes: Buffer.from('<gpx version="1.1"><metadata/></gpx>') }], ingestOptions()).catch((x: IngestError) => x);
    expect([(e as IngestError).code, (e as IngestError).message]).toEqual(['too_few_points', 'the file holds no usable line or point']);
  });

  it('passes the crs field to projected formats', async () => {
    const u = await parseUpload(load('csv-25832-lines.csv'), ingestOptions({ crs: 'EPSG:25832' }));
    expect([u.format, u.sourceCrs, u.features.length]).toEqual(['csv', 'EPSG:25832', 4]);
  });
});
