import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import type { CommandContext } from '../../src/commands/types.js';
import { readRowsAt, scanPopulation } from '../../src/population/index.js';
import { redraw } from '../../src/selection/index.js';

const cwd = mkdtempSync(join(tmpdir(), 'tolrate-select-'));
afterAll(() => rmSync(cwd, { recursive: true, force: true }));

// An invented population: 500 invoices of an invented firm.
const rows = ['invoice_no,date,customer,amount'];
for (let i = 1; i <= 500; i++) {
  const d = `2024-${String(1 + (i % 12)).padStart(2, '0')}-${String(1 + (i % 28)).padStart(2, '0')}`;
  rows.push(`INV-${String(i).padStart(5, '0')},${d},${i % 9 === 0 ? '"Rowan, Finch & Co"' : 'Alder Supplies'},${i}.${String(i % 100).padStart(2, '0')}`);
}
writeFileSync(join(cwd, 'invoices.csv'), rows.join('\n') + '\n');
writeFileSync(join(cwd, 'messy.csv'), 'invoice_no,amount\nA,1\nA,2\n,3\nB\n');

async function cli(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const ctx: CommandContext = {
    stdout: { write: (s: string) => (out += s) },
    stderr: { write: (s: string) => (err += s) },
    isTTY: false,
    color: false,
    cwd,
    env: {},
  };
  const code = await runCli(args, ctx);
  return { code, out, err };
}

