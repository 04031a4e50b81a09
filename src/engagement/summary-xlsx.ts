/**
 * The engagement summary as an XLSX workbook (exceljs): one sheet per table, typed cells (counts
 * as numbers, rates as numbers formatted as percentages, due dates as dates), frozen header rows
 * and filters, so the partner can sort and filter.
 */
import type { SummaryModel } from './summary.js';

type CellValue = string | number | Date | null;
interface Col {
  header: string;
  width: number;
  /** Excel number format for the column's cells. */
  numFmt?: string;
}

const PCT = '0.0%';
const PCT_UP = '0.00%';

function isoDate(d: string | undefined): Date | null {
  return d ? new Date(`${d}T00:00:00Z`) : null;
}

export async function renderSummaryXlsx(m: SummaryModel): Promise<Buffer> {
  const ExcelJS = (await import('exceljs')).default;
  const wb = new ExcelJS.Workbook();
  wb.creator = 'tolrate';
  wb.created = new Date(m.writtenAt);
  const sheet = (name: string, cols: Col[], rows: CellValue[][]) => {
    const ws = wb.addWorksheet(name, { views: [{ state: 'frozen', ySplit: 1 }] });
    ws.columns = cols.map((c) => ({ header: c.header, width: c.width, ...(c.numFmt ? { style: { numFmt: c.numFmt } } : {}) }));
    ws.getRow(1).font = { bold: true };
    for (const r of rows) ws.addRow(r);
    ws.autoFilter = { from: { row: 1, column: 1 }, to: { row: 1, column: cols.length } };
  };
  sheet(
    'Workpapers',
    [{ header: 'File', width: 40 }, { header: 'Reference', width: 12 }, { header: 'Control', width: 12 }, { header: 'State', width: 16 }, { header: 'Step reached', width: 24 }, { header: 'Review', width: 40 }, { header: 'State hash (SHA-256)', width: 66 }, { header: 'Problem', width: 50 }],
    m.sources.map((s) => [s.file, s.reference, s.control, s.state, s.stepReached, s.review, s.stateHash, s.problem ?? null]),
  );
  sheet(
    'Controls',
    [{ header: 'Reference', width: 12 }, { header: 'Control', width: 12 }, { header: 'What the control does', width: 60 }, { header: 'Approach', width: 16 }, { header: 'Sample size', width: 12, numFmt: '0' }, { header: 'State', width: 30 }, { header: 'Conclusion', width: 80 }],
    m.controls.map((c) => [c.reference, c.control, c.description, c.approach, c.sampleSize ?? null, c.state, c.conclusion]),
  );
  sheet(
    'Results',
    [
      { header: 'Reference', width: 12 },
      { header: 'Control', width: 12 },
      { header: 'Attribute', width: 10 },
      { header: 'What is checked', width: 50 },
      { header: 'Tested', width: 10, numFmt: '0' },
      { header: 'Deviations', width: 11, numFmt: '0' },
      { header: 'Sample rate', width: 12, numFmt: PCT },
      { header: 'Upper limit', width: 12, numFmt: PCT_UP },
      { header: 'Tolerable rate', width: 14, numFmt: PCT },
      { header: 'Decision', width: 28 },
    ],
    m.results.map((r) => [r.reference, r.control, r.attribute, r.description, r.sampleSize, r.deviations, r.sampleRate ?? null, r.upperLimit ?? null, r.tolerableRate ?? null, r.decision]),
  );
  sheet(
    'Deviations',
    [{ header: 'Reference', width: 12 }, { header: 'Control', width: 12 }, { header: 'Item', width: 14 }, { header: 'Attribute', width: 10 }, { header: 'What was found', width: 60 }, { header: 'Cause', width: 26 }, { header: 'Detail', width: 40 }, { header: 'Intentional', width: 12 }, { header: 'Pattern', width: 12 }, { header: 'Test concluded', width: 14 }],
    m.deviations.map((d) => [d.reference, d.control, d.item, d.attribute, d.found, d.cause, d.causeDetail, d.intentional, d.pattern, d.concluded ? 'yes' : 'no (in progress)']),
  );
  sheet(
    'Deficiencies',
    [{ header: 'Reference', width: 12 }, { header: 'Control', width: 12 }, { header: 'Classification', width: 24 }, { header: 'Reasons', width: 80 }, { header: 'Conclusion on the control', width: 80 }],
    m.deficiencies.map((d) => [d.reference, d.control, d.classification, d.reasons, d.controlConclusion]),
  );
  sheet(
    'Follow-ups',
    [{ header: 'Reference', width: 12 }, { header: 'Control', width: 12 }, { header: 'Action', width: 26 }, { header: 'Description', width: 70 }, { header: 'Owner', width: 24 }, { header: 'Due', width: 12, numFmt: 'yyyy-mm-dd' }, { header: `As of ${m.asOf}`, width: 14 }],
    m.followUps.map((x) => [x.reference, x.control, x.kind, x.description, x.owner, isoDate(x.due), x.timing]),
  );
  return Buffer.from(await wb.xlsx.writeBuffer());
}
