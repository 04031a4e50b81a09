import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FileInputError, TolrateInputError } from '../../src/errors.js';
import { forgetRowIndexes } from '../../src/population/csv.js';
import { CsvTokenizer } from '../../src/population/csv-tokenizer.js';
import { WORKER_MIN_BYTES } from '../../src/population/hash.js';
import { detectDelimiter, findKeys, readRowsAt, scanPopulation, type CsvSource } from '../../src/population/index.js';
import { tempDir } from './helpers.js';

const { file } = tempDir();
const sha = (p: string) => createHash('sha256').update(readFileSync(p)).digest('hex');

function tokenize(input: Buffer, delimiter = ',', chunks: number[] = []): Array<{ line: number; fields: string[] }> {
  const tok = new CsvTokenizer(delimiter.charCodeAt(0));
  const out: Array<{ line: number; fields: string[] }> = [];
  const take = (t: CsvTokenizer) => {
    if (t.isBlank()) return;
    const fields: string[] = [];
    for (let i = 0; i < t.count; i++) fields.push(t.field(i));
    out.push({ line: t.line, fields });
  };
  let at = 0;
  for (const c of chunks) {
    const end = Math.min(input.length, at + c);
    tok.push(input.subarray(at, end), take);
    at = end;
  }
  tok.push(input.subarray(at), take);
  tok.end(take);
  return out;
}

