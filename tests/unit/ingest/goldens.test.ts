import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { parseUpload, type ParsedFeature, type Position } from '@/lib/ingest';
import { ingestOptions } from '../../helpers/crs-from-db';

// Expected values written by tests/fixtures/ingest/make-fixtures.ts from the coordinates it gave
// the producers (its own writers, ogr2ogr, gdaltransform), never from these parsers.
const ROOT = path.join(__dirname, '../../fixtures/ingest');
interface Golden {
  file: string | string[];
  format: string;
  sourceCrs: string;
  lines: number;
  points: number;
  first: Position;
  last: Position;
  tolerance: number;
  warnings?: number;
  crs?: string;
}
const goldens = JSON.parse(readFileSync(path.join(ROOT, 'out/goldens.json'), 'utf8')) as Record<string, Golden>;

afterAll(() => closeDb());

function near(actual: Position, expected: Position, tol: number) {
  expect(actual.length).toBe(expected.length);
  expect(Math.abs(actual[0] - expected[0])).toBeLessThanOrEqual(tol);
  expect(Math.abs(actual[1] - expected[1])).toBeLessThanOrEqual(tol);
  // heights are not reprojected; a millimetre covers the fixtures' printed precision
  if (expected.length === 3) expect(Math.abs(actual[2]! - expected[2]!)).toBeLessThanOrEqual(1e-3);
}

describe('every fixture parses to its golden', () => {
  it('has goldens for every format and variant', () => {
    expect(new Set(Object.values(goldens).map((g) => g.format))).toEqual(new Set(['gpx', 'kml', 'kmz', 'shapefile', 'geojson', 'csv']));
    expect(Object.keys(goldens).length).toBe(16);
  });

  for (const [key, g] of Object.entries(goldens)) {
    it(`${key}: ${g.lines} lines, ${g.points} points, first and last position`, async () => {
      const names = Array.isArray(g.file) ? g.file : [g.file];
      const files = names.map((n) => ({ name: path.basename(n), bytes: readFileSync(path.join(ROOT, 'in', n)) }));
      const upload = await parseUpload(files, ingestOptions(g.crs ? { crs: g.crs } : {}));
      expect(upload.format).toBe(g.format);
      expect(upload.sourceCrs).toBe(g.sourceCrs);
      const lines = upload.features.filter((f): f is Extract<ParsedFeature, { kind: 'line' }> => f.kind === 'line');
      expect(lines.length).toBe(g.lines);
      expect(upload.features.length - lines.length).toBe(g.points);
      if (g.warnings !== undefined) expect(upload.warnings.length).toBe(g.warnings);
      const first = lines[0];
      near(first.coords[0], g.first, g.tolerance);
      near(first.coords[first.coords.length - 1], g.last, g.tolerance);
    });
  }
});
