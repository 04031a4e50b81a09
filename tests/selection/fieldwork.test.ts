import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import { afterAll, describe, expect, it } from 'vitest';
import { readRowsAt, scanPopulation } from '../../src/population/index.js';
import {
  fieldworkItems,
  neutraliseCell,
  restoreCell,
  selectRandom,
  writeFieldworkSheet,
  type FieldworkSheet,
} from '../../src/selection/index.js';

const dir = mkdtempSync(join(tmpdir(), 'tolrate-fw-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const sheet: FieldworkSheet = {
  columns: ['invoice_no', 'customer', 'amount', 'Note'],
  items: [
    { seq: 1, role: 'sample', row: 14, key: 'INV-13', values: { invoice_no: 'INV-13', customer: 'Hale, "Birch" & Co', amount: '-12.00', Note: 'x' } },
    { seq: 2, role: 'sample', row: 3, key: '=HYPERLINK("http://x")', values: { invoice_no: '=HYPERLINK("http://x")', customer: '@SUM(A1)', amount: '+5', Note: '' } },
    { seq: 3, role: 'spare', row: 9, key: 'INV-8', values: { invoice_no: 'INV-8', customer: '\tTab', amount: '7', Note: 'two\nlines' } },
  ],
  attributes: [{ id: 'A1' }, { id: 'A2' }],
};

describe('fieldwork sheet', () => {
  it('neutralises cells a spreadsheet would run as a formula, and can undo it', () => {
    // The characters that start a formula in common spreadsheet programs (= + - @) and TAB/CR,
    // as listed by the OWASP "CSV Injection" guidance (from memory).
    for (const c of ['=1+1', '+1', '-1', '@A1', '\tx', '\rx']) {
      expect(neutraliseCell(c)).toBe(`'${c}`);
      expect(restoreCell(neutraliseCell(c))).toBe(c);
    }
    expect(neutraliseCell('INV-1')).toBe('INV-1');
    expect(restoreCell("'plain")).toBe("'plain");
  });

  it('writes the population columns with their own names, selection order, source row, role, result and note columns', async () => {
    const p = join(dir, 'fw.csv');
    await writeFieldworkSheet(p, sheet);
    const raw = readFileSync(p, 'utf8');
    expect(raw.startsWith('\uFEFFSeq,Role,Row,Key,')).toBe(true);
    expect(raw).toContain('\r\n');
    // Reference reader: csv-parse.
    const rows = parse(raw, { bom: true }) as string[][];
    expect(rows[0]).toEqual(['Seq', 'Role', 'Row', 'Key', 'invoice_no', 'customer', 'amount', 'Note (population)', 'A1 result', 'A2 result', 'Note']);
    expect(rows[1]).toEqual(['1', 'sample', '14', 'INV-13', 'INV-13', 'Hale, "Birch" & Co', "'-12.00", 'x', '', '', '']);
    expect(rows[2]!.slice(3, 7)).toEqual(["'=HYPERLINK(\"http://x\")", "'=HYPERLINK(\"http://x\")", "'@SUM(A1)", "'+5"]);
    expect(rows[3]!.slice(0, 8)).toEqual(['3', 'spare', '9', 'INV-8', 'INV-8', "'\tTab", '7', 'two\nlines']);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('uses the caller’s result columns when given, and one Result column by default', async () => {
    const p = join(dir, 'fw2.csv');
    await writeFieldworkSheet(p, { ...sheet, attributes: undefined, resultColumns: ['A1 result [C/D/V]', 'A1 found', 'Void reason'] });
    const head = (parse(readFileSync(p, 'utf8'), { bom: true }) as string[][])[0]!;
    expect(head.slice(-4)).toEqual(['A1 result [C/D/V]', 'A1 found', 'Void reason', 'Note']);
    await writeFieldworkSheet(p, { columns: ['k'], items: [{ seq: 1, role: 'sample', row: 2, key: 'a', values: { k: 'a' } }] });
    expect((parse(readFileSync(p, 'utf8'), { bom: true }) as string[][])[0]).toEqual(['Seq', 'Role', 'Row', 'Key', 'k', 'Result', 'Note']);
  });

  it('writes XLSX with the same table (text cells, never formulas) and an Instructions sheet', async () => {
    const p = join(dir, 'fw.xlsx');
    await writeFieldworkSheet(p, { ...sheet, notes: ['Seed 48213', 'Algorithm random-v1'] });
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(p);
    const ws = wb.getWorksheet('Fieldwork')!;
    expect(ws.getRow(1).values).toEqual([undefined, 'Seq', 'Role', 'Row', 'Key', 'invoice_no', 'customer', 'amount', 'Note (population)', 'A1 result', 'A2 result', 'Note']);
    // In a workbook the cell is stored as text (a string cell), so it stays as written and never runs.
    expect(ws.getCell('D3').value).toBe('=HYPERLINK("http://x")');
    expect(ws.getCell('D3').type).toBe(ExcelJS.ValueType.String);
    expect(ws.getCell('D3').formula).toBeUndefined();
    expect(wb.getWorksheet('Instructions')!.getCell('A1').value).toBe('Seed 48213');
  });

  it('refuses an empty list and formats it cannot write', async () => {
    await expect(writeFieldworkSheet(join(dir, 'e.csv'), { ...sheet, items: [] })).rejects.toThrow(/no items/);
    await expect(writeFieldworkSheet(join(dir, 'e.xls'), sheet)).rejects.toThrow(/not \.xls/);
  });

  it('from population to sheet: the rows at the selected positions, sample then spares', async () => {
    const pop = join(dir, 'pop.csv');
    writeFileSync(pop, ['id,amount', ...Array.from({ length: 50 }, (_, i) => `D${i},${i}.00`)].join('\n'));
    const src = { kind: 'csv' as const, path: pop, keyColumn: 'id' };
    const scan = await scanPopulation(src);
    const sel = selectRandom({ populationSize: scan.fingerprint.rowCount, sampleSize: 4, spares: 2, seed: '99' });
    const items = fieldworkItems(sel, await readRowsAt(src, sel.positions));
    expect(items.map((i) => [i.seq, i.role, i.key, i.row])).toEqual(sel.positions.map((p, i) => [i + 1, i < 4 ? 'sample' : 'spare', `D${p}`, p + 2]));
  });
});
