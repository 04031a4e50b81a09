import { mkdir } from 'node:fs/promises';
import { dirname, extname } from 'node:path';
import { TolrateInputError } from '../errors.js';
import { writeFileSafely } from '../io/write.js';
import { xmlText } from '../io/text.js';
import { zipXmlProblems } from '../io/xml.js';
import type { PopulationRow } from '../population/types.js';
import type { Selection } from './types.js';

/**
 * The fieldwork sheet: one row per selected item, in selection order, with
 *   Seq | Role | Row | Key | the population's own columns | one result column per attribute | Note
 * Seq is the selection order (1, 2, ...), Role is sample or spare, Row is the row (line) number in
 * the source as a user sees it, Key is the sampling unit's key.
 *
 * CSV: UTF-8 with a byte order mark (so spreadsheets read accents right), CRLF line ends, fields
 * quoted when needed. A cell that a spreadsheet would run as a formula (it starts with = + - @,
 * TAB or CR) gets a leading single quote; `restoreCell` undoes that when the sheet is read back.
 * XLSX (a path ending in .xlsx): the same table in a sheet "Fieldwork" (cells are text, never
 * formulas; the columns to fill are formatted as text so a spreadsheet keeps a date or a code as
 * typed), the header frozen and filtered, columns sized to their content, a pick list (data
 * validation) on every column given one in `pickLists`, and the notes, if any, on a second sheet
 * "Instructions".
 * Either is written through the one writer (src/io/write.ts): a temporary file beside the target,
 * every byte checked and flushed, then renamed over it.
 */

export const SEQ_COLUMN = 'Seq';
export const ROLE_COLUMN = 'Role';
export const ROW_COLUMN = 'Row';
export const KEY_COLUMN = 'Key';
export const NOTE_COLUMN = 'Note';

export interface FieldworkItem {
  seq: number;
  role: 'sample' | 'spare';
  /** Row (line) number in the source, 1-based as a user sees it. */
  row: number;
  key: string;
  values: Record<string, string>;
  /** Two-stage plan: the stage of a sample item, shown in the Role column. */
  stage?: 1 | 2;
}

/** The Role cell: the role, and under a two-stage plan the stage (stage-2 items are tested only when needed). */
export function roleText(it: Pick<FieldworkItem, 'role' | 'stage'>): string {
  if (it.stage === 1) return 'sample, stage 1';
  if (it.stage === 2) return 'sample, stage 2 (test only if the first stage is inconclusive)';
  return it.role;
}

export interface FieldworkSheet {
  /** The population's columns, in order, with their own names. */
  columns: string[];
  items: FieldworkItem[];
  /** One empty result column per attribute, headed "<id> result". */
  attributes?: Array<{ id: string; description?: string }>;
  /** Use these result columns instead (e.g. the interview's own set); the Note column follows. */
  resultColumns?: string[];
  /** Lines for the XLSX "Instructions" sheet (how to fill it, seed, algorithm, fingerprint...). Not written to CSV. */
  notes?: string[];
  /** XLSX: the values offered in a column's pick list, by the column's header (e.g. "A1 result [C/D/V]": C, D, V). */
  pickLists?: Record<string, readonly string[]>;
}

/** The name of the fieldwork table's sheet in a workbook. */
export const FIELDWORK_SHEET = 'Fieldwork';
export const INSTRUCTIONS_SHEET = 'Instructions';

const RISKY = /^[=+\-@\t\r]/;

/** Neutralise a cell a spreadsheet would take as a formula: a leading single quote. */
export function neutraliseCell(text: string): string {
  return RISKY.test(text) ? `'${text}` : text;
}

/** Undo neutraliseCell when reading a sheet back. */
export function restoreCell(text: string): string {
  return text.length > 1 && text[0] === "'" && RISKY.test(text.slice(1)) ? text.slice(1) : text;
}

