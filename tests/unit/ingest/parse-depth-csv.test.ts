import { describe, expect, it } from 'vitest';
import { guessDepthColumns, parseDepthCsv } from '@/lib/ingest/parse-depth-csv';
import { IngestError } from '@/lib/ingest/types';

const noCrs = async () => undefined;
const opts = { resolveCrs: noCrs, timeZone: 'Europe/Berlin' };

describe('depth CSV', () => {
  it('guesses the usual headers', () => {
    expect(guessDepthColumns(['Route', 'Ch', 'Cover depth', 'Trench-depth', 'Measured at', 'Remarks'])).toEqual({ route: 'Route', chainage: 'Ch', cover: 'Cover depth', depth: 'Trench-depth', time: 'Measured at', note: 'Remarks' });
    expect(guessDepthColumns(['Longitude', 'Latitude', 'DOC'])).toEqual({ lon: 'Longitude', lat: 'Latitude', cover: 'DOC' });
  });

  it('reads rows placed by position, a time without an offset on the project\'s clock', async () => {
    const r = await parseDepthCsv('lon,lat,cover,time\n9.1,52.1,0.45,2026-07-01 12:00\n9.2,52.2,0.41,2026-07-01T12:00:00+02:00\n', opts);
    expect(r.placement).toBe('position');
    expect(r.sourceCrs).toBe('EPSG:4326');
    expect(r.rows.map((x) => [x.row, x.place, x.coverM, x.measuredAt])).toEqual([
      [2, { kind: 'position', lon: 9.1, lat: 52.1 }, 0.45, '2026-07-01T10:00:00.000Z'],
      [3, { kind: 'position', lon: 9.2, lat: 52.2 }, 0.41, '2026-07-01T10:00:00.000Z'],
    ]);
  });

  it('says which row fails and why', async () => {
    const r = await parseDepthCsv('lon,lat,cover\n9.1,52.1,0.45\nx,52.1,0.4\n9.1,95,0.4\n9.1,52.1,\n', opts);
    expect(r.rows).toHaveLength(1);
    expect(r.problems).toEqual([
      { row: 3, message: "row 3: longitude 'x' is not a number" },
      { row: 4, message: 'row 4: latitude 95 is beyond ±90' },
      { row: 5, message: 'row 5: neither cover nor trench depth is given' },
    ]);
  });

  it('refuses a file it cannot place or that has no depth', async () => {
    await expect(parseDepthCsv('a,b\n1,2\n', opts)).rejects.toThrow(/no placement columns/);
    await expect(parseDepthCsv('route,chainage\nA,1\n', opts)).rejects.toThrow(/no depth column/);
    await expect(parseDepthCsv('route,chainage,cover\n', opts)).rejects.toBeInstanceOf(IngestError);
    await expect(parseDepthCsv('easting,northing,cover\n500000,5700000,0.4\n', opts)).rejects.toMatchObject({ code: 'crs_required' });
  });
});
