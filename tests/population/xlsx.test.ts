import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import { FileInputError } from '../../src/errors.js';
import { cellText, findKeys, readRowsAt, scanPopulation, type XlsxSource } from '../../src/population/index.js';
import { tempDir } from './helpers.js';

const { dir } = tempDir('tolrate-xlsx-');
const book = join(dir, 'invoices.xlsx');

beforeAll(async () => {
  // Made here with exceljs (the library the reader uses), as a spreadsheet program would save it.
  const wb = new ExcelJS.Workbook();
  const inv = wb.addWorksheet('Invoices');
  inv.addRow(['Invoice no', 'Date', 'Customer', 'Amount']);
  inv.addRow(['INV-1', new Date(Date.UTC(2024, 0, 5)), 'Alder Supplies', 1234.56]);
  inv.addRow(['INV-2', new Date(Date.UTC(2024, 1, 29)), { richText: [{ text: 'Birch ' }, { text: 'Timber', font: { bold: true } }] }, -20]);
  inv.addRow([]); // an empty row 4
  inv.addRow(['INV-3', '2024-03-31', 'Cobalt Print', { formula: 'D2/2', result: 617.28 }]);
  inv.addRow(['INV-1', new Date(Date.UTC(2024, 3, 1, 10, 30)), 'Dunmore', '1,000.00']); // duplicate key, row 6
  inv.addRow(['', 'not a date', 'Elmstead', 'n/a']); // blank key, bad date, bad amount, row 7
  inv.addRow(['INV-5', new Date(Date.UTC(2024, 4, 1)), 'Fernhill', 0.1, 'stray']); // value beyond the header, row 8
  for (const r of [2, 3, 6, 8]) inv.getCell(`B${r}`).numFmt = 'yyyy-mm-dd';
  const other = wb.addWorksheet('Notes');
  other.addRow(['Ref', 'Text']);
  other.addRow(['N1', 'first note']);
  await wb.xlsx.writeFile(book);
});

const src = (more: Partial<XlsxSource> = {}): XlsxSource => ({ kind: 'xlsx', path: book, keyColumn: 'Invoice no', ...more });

describe('XLSX populations', () => {
  it('reads the first sheet by default: fingerprint and validation', async () => {
    const s = await scanPopulation(src({ amountColumn: 'Amount', dateColumn: 'Date' }));
    expect(s.fingerprint).toMatchObject({
      sha256: createHash('sha256').update(readFileSync(book)).digest('hex'),
      format: 'xlsx',
      sheet: 'Invoices',
      rowCount: 6,
      firstKey: 'INV-1',
      lastKey: 'INV-5',
      columns: ['Invoice no', 'Date', 'Customer', 'Amount'],
      // 1234.56 - 20 + 617.28 + 1000.00 + 0.1 (n/a is not an amount)
      amountTotal: '2831.94',
      dateRange: { earliest: '2024-01-05', latest: '2024-05-01' },
    });
    const v = s.validation;
    expect(v.ok).toBe(false);
    expect(v.duplicateKeys.examples).toEqual([{ key: 'INV-1', occurrences: 2, rows: [2, 6] }]);
    expect(v.blankKeys.examples.map((e) => e.row)).toEqual([7]);
    expect(v.badRows.examples).toEqual([{ row: 8, reason: 'values beyond the last named column' }]);
    expect(v.badAmounts.examples.map((e) => [e.row, e.value])).toEqual([[7, 'n/a']]);
    expect(v.badDates.examples.map((e) => [e.row, e.value])).toEqual([[7, 'not a date']]);
    expect(v.notes).toContain('Sheet read: "Invoices".');
    expect(v.notes.some((n) => n.startsWith('1 blank row is not counted as rows: rows 4'))).toBe(true);
  });

  it('reads a named sheet (case does not matter) and lists the sheets when it is absent', async () => {
    const s = await scanPopulation(src({ sheet: 'notes', keyColumn: 'Ref' }));
    expect(s.fingerprint).toMatchObject({ sheet: 'Notes', rowCount: 1, firstKey: 'N1', columns: ['Ref', 'Text'] });
    const err = await scanPopulation(src({ sheet: 'FY2024' })).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileInputError);
    expect((err as FileInputError).message).toBe('There is no sheet "FY2024" in invoices.xlsx.');
    expect((err as FileInputError).details).toEqual(['Sheets: "Invoices", "Notes"']);
  });

  it('fetches rows by position with their worksheet row numbers and the cell text a user sees', async () => {
    const rows = await readRowsAt(src(), [3, 0, 1]);
    expect(rows.map((r) => [r.position, r.row, r.key])).toEqual([
      [3, 6, 'INV-1'],
      [0, 2, 'INV-1'],
      [1, 3, 'INV-2'],
    ]);
    expect(rows[0]!.values).toEqual({ 'Invoice no': 'INV-1', Date: '2024-04-01 10:30:00', Customer: 'Dunmore', Amount: '1,000.00' });
    expect(rows[2]!.values.Customer).toBe('Birch Timber');
    await expect(readRowsAt(src(), [6])).rejects.toThrow(/beyond the population, which has 6 rows/);
  });

  it('finds listed keys', async () => {
    const r = await findKeys(src(), ['INV-3', 'INV-9']);
    expect(r.found.map((f) => [f.key, f.position, f.row])).toEqual([['INV-3', 2, 5]]);
    expect(r.unknown).toEqual(['INV-9']);
  });

  it('refuses a file that is not a workbook', async () => {
    const { file } = tempDir('tolrate-xlsx-bad-');
    const p = file('fake.xlsx', 'id,amount\n1,2\n');
    await expect(scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'id' })).rejects.toBeInstanceOf(FileInputError);
  });

  it('turns cell values into text as a spreadsheet shows them', () => {
    expect(cellText(1234.5599999999999)).toBe('1234.56');
    expect(cellText(0.30000000000000004)).toBe('0.3');
    expect(cellText(42)).toBe('42');
    expect(cellText(true)).toBe('TRUE');
    expect(cellText({ error: '#N/A' })).toBe('#N/A');
    expect(cellText({ text: 'site', hyperlink: 'https://example.org' })).toBe('site');
    expect(cellText({ formula: 'A1', result: new Date(Date.UTC(2024, 5, 30)) })).toBe('2024-06-30');
    expect(cellText(null)).toBe('');
  });
});
