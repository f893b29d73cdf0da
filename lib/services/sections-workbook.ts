import ExcelJS from 'exceljs';
import type { Writable } from 'node:stream';
import type { Section } from '@/db/sections';

const COLUMNS: { header: string; key: string; width: number; numFmt?: string }[] = [
  { header: 'Section id', key: 'id', width: 38 },
  { header: 'Route', key: 'route', width: 12 },
  { header: 'Street', key: 'street', width: 24 },
  { header: 'From (m)', key: 'from', width: 10, numFmt: '0.00' },
  { header: 'To (m)', key: 'to', width: 10, numFmt: '0.00' },
  { header: 'Length (m)', key: 'length', width: 11, numFmt: '0.00' },
  { header: 'Status', key: 'status', width: 12 },
  { header: 'Max offset (m)', key: 'max', width: 14, numFmt: '0.00' },
  { header: 'P95 offset (m)', key: 'p95', width: 14, numFmt: '0.00' },
  { header: 'Accuracy, 95 % radius (m)', key: 'acc', width: 22, numFmt: '0.00' },
  { header: 'Source uploads', key: 'sources', width: 40 },
  { header: 'Laid on', key: 'laid', width: 12, numFmt: 'yyyy-mm-dd' },
  { header: 'Review', key: 'review', width: 10 },
];

/**
 * Writes the sections table as an Office Open XML workbook with exceljs's streaming writer, one row per
 * section, numbers as numbers and the laid date as a date, e.g. `await writeSectionsWorkbook(sections, streets, res)`.
 */
export async function writeSectionsWorkbook(sections: Section[], streets: Map<string, string | null>, out: Writable): Promise<void> {
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true });
  const ws = wb.addWorksheet('Sections', { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = COLUMNS.map((c) => ({ header: c.header, key: c.key, width: c.width, style: c.numFmt ? { numFmt: c.numFmt } : {} }));
  ws.getRow(1).font = { bold: true };
  for (const s of sections) {
    ws.addRow({
      id: s.id,
      route: s.plannedRouteRef ?? 'unplanned',
      street: (s.plannedRouteRef && streets.get(s.plannedRouteRef)) ?? '',
      from: s.fromChainageM,
      to: s.toChainageM,
      length: s.lengthM,
      status: s.status,
      max: s.maxOffsetM,
      p95: s.p95OffsetM,
      acc: s.accuracyM,
      sources: s.sourceUploadIds.join(' '),
      laid: s.laidOn ? new Date(`${s.laidOn}T00:00:00Z`) : null,
      review: s.review,
    }).commit();
  }
  ws.commit();
  await wb.commit();
}
