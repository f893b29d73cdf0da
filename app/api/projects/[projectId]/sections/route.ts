import { PassThrough, Readable } from 'node:stream';
import { NextResponse } from 'next/server';
import { z } from 'zod';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listCurrentSections } from '@/db/sections';
import { sectionFeature, sectionTotals } from '@/lib/services/reconcile';
import { loadExportContext, sectionsCsvZip, sectionsGeoJson } from '@/lib/services/sections-export';
import { writeSectionsWorkbook } from '@/lib/services/sections-workbook';

export const GET = withRoute(
  { action: 'section.read', scope: byProjectParam, query: z.object({ format: z.enum(['json', 'geojson', 'csv', 'xlsx']).default('json') }) },
  async ({ db, project, query }) => {
    const sections = await listCurrentSections(db, project.id);
    const features = sections.map(sectionFeature);
    if (query.format === 'geojson') {
      return new NextResponse(JSON.stringify(sectionsGeoJson(sections)), { headers: { 'content-type': 'application/geo+json', 'content-disposition': 'attachment; filename="sections.geojson"' } });
    }
    if (query.format === 'xlsx') {
      const context = await loadExportContext(db, project);
      const out = new PassThrough();
      void writeSectionsWorkbook(sections, context, out).catch((err) => out.destroy(err));
      return new NextResponse(Readable.toWeb(out) as ReadableStream, {
        headers: { 'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'content-disposition': 'attachment; filename="sections.xlsx"' },
      });
    }
    if (query.format === 'csv') {
      // a zip of the plain CSV and its README: a comment line above the header would break GDAL's CSV driver
      const zip = await sectionsCsvZip(sections, await loadExportContext(db, project));
      return new NextResponse(new Uint8Array(zip), { headers: { 'content-type': 'application/zip', 'content-disposition': 'attachment; filename="sections-csv.zip"' } });
    }
    return { sections: features.map((f) => ({ id: f.id, ...f.properties })), totals: sectionTotals(sections) };
  },
);
