import ExcelJS from 'exceljs';
import type { Writable } from 'node:stream';
import type { Section } from '@/db/sections';
import { EXPORT_CAUTION, exportNotes, SECTION_EXPORT_COLUMNS, type ExportContext } from './sections-export';

/**
 * Writes the sections table as an Office Open XML workbook with exceljs's streaming writer: the sheet
 * "Sections" (one row per section, the CSV's human headers, numbers as numbers, the laid date as a date,
 * empty cells where nothing was measured) and the sheet "Read me" (caution and coordinate system), e.g.
 * `await writeSectionsWorkbook(sections, context, res)`.
 */
export async function writeSectionsWorkbook(sections: Section[], context: ExportContext, out: Writable): Promise<void> {
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true });
  const ws = wb.addWorksheet('Sections', {
    views: [{ state: 'frozen', ySplit: 1 }],
    // printed on every page, where the sheet is read on paper
    headerFooter: { oddFooter: `&L${EXPORT_CAUTION.replace(/&/g, '&&')}` },
  });
  ws.columns = SECTION_EXPORT_COLUMNS.map((c, i) => ({
    header: c.header,
    key: String(i),
    width: c.width,
    style: c.kind === 'number' ? { numFmt: '0.000' } : c.kind === 'date' ? { numFmt: 'yyyy-mm-dd' } : {},
  }));
  ws.getRow(1).font = { bold: true };
  for (const s of sections) {
    const row: Record<string, string | number | Date | null> = {};
    SECTION_EXPORT_COLUMNS.forEach((c, i) => {
      const v = c.value(s, context);
      row[String(i)] = c.kind === 'date' && typeof v === 'string' ? new Date(`${v}T00:00:00Z`) : v;
    });
    ws.addRow(row).commit();
  }
  ws.commit();
  const about = wb.addWorksheet('Read me');
  about.columns = [{ key: 'note', width: 120 }];
  for (const line of exportNotes(context, sections.length)) about.addRow({ note: line }).commit();
  about.commit();
  await wb.commit();
}
