import { PassThrough, Readable } from 'node:stream';
import { stringify } from 'csv-stringify/sync';
import { NextResponse } from 'next/server';
import { z } from 'zod';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listCurrentSections } from '@/db/sections';
import { sectionFeature, sectionTotals } from '@/lib/services/reconcile';
import { writeSectionsWorkbook } from '@/lib/services/sections-workbook';
import { listPlannedRoutes } from '@/db/planned';

export const GET = withRoute(
  { action: 'section.read', scope: byProjectParam, query: z.object({ format: z.enum(['json', 'geojson', 'csv', 'xlsx']).default('json') }) },
  async ({ db, project, query }) => {
    const sections = await listCurrentSections(db, project.id);
    const features = sections.map(sectionFeature);
    if (query.format === 'geojson') {
      return new NextResponse(JSON.stringify({ type: 'FeatureCollection', features }), { headers: { 'content-type': 'application/geo+json' } });
    }
    if (query.format === 'xlsx') {
      const streets = new Map((await listPlannedRoutes(db, project.id, true)).map((r) => [r.ref, r.street]));
      const out = new PassThrough();
      void writeSectionsWorkbook(sections, streets, out).catch((err) => out.destroy(err));
      return new NextResponse(Readable.toWeb(out) as ReadableStream, {
        headers: { 'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'content-disposition': 'attachment; filename="sections.xlsx"' },
      });
    }
    if (query.format === 'csv') {
      const columns = ['id', 'plannedRouteRef', 'fromChainageM', 'toChainageM', 'lengthM', 'status', 'maxOffsetM', 'p95OffsetM', 'accuracyM', 'sourceUploadIds', 'laidOn', 'review'];
      const rows = features.map((f) => [f.id, f.properties.plannedRouteRef ?? '', f.properties.fromChainageM, f.properties.toChainageM, f.properties.lengthM, f.properties.status, f.properties.maxOffsetM, f.properties.p95OffsetM, f.properties.accuracyM, f.properties.sourceUploadIds.join(' '), f.properties.laidOn ?? '', f.properties.review]);
      return new NextResponse(stringify([columns, ...rows]), { headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="sections.csv"' } });
    }
    return { sections: features.map((f) => ({ id: f.id, ...f.properties })), totals: sectionTotals(sections) };
  },
);