describe('CSV tokenizer', () => {
  it('reads quoted delimiters, doubled quotes, line breaks in quotes, CRLF, BOM', () => {
    const text = '\uFEFFid,name,note\r\n1,"Birch, Hale & Co","said ""ok"""\r\n2,"two\r\nlines",x\r\n3,,\r\n';
    expect(tokenize(Buffer.from(text))).toEqual([
      { line: 1, fields: ['id', 'name', 'note'] },
      { line: 2, fields: ['1', 'Birch, Hale & Co', 'said "ok"'] },
      { line: 3, fields: ['2', 'two\r\nlines', 'x'] },
      { line: 5, fields: ['3', '', ''] },
    ]);
  });

  it('takes a lone CR as a line end, and a last line without one', () => {
    expect(tokenize(Buffer.from('a,b\r1,2\r3,4'))).toEqual([
      { line: 1, fields: ['a', 'b'] },
      { line: 2, fields: ['1', '2'] },
      { line: 3, fields: ['3', '4'] },
    ]);
  });

  it('keeps a quote inside an unquoted field, flags text after a closing quote', () => {
    const tok = new CsvTokenizer(44);
    const seen: Array<[string[], string | undefined]> = [];
    const take = (t: CsvTokenizer) => {
      seen.push([[0, 1].map((i) => t.field(i)), t.problem]);
    };
    tok.push(Buffer.from('12" pipe,a\n"ab"c,d\n'), take);
    tok.end(take);
    expect(seen).toEqual([
      [['12" pipe', 'a'], undefined],
      [['"ab"c', 'd'], 'text follows a closing quote in a field'],
    ]);
  });

  // Reference: csv-parse (the npm package, RFC 4180 reader) on the same text, for well-formed CSV
  // cut into chunks at random places, so records that straddle chunk boundaries are covered.
  it('agrees with csv-parse on random well-formed CSV split at random points (property)', () => {
    const plain = fc.stringMatching(/^[a-zA-Z0-9 .é€-]{0,6}$/);
    const quoted = fc.stringMatching(/^[a-z,;"\n\r ]{0,6}$/).map((s) => `"${s.replace(/"/g, '""')}"`);
    const field = fc.oneof(plain, quoted);
    const record = fc.array(field, { minLength: 2, maxLength: 5 });
    fc.assert(
      fc.property(
        fc.array(record, { minLength: 1, maxLength: 12 }),
        fc.constantFrom('\n', '\r\n'),
        fc.boolean(),
        fc.boolean(),
        fc.array(fc.integer({ min: 1, max: 7 }), { maxLength: 30 }),
        (records, eol, bom, trailing, chunks) => {
          const text = (bom ? '\uFEFF' : '') + records.map((r) => r.join(',')).join(eol) + (trailing ? eol : '');
          const expected = parse(text, { bom: true, relax_column_count: true, record_delimiter: eol }) as string[][];
          const got = tokenize(Buffer.from(text), ',', chunks).map((r) => r.fields);
          expect(got).toEqual(expected);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('refuses a record that never ends (a quote left open) with the line it starts on', () => {
    const tok = new CsvTokenizer(44);
    tok.push(Buffer.from('a,b\n1,"open\n'), () => undefined);
    const big = Buffer.alloc(1 << 20, 0x41);
    expect(() => {
      for (let i = 0; i < 20; i++) tok.push(big, () => undefined);
    }).toThrow(/Line 2: one record runs for more than 16 MiB/);
  });
});

describe('delimiter detection', () => {
  it.each([
    ['a,b,c\n1,2,3\n', ','],
    ['a;b;c\n1;2,50;3\n4;5,00;6\n', ';'],
    ['a\tb\n1\t2\n', '\t'],
    ['a|b|c\n1|2|3\n', '|'],
    ['"x;y",b\n"1;2",3\n', ','],
    ['single\nvalue\n', ','],
  ])('%j -> %j', (text, d) => {
    expect(detectDelimiter(Buffer.from(text), true)).toBe(d);
  });
});

describe('scanPopulation (CSV)', () => {
  const src = (path: string, more: Partial<CsvSource> = {}): CsvSource => ({ kind: 'csv', path, keyColumn: 'invoice_no', ...more });

  it('fingerprints a clean file: SHA-256 of the bytes, count, first/last key, columns, total', async () => {
    const p = file('clean.csv', 'invoice_no,date,amount\nINV-1,2024-01-05,100.10\nINV-2,2024-02-29,"1,000.00"\nINV-3,2024-03-31,(0.10)\n');
    const s = await scanPopulation(src(p, { amountColumn: 'amount', dateColumn: 'date' }));
    expect(s.fingerprint).toMatchObject({
      sha256: sha(p), // reference: node:crypto over the raw file bytes
      rowCount: 3,
      firstKey: 'INV-1',
      lastKey: 'INV-3',
      columns: ['invoice_no', 'date', 'amount'],
      amountTotal: '1100.00',
      amountCount: 3,
      format: 'csv',
      delimiter: ',',
      dateRange: { earliest: '2024-01-05', latest: '2024-03-31' },
    });
    expect(s.validation.ok).toBe(true);
    expect(s.validation.messages).toEqual([]);
  });

  it('handles a BOM, CRLF and a semicolon delimiter, detected and noted', async () => {
    const p = file('semi.csv', '\uFEFFinvoice_no;customer;amount\r\nA1;"Hale; Sons";12,50\r\nA2;Birch;7\r\n');
    const s = await scanPopulation(src(p, { amountColumn: 'amount', decimalComma: true }));
    expect(s.fingerprint).toMatchObject({ rowCount: 2, firstKey: 'A1', lastKey: 'A2', delimiter: ';', amountTotal: '19.50', sha256: sha(p) });
    expect(s.fingerprint.columns).toEqual(['invoice_no', 'customer', 'amount']);
    expect(s.validation.ok).toBe(true);
    expect(s.validation.notes).toContain('Delimiter found from the first lines: semicolon.');
  });

  it('reports duplicates, blank keys, wrong field counts, bad amounts and dates with line numbers, keeping every row', async () => {
    const p = file(
      'messy.csv',
      [
        'invoice_no,date,amount',
        'INV-1,2024-01-01,10.00', // 2
        'INV-2,2024-01-02,abc', // 3 bad amount
        'INV-1,2024-01-03,5', // 4 duplicate of line 2
        ',2024-01-04,1', // 5 blank key
        'INV-4,2024-02-30,1', // 6 bad date
        'INV-5,2024-01-06', // 7 two fields
        '',
        'INV-6,2024-01-07,1,extra', // 9 four fields
        '" INV-1 ",2024-01-08,2', // 10 duplicate again (key trimmed)
        'INV-7,,', // 11 blank date and amount
      ].join('\n') + '\n',
    );
    const s = await scanPopulation(src(p, { amountColumn: 'amount', dateColumn: 'date' }));
    const v = s.validation;
    expect(s.fingerprint.rowCount).toBe(9);
    expect(v.ok).toBe(false);
    expect(v.duplicateKeys).toEqual({ count: 1, rows: 3, examples: [{ key: 'INV-1', occurrences: 3, rows: [2, 4, 10] }] });
    expect(v.blankKeys.count).toBe(1);
    expect(v.blankKeys.examples[0]!.row).toBe(5);
    expect(v.badRows.examples.map((e) => [e.row, e.reason])).toEqual([
      [7, '2 fields; the header has 3'],
      [9, '4 fields; the header has 3'],
    ]);
    expect(v.badAmounts.examples.map((e) => [e.row, e.reason, e.value])).toEqual([
      [3, 'not an amount', 'abc'],
      [7, 'no amount (the row is short)', undefined],
      [11, 'blank amount', ''],
    ]);
    expect(v.badDates.examples.map((e) => [e.row, e.value])).toEqual([
      [6, '2024-02-30'],
      [11, ''],
    ]);
    // 10 + 5 + 1 + 1 + 1 + 2 = 20 from the amounts that could be read
    expect(s.fingerprint.amountTotal).toBe('20.00');
    expect(v.notes.some((n) => n.includes('1 blank line is not counted as rows: lines 8'))).toBe(true);
    expect(v.messages.length).toBe(5);
    expect(v.messages[0]).toContain('"INV-1" ×3 (lines 2, 4, 10)');
  });

  it('confirms hash matches by comparing the keys themselves (no false duplicates)', async () => {
    const lines = ['invoice_no'];
    for (let i = 0; i < 5000; i++) lines.push(`K${i}`);
    lines.push('K17', 'K4999');
    const s = await scanPopulation(src(file('many.csv', lines.join('\n')), {}));
    expect(s.validation.duplicateKeys.count).toBe(2);
    expect(s.validation.duplicateKeys.examples).toEqual([
      { key: 'K17', occurrences: 2, rows: [19, 5002] },
      { key: 'K4999', occurrences: 2, rows: [5001, 5003] },
    ]);
    expect(s.fingerprint.lastKey).toBe('K4999');
  });

  it('keys are compared trimmed (also of no-break spaces), and repeated header names are told apart', async () => {
    const p = file('names.csv', 'invoice_no,amount,amount,\nA-1,1,2,\n\u00a0A-1 ,3,4,\n');
    const s = await scanPopulation(src(p, { amountColumn: 'amount' }));
    expect(s.fingerprint.columns).toEqual(['invoice_no', 'amount', 'amount (2)', '(column 4)']);
    expect(s.fingerprint.amountTotal).toBe('4'); // the first "amount" column: 1 + 3
    expect(s.validation.duplicateKeys.examples).toEqual([{ key: 'A-1', occurrences: 2, rows: [2, 3] }]);
    expect(s.validation.notes).toEqual(
      expect.arrayContaining([
        'The header names "amount" more than once; column 3 is shown as "amount (2)".',
        'Column 4 has no name in the header; it is shown as "(column 4)".',
      ]),
    );
    const rows = await readRowsAt(src(p), [1]);
    expect(rows[0]).toMatchObject({ key: 'A-1', values: { invoice_no: '\u00a0A-1 ', amount: '3', 'amount (2)': '4', '(column 4)': '' } });
  });

  it('an empty population and an empty file are reported, not thrown', async () => {
    const h = await scanPopulation(src(file('header-only.csv', 'invoice_no,amount\n')));
    expect(h.validation).toMatchObject({ ok: false, emptyPopulation: true });
    expect(h.fingerprint).toMatchObject({ rowCount: 0, firstKey: '', lastKey: '' });
    const e = await scanPopulation(src(file('empty.csv', '')));
    expect(e.validation.ok).toBe(false);
    expect(e.validation.messages).toContain('The file has no header line (it is empty or blank).');
  });

  it('names the available columns and the nearest one when the key column is absent', async () => {
    const p = file('cols.csv', 'Invoice No,Amount\n1,2\n');
    const err = await scanPopulation(src(p, { keyColumn: 'invoice_number' })).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileInputError);
    expect((err as FileInputError).message).toBe('The key column "invoice_number" is not in cols.csv.');
    expect((err as FileInputError).details).toEqual(['Columns in cols.csv: "Invoice No", "Amount"', 'Did you mean "Invoice No"?']);
    // Case and surrounding spaces do not matter when the match is unambiguous.
    const ok = await scanPopulation(src(p, { keyColumn: ' invoice no' }));
    expect(ok.fingerprint.keyColumn).toBe('Invoice No');
  });

  it('says plainly when the file is missing, or not CSV text', async () => {
    await expect(scanPopulation(src('/no/such/file.csv'))).rejects.toThrow('Population file not found: /no/such/file.csv');
    const zip = file('book.csv', Buffer.from([0x50, 0x4b, 3, 4, 0, 0]));
    await expect(scanPopulation(src(zip))).rejects.toThrow(/is a zip file/);
    const u16 = file('u16.csv', Buffer.from([0xff, 0xfe, 0x61, 0]));
    await expect(scanPopulation(src(u16))).rejects.toThrow(/UTF-16/);
  });

  it('reports lines that are not UTF-8', async () => {
    // Line 3 holds a lone byte 0xE9 (an "é" saved as Latin-1), which is not UTF-8.
    const p = file('latin1.csv', Buffer.concat([Buffer.from('invoice_no,customer\nA,ok\nB,caf'), Buffer.from([0xe9]), Buffer.from('\nC,ok\n')]));
    const s = await scanPopulation(src(p));
    expect(s.validation.badEncoding).toMatchObject({ count: 1, examples: [{ row: 3 }] });
    expect(s.validation.ok).toBe(false);
  });

  it('a large file across many chunks gives the same figures as a direct count', async () => {
    const rows: string[] = ['invoice_no,customer,amount'];
    let cents = 0n;
    for (let i = 0; i < 60_000; i++) {
      const c = (i * 7919) % 100000;
      cents += BigInt(c);
      rows.push(`N${i},"Name, ${i % 97}",${Math.floor(c / 100)}.${String(c % 100).padStart(2, '0')}`);
    }
    const p = file('big.csv', rows.join('\r\n') + '\r\n');
    const s = await scanPopulation(src(p, { keyColumn: 'invoice_no', amountColumn: 'amount' }));
    expect(s.fingerprint.rowCount).toBe(60_000);
    expect(s.fingerprint.amountTotal).toBe(`${cents / 100n}.${String(cents % 100n).padStart(2, '0')}`);
    expect(s.fingerprint.lastKey).toBe('N59999');
    expect(s.validation.ok).toBe(true);
    // Pass 2 through the scan's row index, with records cut by 64 KiB read boundaries.
    const want = [59_999, 0, 30_000, 1023, 1024, 2047, 45_678];
    const got = await readRowsAt(src(p, { keyColumn: 'invoice_no' }), want);
    expect(got.map((r) => [r.key, r.row, r.values.customer])).toEqual(want.map((i) => [`N${i}`, i + 2, `Name, ${i % 97}`]));
  });
});

describe('SHA-256 of a big file (hashed in a worker thread)', () => {
  it('equals node:crypto over the same bytes', async () => {
    const line = 'K0000000,Some customer name that is long enough,12345.67\n';
    const body = Buffer.alloc(line.length * 90_000);
    for (let i = 0; i < 90_000; i++) body.write(line.replace('0000000', String(i).padStart(7, '0')), i * line.length);
    const p = file('worker.csv', Buffer.concat([Buffer.from('id,name,amount\n'), body]));
    expect(readFileSync(p).length).toBeGreaterThan(WORKER_MIN_BYTES);
    const s = await scanPopulation({ kind: 'csv', path: p, keyColumn: 'id' });
    expect(s.fingerprint.sha256).toBe(sha(p));
    expect(s.fingerprint.rowCount).toBe(90_000);
  });
});

describe('readRowsAt and findKeys (CSV)', () => {
  const text = 'id,name,amount\n"A-0",zero,1\n\nA-1,"one, with comma",2\nA-2,"two\nlines",3\nA-3,three,4\n';
  const p = file('rows.csv', text);
  const s: CsvSource = { kind: 'csv', path: p, keyColumn: 'id' };

  it('returns the rows at the positions, in the order given, with the line a user sees', async () => {
    const rows = await readRowsAt(s, [3, 0, 2, 3]);
    expect(rows.map((r) => [r.position, r.row, r.key])).toEqual([
      [3, 7, 'A-3'],
      [0, 2, 'A-0'],
      [2, 5, 'A-2'],
      [3, 7, 'A-3'],
    ]);
    expect(rows[2]!.values).toEqual({ id: 'A-2', name: 'two\nlines', amount: '3' });
  });

  it('refuses positions past the end or not whole numbers', async () => {
    await expect(readRowsAt(s, [4])).rejects.toThrow(/Row position 4 is beyond the population, which has 4 rows/);
    await expect(readRowsAt(s, [-1])).rejects.toBeInstanceOf(TolrateInputError);
    await expect(readRowsAt(s, [1.5])).rejects.toBeInstanceOf(TolrateInputError);
  });

  it('gives the same rows with the row index of a scan as without (property over positions)', async () => {
    const lines = ['k,v'];
    for (let i = 0; i < 5000; i++) lines.push(i % 250 === 0 ? `k${i},"multi\nline ${i}"` : `k${i},v${i}`);
    for (let i = 0; i < 7; i++) lines.splice(100 + i * 600, 0, '');
    const big: CsvSource = { kind: 'csv', path: file('indexed.csv', lines.join('\n')), keyColumn: 'k' };
    const positions = fc.sample(fc.array(fc.integer({ min: 0, max: 4999 }), { minLength: 1, maxLength: 20 }), 5);
    forgetRowIndexes();
    const plain = await Promise.all(positions.map((ps) => readRowsAt(big, ps)));
    await scanPopulation(big);
    const indexed = await Promise.all(positions.map((ps) => readRowsAt(big, ps)));
    expect(indexed).toEqual(plain);
    for (const [i, ps] of positions.entries()) expect(plain[i]!.map((r) => r.key)).toEqual(ps.map((x) => `k${x}`));
  });

  it('checks the SHA-256 when asked', async () => {
    const good = sha(p);
    await expect(readRowsAt(s, [1], { expectSha256: good })).resolves.toHaveLength(1);
    await expect(readRowsAt(s, [1], { expectSha256: '0'.repeat(64) })).rejects.toThrow(/is not the file that was recorded/);
  });

  it('finds listed keys, with unknown, repeated and blank entries reported', async () => {
    const dup = file('dupkeys.csv', 'id,x\nA,1\nB,2\nA,3\n');
    const r = await findKeys({ kind: 'csv', path: dup, keyColumn: 'id' }, ['B', ' A ', 'Z', 'B', '']);
    expect(r.found.map((f) => [f.key, f.position, f.row])).toEqual([
      ['B', 1, 3],
      ['A', 0, 2],
    ]);
    expect(r).toMatchObject({ unknown: ['Z'], repeated: ['B'], blankEntries: 1, rowCount: 3 });
    expect(r.ambiguous).toEqual([{ key: 'A', occurrences: 2, rows: [2, 4] }]);
  });
});