describe('tolrate select', () => {
  it('--help shows usage, flags and an example', async () => {
    const r = await cli('select', '--help');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^tolrate select — /);
    for (const flag of ['--population FILE', '--key COLUMN', '--size N', '--seed S', '--method M', '--starts R', '--spares K', '--ranges LIST', '--exclude LIST', '--accept-issues', '--json', 'Examples:']) {
      expect(r.out).toContain(flag);
    }
  });

  it('selects from a CSV, prints fingerprint, validation, seed, algorithm and the sheet, and writes it', async () => {
    const r = await cli('select', '--population', 'invoices.csv', '--key', 'invoice_no', '--amount', 'amount', '--size', '12', '--spares', '2', '--seed', '48213', '--out', 'out/fw.csv', '--attributes', '2');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toContain('Rows          500 (the header and blank lines are not counted)');
    expect(r.out).toContain('Key column    invoice_no: first INV-00001, last INV-00500');
    // Sum of i + (i mod 100)/100 for i = 1..500: 125,250 + 5 × (0.01 + ... + 0.99) = 125,250 + 247.50.
    expect(r.out).toContain('Amount total  125,497.50 (column amount, 500 amounts read)');
    expect(r.out).toContain('Validation  no problems found');
    expect(r.out).toContain('Seed       48213');
    expect(r.out).toContain('Algorithm  random-v1:');
    expect(r.out).toContain(`Fieldwork sheet written: ${join(cwd, 'out', 'fw.csv')} (14 rows)`);
    expect(r.out).toContain('To draw the same items again: tolrate select --population invoices.csv --key invoice_no --size 12 --spares 2 --seed 48213 --out SHEET.csv');
    const sheet = parse(readFileSync(join(cwd, 'out', 'fw.csv'), 'utf8'), { bom: true }) as string[][];
    expect(sheet[0]).toEqual(['Seq', 'Role', 'Row', 'Key', 'invoice_no', 'date', 'customer', 'amount', 'A1 result', 'A2 result', 'Note']);
    expect(sheet).toHaveLength(15);
    expect(sheet.slice(1).map((s) => s[1])).toEqual([...Array(12).fill('sample'), 'spare', 'spare']);
    // The same items again from the recorded method, seed and population size.
    const again = redraw({ algorithm: 'random-v1', seed: '48213', sampleSize: 12, spares: 2 }, 500);
    expect(sheet.slice(1).map((s) => s[3])).toEqual(again.positions.map((p) => `INV-${String(p + 1).padStart(5, '0')}`));
    expect(sheet.slice(1).map((s) => Number(s[2]))).toEqual(again.positions.map((p) => p + 2));
  });

  it('--json prints one object with the fingerprint, validation, selection and items', async () => {
    const r = await cli('select', '--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5', '--method', 'systematic', '--seed', 's1', '--out', 'sys.csv', '--json');
    expect(r.code).toBe(0);
    const o = JSON.parse(r.out);
    const scan = await scanPopulation({ kind: 'csv', path: join(cwd, 'invoices.csv'), keyColumn: 'invoice_no' });
    expect(o.fingerprint).toEqual(scan.fingerprint);
    expect(o.selection).toMatchObject({ method: 'systematic', seed: 's1', sampleSize: 5, interval: 100, intervalExact: '100' });
    expect(o.items).toHaveLength(5);
    const rowsAt = await readRowsAt({ kind: 'csv', path: join(cwd, 'invoices.csv'), keyColumn: 'invoice_no' }, o.selection.positions);
    expect(o.items.map((i: { key: string }) => i.key)).toEqual(rowsAt.map((x) => x.key));
    expect(o.sheet).toBe(join(cwd, 'sys.csv'));
  });

  it('draws and shows a seed when none is given', async () => {
    const r = await cli('select', '--population', 'invoices.csv', '--key', 'invoice_no', '--size', '3', '--out', 'drawn.csv', '--json');
    const o = JSON.parse(r.out);
    expect(o.selection.seed).toMatch(/^\d{6,9}$/);
    expect(o.selection.seedDrawn).toBe(true);
  });

  it('stops with exit 2 on validation problems, unless --accept-issues', async () => {
    const r = await cli('select', '--population', 'messy.csv', '--key', 'invoice_no', '--size', '2', '--seed', '1', '--out', 'm.csv');
    expect(r.code).toBe(2);
    expect(r.out).toContain('Validation  3 problems');
    expect(r.out).toContain('"A" ×2 (lines 2, 3)');
    expect(r.err).toContain('give --accept-issues to go on');
    expect(existsSync(join(cwd, 'm.csv'))).toBe(false);
    const ok = await cli('select', '--population', 'messy.csv', '--key', 'invoice_no', '--size', '2', '--seed', '1', '--out', 'm.csv', '--accept-issues');
    expect(ok.code).toBe(0);
    expect(ok.out).toContain('The validation problems above were accepted');
    expect(existsSync(join(cwd, 'm.csv'))).toBe(true);
  });

  it('selects from document-number ranges with exclusions', async () => {
    const r = await cli('select', '--ranges', '40001-52650,60001-61200', '--exclude', '40017,40233', '--size', '40', '--seed', '7', '--out', 'r.csv', '--json');
    expect(r.code).toBe(0);
    const o = JSON.parse(r.out);
    expect(o.fingerprint.rowCount).toBe(13_848);
    expect(o.items.every((i: { key: string }) => i.key !== '40017' && i.key !== '40233')).toBe(true);
    const sheet = parse(readFileSync(join(cwd, 'r.csv'), 'utf8'), { bom: true }) as string[][];
    expect(sheet[0]).toEqual(['Seq', 'Role', 'Row', 'Key', 'document number', 'Result', 'Note']);
  });

  it('records a haphazard list with who and how, and its caution', async () => {
    const r = await cli('select', '--population', 'invoices.csv', '--key', 'invoice_no', '--method', 'haphazard', '--keys', 'INV-00010,INV-00200,INV-00333', '--size', '2', '--selected-by', 'R. Tester', '--how', 'picked from the printed listing', '--out', 'h.csv');
    expect(r.code).toBe(0);
    expect(r.out).toContain('Chosen by  R. Tester');
    expect(r.out).toContain('cannot support a statistical conclusion');
    const sheet = parse(readFileSync(join(cwd, 'h.csv'), 'utf8'), { bom: true }) as string[][];
    expect(sheet.slice(1).map((s) => [s[1], s[3]])).toEqual([
      ['sample', 'INV-00010'],
      ['sample', 'INV-00200'],
      ['spare', 'INV-00333'],
    ]);
    const bad = await cli('select', '--population', 'invoices.csv', '--key', 'invoice_no', '--method', 'haphazard', '--keys', 'INV-00010,NOPE', '--selected-by', 'x', '--how', 'y', '--out', 'h2.csv');
    expect(bad.code).toBe(2);
    expect(bad.out).toContain('1 listed key is not in the population: "NOPE".');
  });

  it('bad input is a clear message and exit 2, never a stack trace', async () => {
    const cases: Array<[string[], RegExp]> = [
      [['--population', 'nope.csv', '--key', 'k', '--size', '1', '--out', 'x.csv'], /Population file not found: .*nope\.csv/],
      [['--population', 'invoices.csv', '--key', 'invoice', '--size', '1', '--out', 'x.csv'], /The key column "invoice" is not in invoices\.csv\.\n {2}Columns in invoices\.csv: "invoice_no", "date", "customer", "amount"\n {2}Did you mean "invoice_no"\?/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '501', '--out', 'x.csv'], /larger than the population \(500 rows\)/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', 'ten', '--out', 'x.csv'], /--size: "ten" is not a whole number/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5', '--out', 'x.csv', '--method', 'systematic', '--starts', '2'], /must be a multiple of 2/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5'], /--out SHEET is required/],
      [['--population', 'invoices.csv', '--size', '5', '--out', 'x.csv'], /--key COLUMN is required/],
      [['--size', '5', '--out', 'x.csv'], /--population FILE \(or --ranges LIST, or --every UNIT --from DATE --to DATE\) is required/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5', '--out', 'x.csv', '--seed', 'sé'], /plain ASCII/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5', '--out', 'x.csv', '--method', 'stratified'], /--method must be random, systematic or haphazard/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '5', '--out', 'x.csv', '--spars', '1'], /unknown option --spars\. Did you mean --spares\?/],
      [['--ranges', '5-1', '--size', '1', '--out', 'x.csv'], /runs backwards/],
      [['--population', 'invoices.csv', '--key', 'invoice_no', '--size', '1', '--out', 'fw-exists.csv'], /already exists/],
    ];
    writeFileSync(join(cwd, 'fw-exists.csv'), 'keep me');
    for (const [args, msg] of cases) {
      const r = await cli('select', ...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err, args.join(' ')).toMatch(msg);
      expect(r.err).not.toMatch(/\n\s+at /);
    }
    expect(readFileSync(join(cwd, 'fw-exists.csv'), 'utf8')).toBe('keep me');
  });
});