function csvField(text: string): string {
  const t = neutraliseCell(text);
  return /[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

/** The header and the rows of the sheet, as text. */
export function fieldworkTable(sheet: FieldworkSheet): { header: string[]; rows: string[][] } {
  const ours = [SEQ_COLUMN, ROLE_COLUMN, ROW_COLUMN, KEY_COLUMN];
  const results = sheet.resultColumns ?? (sheet.attributes?.length ? sheet.attributes.map((a) => `${a.id} result`) : ['Result']);
  const reserved = new Set([...ours, ...results, NOTE_COLUMN].map((c) => c.toLowerCase()));
  // A population column that shares a name with one of ours is shown as "<name> (population)".
  const shown = sheet.columns.map((c) => (reserved.has(c.toLowerCase()) ? `${c} (population)` : c));
  const header = [...ours, ...shown, ...results, NOTE_COLUMN];
  const rows = sheet.items.map((it) => [
    String(it.seq),
    roleText(it),
    String(it.row),
    it.key,
    ...sheet.columns.map((c) => it.values[c] ?? ''),
    ...results.map(() => ''),
    '',
  ]);
  return { header, rows };
}

/** The CSV text of the sheet (with BOM). */
export function fieldworkCsv(sheet: FieldworkSheet): string {
  const { header, rows } = fieldworkTable(sheet);
  return '\uFEFF' + [header, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

async function fieldworkXlsx(sheet: FieldworkSheet): Promise<Buffer> {
  const ExcelJS = (await import('exceljs')).default;
  const wb = new ExcelJS.Workbook();
  wb.creator = 'tolrate';
  // XLSX is XML: characters XML 1.0 forbids are dropped from every cell (src/io/text.ts).
  const table = fieldworkTable(sheet);
  const header = table.header.map(xmlText);
  const rows = table.rows.map((r) => r.map(xmlText));
  // The columns to fill come after ours (Seq, Role, Row, Key) and the population's.
  const fill = 4 + sheet.columns.length;
  const ws = wb.addWorksheet(FIELDWORK_SHEET, { views: [{ state: 'frozen', ySplit: 1, xSplit: 4 }] });
  const head = ws.addRow(header);
  head.font = { bold: true };
  head.alignment = { wrapText: true, vertical: 'bottom' };
  for (const r of rows) ws.addRow(r);
  ws.autoFilter = { from: { row: 1, column: 1 }, to: { row: 1, column: header.length } };
  for (let c = fill; c < header.length; c++) {
    const list = sheet.pickLists?.[table.header[c]!];
    for (let r = 2; r <= rows.length + 1; r++) {
      const cell = ws.getCell(r, c + 1);
      cell.numFmt = '@';
      if (list) {
        cell.dataValidation = {
          type: 'list',
          allowBlank: true,
          formulae: [`"${list.join(',')}"`],
          showErrorMessage: true,
          errorStyle: 'warning',
          errorTitle: header[c]!,
          error: `Pick one of: ${list.join(', ')}`,
        };
      }
    }
  }
  ws.columns.forEach((col, i) => {
    const list = sheet.pickLists?.[table.header[i]!];
    // A code column is as wide as its longest code (its header wraps); others fit their content.
    const longest = list
      ? Math.max(...list.map((v) => v.length), ...header[i]!.split(/\s+/).map((w) => w.length))
      : Math.max(header[i]!.length, ...rows.slice(0, 200).map((r) => (r[i] ?? '').length));
    col.width = Math.min(i >= fill ? 40 : 50, Math.max(list ? 10 : 6, longest + 2));
  });
  if (sheet.notes?.length) {
    const about = wb.addWorksheet(INSTRUCTIONS_SHEET);
    about.getColumn(1).width = 110;
    for (const line of sheet.notes) about.addRow([xmlText(line)]).alignment = { wrapText: true };
    about.getRow(1).font = { bold: true };
  }
  const buf = Buffer.from(await wb.xlsx.writeBuffer());
  // The cells were cleaned above; a sheet whose XML does not parse would be tolrate's own fault.
  const problems = await zipXmlProblems(buf);
  if (problems.length) throw new Error(`the fieldwork sheet's XML does not parse, so it was not written: ${problems.slice(0, 3).join('; ')}`);
  return buf;
}

/** Write a file through the one writer (src/io/write.ts), creating its folder first. */
export async function writeAtomic(path: string, data: string | Buffer, what = 'the fieldwork sheet'): Promise<void> {
  await mkdir(dirname(path), { recursive: true }).catch(() => undefined);
  writeFileSafely(path, data, { what });
}

/** Write the fieldwork sheet (CSV, or XLSX when the path ends in .xlsx). */
export async function writeFieldworkSheet(path: string, sheet: FieldworkSheet): Promise<{ path: string; format: 'csv' | 'xlsx'; rows: number }> {
  if (!sheet.items.length) throw new TolrateInputError('There are no items to write to the fieldwork sheet.', 'INVALID_SELECTION');
  const ext = extname(path).toLowerCase();
  if (ext === '.xls' || ext === '.xlsm') throw new TolrateInputError(`Write the fieldwork sheet as .csv or .xlsx, not ${ext}.`, 'INVALID_OUTPUT');
  const format = ext === '.xlsx' ? 'xlsx' : 'csv';
  await writeAtomic(path, format === 'xlsx' ? await fieldworkXlsx(sheet) : fieldworkCsv(sheet));
  return { path, format, rows: sheet.items.length };
}

/** The sheet's items from a selection and the rows read at its positions (same order). */
export function fieldworkItems(selection: Pick<Selection, 'sampleSize' | 'positions'>, rows: readonly PopulationRow[]): FieldworkItem[] {
  if (rows.length !== selection.positions.length) throw new Error('internal: rows and positions differ in number');
  return rows.map((r, i) => {
    if (r.position !== selection.positions[i]) throw new Error('internal: rows are not in the order of the positions');
    return { seq: i + 1, role: i < selection.sampleSize ? 'sample' : 'spare', row: r.row, key: r.key, values: r.values };
  });
}
