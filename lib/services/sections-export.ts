import { stringify } from 'csv-stringify/sync';
import type { Knex } from 'knex';
import { listPlannedRoutes } from '@/db/planned';
import type { Project } from '@/db/projects';
import type { Section } from '@/db/sections';
import { listUploads } from '@/db/uploads';
import { REVIEW_STYLE, STATUS_STYLE } from '@/lib/records/section-status';
import { writeZip } from '@/lib/records/write-zip';
import { formatInZone } from '@/lib/records/zoned-time';
import { sectionFeature } from './reconcile';

/** Said in every export of the record, as on every map. */
export const EXPORT_CAUTION =
  'Caution: positions are records, not a locate. Before any digging, verify utilities on site (detection, hand-dug trial holes) and follow local codes and licensed practice.';
export const EXPORT_COORDINATES =
  'Coordinates: WGS 84 longitude/latitude in degrees (EPSG:4326). Chainages and lengths in metres along the ground (geodesic); offsets in metres from the planned route, measured square to it.';
export const EXPORT_EMPTY_CELLS =
  'An empty cell means nothing measured it: a not-built stretch has no offset and no accuracy, an unplanned line no offset from a plan.';

export interface ExportContext {
  projectName: string;
  timeZone: string;
  /** planned route reference → street */
  streets: Map<string, string | null>;
  /** upload id → its file name */
  uploadNames: Map<string, string>;
  generatedAt: Date;
}

/** Streets and upload file names of the project, for the exports' human columns. */
export async function loadExportContext(db: Knex, project: Pick<Project, 'id' | 'name' | 'timeZone'>): Promise<ExportContext> {
  const [routes, uploads] = await Promise.all([listPlannedRoutes(db, project.id, true), listUploads(db, project.id)]);
  return {
    projectName: project.name,
    timeZone: project.timeZone,
    // removed routes first, so that the current plan's street wins for a reference used twice
    streets: new Map(routes.sort((a, b) => Number(b.removedInVersion !== null) - Number(a.removedInVersion !== null)).map((r) => [r.ref, r.street])),
    uploadNames: new Map(uploads.map((u) => [u.id, u.fileName])),
    generatedAt: new Date(),
  };
}

type Kind = 'text' | 'number' | 'date';
interface ExportColumn {
  header: string;
  kind: Kind;
  width: number;
  value: (s: Section, c: ExportContext) => string | number | null;
}

const mm = (x: number | null) => (x === null ? null : Math.round(x * 1000) / 1000);

/** The columns of the sections table, the same in CSV and Excel: human headers with their units. */
export const SECTION_EXPORT_COLUMNS: ExportColumn[] = [
  { header: 'Section id', kind: 'text', width: 38, value: (s) => s.id },
  { header: 'Route', kind: 'text', width: 12, value: (s) => s.plannedRouteRef ?? 'unplanned' },
  { header: 'Street', kind: 'text', width: 24, value: (s, c) => (s.plannedRouteRef && c.streets.get(s.plannedRouteRef)) || '' },
  { header: 'From chainage (m)', kind: 'number', width: 12, value: (s) => mm(s.fromChainageM) },
  { header: 'To chainage (m)', kind: 'number', width: 12, value: (s) => mm(s.toChainageM) },
  { header: 'Length (m)', kind: 'number', width: 11, value: (s) => mm(s.lengthM) },
  { header: 'Status', kind: 'text', width: 12, value: (s) => STATUS_STYLE[s.status].label },
  { header: 'Max offset from plan (m)', kind: 'number', width: 14, value: (s) => mm(s.maxOffsetM) },
  { header: 'P95 offset from plan (m)', kind: 'number', width: 14, value: (s) => mm(s.p95OffsetM) },
  { header: 'Position accuracy, 95 % radius (m)', kind: 'number', width: 18, value: (s) => mm(s.accuracyM) },
  { header: 'Source uploads', kind: 'text', width: 40, value: (s, c) => s.sourceUploadIds.map((id) => c.uploadNames.get(id) ?? id).join('; ') },
  { header: 'Source upload ids', kind: 'text', width: 38, value: (s) => s.sourceUploadIds.join(' ') },
  { header: 'Laid on', kind: 'date', width: 12, value: (s) => s.laidOn },
  { header: 'Review', kind: 'text', width: 14, value: (s) => REVIEW_STYLE[s.review].label },
  { header: 'Review comment', kind: 'text', width: 30, value: (s) => s.reviewComment },
];

/** The README's lines: what the file is, the caution, the coordinates, what an empty cell means. */
export function exportNotes(c: ExportContext, count: number): string[] {
  return [
    `Trenchbook sections of ${c.projectName}: ${count} current section${count === 1 ? '' : 's'}, exported ${formatInZone(c.generatedAt, c.timeZone)} (${c.timeZone}).`,
    EXPORT_CAUTION,
    EXPORT_COORDINATES,
    EXPORT_EMPTY_CELLS,
  ];
}

const wkt = (s: Section) => `LINESTRING (${s.coords.map((p) => `${p[0]} ${p[1]}`).join(', ')})`;

/** The sections as CSV (RFC 4180): the header line first, empty cells where nothing was measured, the line as WKT last. */
export function sectionsCsv(sections: Section[], c: ExportContext): string {
  const header = [...SECTION_EXPORT_COLUMNS.map((col) => col.header), 'WKT'];
  const rows = sections.map((s) => [...SECTION_EXPORT_COLUMNS.map((col) => col.value(s, c) ?? ''), wkt(s)]);
  return stringify([header, ...rows]);
}

// GeoCSV side files, so that GDAL reads numbers as numbers, the dates as dates and the line in EPSG:4326
const CSVT = [...SECTION_EXPORT_COLUMNS.map((col) => (col.kind === 'number' ? '"Real"' : col.kind === 'date' ? '"Date"' : '"String"')), '"WKT"'].join(',');
const PRJ_WGS84 = 'GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]';

/**
 * The CSV download: a zip of `sections.csv` (a plain table any CSV reader opens, header on line 1), its
 * `README.txt` (caution, coordinate system, what an empty cell means) and GeoCSV's `.csvt` and `.prj`.
 */
export function sectionsCsvZip(sections: Section[], c: ExportContext): Promise<Buffer> {
  return writeZip(
    [
      { name: 'README.txt', data: `${exportNotes(c, sections.length).join('\r\n\r\n')}\r\n\r\nFiles: sections.csv (the table, UTF-8), sections.csvt (its column types) and sections.prj (its coordinate system), as GDAL's CSV driver reads them.\r\n` },
      { name: 'sections.csv', data: sectionsCsv(sections, c) },
      { name: 'sections.csvt', data: `${CSVT}\r\n` },
      { name: 'sections.prj', data: PRJ_WGS84 },
    ],
    c.generatedAt,
  );
}

/**
 * The sections as an RFC 7946 FeatureCollection: WGS 84 by definition (no "crs" member); the caution and
 * the coordinate note travel as foreign members; figures nothing measured are null.
 */
export function sectionsGeoJson(sections: Section[]) {
  return { type: 'FeatureCollection' as const, caution: EXPORT_CAUTION, coordinates: EXPORT_COORDINATES, emptyFigures: EXPORT_EMPTY_CELLS, features: sections.map(sectionFeature) };
}
