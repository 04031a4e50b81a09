/**
 * The workbook reader on what the property test leaves out: the cases where it reads a cell as
 * the file format says and the previous reader (exceljs) did not, damaged and hostile files,
 * the caps, hidden sheets, and the interview's and `tolrate select`'s use of it. Expected texts
 * come from the file format: ECMA-376 Part 1 (SpreadsheetML: 18.3.1.4 c, 18.3.1.96 v, 18.4.8 si,
 * 18.4.6 rPh, 18.17.4.1 date1904, ST_CellType "d" ISO 8601), XML 1.0 (4.6 predefined entities,
 * 2.11 end-of-line handling) and PKWARE APPNOTE.TXT (zip).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import type { CommandContext } from '../../src/commands/types.js';
import { FileInputError } from '../../src/errors.js';
import { csvColumns, xlsxColumns, xlsxSheets } from '../../src/interview/columns.js';
import { readCsvHeader } from '../../src/population/csv.js';
import { readRowsAt, scanPopulation } from '../../src/population/index.js';
import { forgetSheetIndex } from '../../src/population/xlsx.js';
import { DEFAULT_LIMITS, Workbook } from '../../src/population/workbook.js';
import { book, bookParts, esc, zip } from '../fixtures/xlsx-parts.js';
import { tempDir } from './helpers.js';
import { exceljsRows, ourRows } from './xlsx-reference.js';

const { dir, file } = tempDir('tolrate-xlsx-reader-');

async function cli(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const ctx: CommandContext = {
    stdout: { write: (s: string) => (out += s) },
    stderr: { write: (s: string) => (err += s) },
    isTTY: false,
    color: false,
    cwd: dir,
    env: {},
  };
  const code = await runCli(args, ctx);
  return { code, out, err };
}

const select = (f: string, ...more: string[]) => cli('select', '--population', f, '--key', 'Key', '--size', '1', '--seed', '1', '--force', '--out', join(dir, 'out.csv'), ...more);

const HEADER = '<row r="1"><c r="A1" t="inlineStr"><is><t>Key</t></is></c><c r="B1" t="inlineStr"><is><t>Value</t></is></c></row>';
const row = (r: number, value: string, key = `K${r}`) => `<row r="${r}"><c r="A${r}" t="inlineStr"><is><t>${key}</t></is></c>${value.replace(/R/g, `B${r}`)}</row>`;

describe('cells read as the file format says (where exceljs did not)', () => {
  it('formula cached values are read like constants of their type', async () => {
    const rows =
      HEADER +
      row(2, '<c r="R"><f>A1-A1</f><v>0</v></c>') + // 0 is 0, not blank (exceljs: '')
      row(3, '<c r="R" t="b"><f>1=2</f><v>0</v></c>') + // FALSE (exceljs: '')
      row(4, '<c r="R" t="b"><f>1=1</f><v>1</v></c>') + // TRUE (exceljs: '1')
      row(5, '<c r="R" t="e"><f>NA()</f><v>#N/A</v></c>') + // the error code (exceljs: '')
      row(6, '<c r="R" s="1"><f>DATE(2024,1,5)</f><v>45296</v></c>'); // a date format makes it a date (exceljs: '45296')
    const p = file('formulas.xlsx', book({ sheets: [{ name: 'Data', rows }], xfs: [14] }));
    expect((await ourRows(p)).map((r) => r.texts[1])).toEqual(['Value', '0', 'FALSE', 'TRUE', '#N/A', '2024-01-05']);
    // The same file through exceljs, to show the difference is real.
    expect((await exceljsRows(p, 'Data')).map((r) => r.texts[1])).toEqual(['Value', undefined, undefined, '1', undefined, '45296']);
  });

  it('strings: every run of an inline string, no phonetic reading, entities decoded once, line ends as LF', async () => {
    const rows =
      HEADER +
      row(2, '<c r="R" t="inlineStr"><is><r><t>Birch </t></r><r><rPr><b/></rPr><t>Timber</t></r></is></c>') +
      row(3, '<c r="R" t="s"><v>0</v></c>') +
      row(4, '<c r="R" t="str"><v>AT&amp;amp;T &lt;1&gt; &#x41;&#66;</v></c>') +
      row(5, '<c r="R" t="inlineStr"><is><t>one\r\ntwo\rthree</t></is></c>') +
      row(6, '<c r="R" t="inlineStr"><is><t><![CDATA[a<b&c]]></t></is></c>') +
      row(7, '<c r="R"><v></v></c>');
    const p = file('strings.xlsx', book({ sheets: [{ name: 'Data', rows }], shared: ['<t>漢字</t><rPh sb="0" eb="2"><t>カンジ</t></rPh><phoneticPr fontId="1"/>'] }));
    expect((await ourRows(p)).map((r) => r.texts[1] ?? '')).toEqual(['Value', 'Birch Timber', '漢字', 'AT&amp;T <1> AB', 'one\ntwo\nthree', 'a<b&c', '']);
  });

  it('ISO 8601 date cells (t="d"), date1904="true", prefixed names and cells without a reference', async () => {
    const rows = HEADER + row(2, '<c r="R" t="d"><v>2024-01-05</v></c>') + row(3, '<c r="R" t="d"><v>2024-01-05T10:30:00</v></c>') + row(4, '<c r="R" s="1"><v>0</v></c>');
    const xml = book({ sheets: [{ name: 'Data', rows }], xfs: [14], date1904: true });
    const p = file('iso.xlsx', xml);
    // Serial 0 in the 1904 system is 1904-01-01.
    expect((await ourRows(p)).map((r) => r.texts[1])).toEqual(['Value', '2024-01-05', '2024-01-05 10:30:00', '1904-01-01']);
    const parts = bookParts({ sheets: [{ name: 'Data', rows: '' }] }).map((q) =>
      q.name === 'xl/worksheets/sheet1.xml'
        ? { ...q, data: '<x:worksheet xmlns:x="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><x:sheetData><x:row><x:c t="inlineStr"><x:is><x:t>Key</x:t></x:is></x:c><x:c t="inlineStr"><x:is><x:t>Value</x:t></x:is></x:c></x:row><x:row><x:c><x:v>1</x:v></x:c><x:c><x:v>2.5</x:v></x:c></x:row></x:sheetData></x:worksheet>' }
        : q,
    );
    const p2 = file('prefixed.xlsx', zip(parts));
    expect(await ourRows(p2)).toEqual([
      { row: 1, texts: ['Key', 'Value'] },
      { row: 2, texts: ['1', '2.5'] },
    ]);
  });

  it('characters are whole across chunk boundaries of a large sheet', async () => {
    const word = 'Ærøskøbing 日本語 😀 ';
    let rows = HEADER;
    for (let r = 2; r <= 4000; r++) rows += row(r, `<c r="R" t="inlineStr"><is><t>${esc(word.repeat(3))}${r}</t></is></c>`);
    const p = file('wide.xlsx', book({ sheets: [{ name: 'Data', rows }] }));
    const got = await ourRows(p);
    expect(got).toHaveLength(4000);
    got.slice(1).forEach((r) => expect(r.texts[1]).toBe(`${word.repeat(3)}${r.row}`));
  });
});

/** A workbook whose sheet's deflate data has bytes changed (the zip's directory is intact). */
function damaged(): Buffer {
  let rows = HEADER;
  for (let r = 2; r < 3000; r++) rows += row(r, `<c r="R"><v>${r * 7}</v></c>`);
  const b = book({ sheets: [{ name: 'Data', rows }] });
  const at = b.indexOf('xl/worksheets/sheet1.xml') + 'xl/worksheets/sheet1.xml'.length + 40;
  for (let i = 0; i < 64; i++) b[at + i]! ^= 0x5a;
  return b;
}

describe('damaged and hostile workbooks: a message naming the problem, exit code 2', () => {
  const ok = book({ sheets: [{ name: 'Data', rows: HEADER + row(2, '<c r="R"><v>1</v></c>') }] });

  const cases: Array<[string, Buffer | string, RegExp]> = [
    ['a CSV file named .xlsx', 'Key,Value\nK2,1\n', /is text, not an XLSX workbook \(perhaps a CSV file named \.xlsx\)/],
    ['an empty file', '', /is empty: it is not an XLSX workbook/],
    ['an old .xls (compound file)', Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(600)]), /old Excel \(\.xls\) workbook or a password-protected one/],
    ['a zip cut short', ok.subarray(0, Math.floor(ok.length / 2)), /cut short or damaged/],
    ['a zip without a workbook', zip([{ name: 'readme.txt', data: 'hello' }]), /a zip file but not an XLSX workbook \(it has no xl\/workbook\.xml\)/],
    ['a missing sheet part', zip(bookParts({ sheets: [{ name: 'Data', rows: '' }] }).filter((q) => !q.name.startsWith('xl/worksheets/'))), /the part of sheet "Data" \(xl\/worksheets\/sheet1\.xml\) is missing/],
    ['a workbook part that is not XML', zip(bookParts({ sheets: [{ name: 'Data', rows: '' }] }).map((q) => (q.name === 'xl/workbook.xml' ? { ...q, data: '<workbook><sheets><sheet name="a"' } : q))), /not well-formed XML/],
    ['a row past the last a worksheet can hold', book({ sheets: [{ name: 'Data', rows: HEADER + row(1_048_577, '<c r="R"><v>1</v></c>') }] }), /rows beyond row 1,048,576 \(the cap on rows; a worksheet holds at most 1,048,576\)/],
    ['a sheet whose compressed bytes are damaged', damaged(), /the zip is damaged: xl\/worksheets\/sheet1\.xml cannot be unpacked/],
    ['a cell past column XFD', book({ sheets: [{ name: 'Data', rows: HEADER + '<row r="2"><c r="XFE2"><v>1</v></c></row>' }] }), /beyond column XFD/],
  ];
  for (const [what, bytes, message] of cases) {
    it(what, async () => {
      const p = file(`bad-${what.replace(/\W+/g, '-')}.xlsx`, bytes);
      const r = await select(p);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
      expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
    });
  }

  /** A zip whose directory gives the sheet part another uncompressed size. */
  function withDeclaredSize(bytes: Buffer, name: string, size: number): Buffer {
    const b = Buffer.from(bytes);
    for (let i = b.length - 22; i >= 0; i--) {
      if (b.readUInt32LE(i) !== 0x02014b50) continue;
      const len = b.readUInt16LE(i + 28);
      if (b.toString('utf8', i + 46, i + 46 + len) === name) b.writeUInt32LE(size, i + 24);
    }
    return b;
  }

  it('a zip bomb: a sheet whose directory gives more than the cap is refused before it is unpacked', async () => {
    const p = file('bomb-declared.xlsx', withDeclaredSize(ok, 'xl/worksheets/sheet1.xml', 0xfffffff0));
    const r = await select(p);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/sheet "Data" unpacks to more than 2 GiB of XML \(the cap on a part's uncompressed size\)/);
  });

  it('a zip bomb: a sheet that unpacks to more than its directory says stops there', async () => {
    // 20 MB of blank rows compress to about 20 KB; the directory says 100 bytes.
    const blank = '<row/>'.repeat(3_000_000);
    const big = book({ sheets: [{ name: 'Data', rows: HEADER + blank }] });
    const p = file('bomb-lying.xlsx', withDeclaredSize(big, 'xl/worksheets/sheet1.xml', 100));
    const r = await select(p);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/holds more than the 100 bytes its directory gives/);
  });

  it('the caps on a part, the shared strings and the rows, each named', async () => {
    const shared = Array.from({ length: 500 }, (_, i) => `<t>customer number ${i}</t>`);
    const rows = HEADER + Array.from({ length: 40 }, (_, i) => row(i + 2, `<c r="R" t="s"><v>${i}</v></c>`)).join('');
    const p = file('caps.xlsx', book({ sheets: [{ name: 'Data', rows }], shared }));
    const read = async (limits: Partial<typeof DEFAULT_LIMITS>) => {
      const wb = await Workbook.open(p, { ...DEFAULT_LIMITS, ...limits });
      try {
        await wb.rows(wb.pick(undefined), { row: () => undefined });
        return 'read';
      } catch (e) {
        return (e as Error).message;
      } finally {
        await wb.close();
      }
    };
    expect(await read({})).toBe('read');
    expect(await read({ maxSharedStringBytes: 4096 })).toMatch(/its shared strings come to more than 0 MiB \(the cap on shared-string bytes\)/);
    expect(await read({ maxPartBytes: 1000 })).toMatch(/unpacks to more than 0 MiB .*\(the cap on a part's uncompressed size\)/);
    expect(await read({ maxRows: 10 })).toMatch(/rows beyond row 10 \(the cap on rows/);
  });
});

describe('sheets: hidden ones are never the default; several visible ones need a name', () => {
  const sheet = (k: string) => HEADER + row(2, '<c r="R"><v>1</v></c>', k);

  it('the default is the first visible sheet; hidden sheets are marked in every list', async () => {
    const p = file('hidden.xlsx', book({ sheets: [{ name: 'Old', state: 'hidden', rows: sheet('OLD-1') }, { name: 'Data', rows: sheet('NEW-1') }, { name: 'Macro', state: 'veryHidden', rows: sheet('M') }] }));
    const s = await scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'Key' });
    expect(s.fingerprint).toMatchObject({ sheet: 'Data', firstKey: 'NEW-1' });
    expect((await scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'Key', sheet: 'old' })).fingerprint.firstKey).toBe('OLD-1');
    const err = (await scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'Key', sheet: 'FY2024' }).catch((e: unknown) => e)) as FileInputError;
    expect(err.details).toEqual(['Sheets: "Old" (hidden), "Data", "Macro" (hidden)']);
    expect((await xlsxSheets(p)).map((x) => [x.name, x.hidden])).toEqual([
      ['Old', true],
      ['Data', false],
      ['Macro', true],
    ]);
    expect(await xlsxColumns(p)).toEqual({ sheet: 'Data', columns: ['Key', 'Value'] });
    const r = await select(p);
    expect(r.code).toBe(0);
    expect(r.out).toContain('sheet "Data"');
  });

  it('select refuses a workbook with several visible sheets without --sheet, naming them', async () => {
    const p = file('several.xlsx', book({ sheets: [{ name: 'Notes', rows: sheet('N') }, { name: 'Data', rows: sheet('D') }, { name: 'Old', state: 'hidden', rows: sheet('O') }] }));
    const r = await select(p);
    expect(r.code).toBe(2);
    expect(r.err).toContain('has 2 visible sheets; name the one to read with --sheet NAME.');
    expect(r.err).toContain('Sheets: "Notes", "Data", "Old" (hidden)');
    const ok = await select(p, '--sheet', 'Data');
    expect(ok.code).toBe(0);
  });

  it('the header is the first row with a value, wherever it is; the shared strings may come after the sheet', async () => {
    const rows = '<row r="3"/><row r="4"><c r="B4" t="s"><v>0</v></c><c r="C4" t="s"><v>1</v></c></row><row r="6"><c r="B6"><v>7</v></c><c r="C6" t="s"><v>2</v></c></row>';
    const p = file('late-header.xlsx', book({ sheets: [{ name: 'Data', rows }], shared: ['<t>Key</t>', '<t>Name</t>', '<t>Alder</t>'], order: ['xl/worksheets/sheet1.xml', 'xl/workbook.xml'] }));
    expect(readFileSync(p).indexOf('sheet1.xml')).toBeLessThan(readFileSync(p).indexOf('sharedStrings.xml'));
    expect(await xlsxColumns(p, 'data')).toEqual({ sheet: 'Data', columns: ['(column 1)', 'Key', 'Name'] });
    const s = await scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'Key' });
    expect(s.fingerprint).toMatchObject({ rowCount: 1, firstKey: '7' });
  });
});

describe('CSV headers: the interview and the population reader use one tokenizer', () => {
  it('a quoted line break in a header name is read the same way by both', async () => {
    const p = file('multiline.csv', '"Invoice\nno",amount\nA-1,2.00\n');
    expect(await csvColumns(p)).toEqual(['Invoice\nno', 'amount']);
    expect((await readCsvHeader(p))?.fields).toEqual(['Invoice\nno', 'amount']);
    const s = await scanPopulation({ kind: 'csv', path: p, keyColumn: 'Invoice\nno' });
    expect(s.fingerprint).toMatchObject({ columns: ['Invoice\nno', 'amount'], rowCount: 1, firstKey: 'A-1' });
  });

  it('blank lines before the header are skipped by both', async () => {
    const p = file('blank-first.csv', '\n\nid;amount\n1;2\n');
    expect(await csvColumns(p)).toEqual(['id', 'amount']);
    expect((await scanPopulation({ kind: 'csv', path: p, keyColumn: 'id' })).fingerprint.columns).toEqual(['id', 'amount']);
  });
});

it('makes no temporary copy of a sheet, even when the sheet comes before the shared strings', async () => {
  // exceljs copied such a sheet to a tmp-* file in the temp folder (the tmp package's naming);
  // a copy of this sheet would hold its marker key.
  const marker = 'NO-TEMP-COPY-7f3a9c';
  const p = file('order.xlsx', book({ sheets: [{ name: 'Data', rows: HEADER + row(2, '<c r="R" t="s"><v>0</v></c>', marker) }], shared: ['<t>x</t>'], order: ['xl/worksheets/sheet1.xml'] }));
  const before = new Set(readdirSync(tmpdir()));
  const s = await scanPopulation({ kind: 'xlsx', path: p, keyColumn: 'Key' });
  expect(s.fingerprint).toMatchObject({ rowCount: 1, firstKey: marker });
  const copies = readdirSync(tmpdir()).filter((f) => {
    if (before.has(f)) return false;
    try {
      return readFileSync(join(tmpdir(), f)).includes(marker);
    } catch {
      return false; // a folder, or gone already
    }
  });
  expect(copies).toEqual([]);
});

describe('fetching rows after a scan (the row index)', () => {
  it('gives the same rows as a reading from the top, across blank rows and rows without a number', async () => {
    let rows = HEADER;
    for (let r = 2; r <= 5200; r++) {
      if (r % 997 === 0) rows += `<row r="${r}"/>`; // blank rows
      else if (r % 1500 === 0) rows += `<row><c t="inlineStr"><is><t>K${r}</t></is></c><c><v>${r}</v></c></row>`; // no r: the one after
      else rows += row(r, `<c r="R"><v>${r}</v></c>`);
    }
    const p = file('indexed.xlsx', book({ sheets: [{ name: 'Data', rows }] }));
    const src = { kind: 'xlsx' as const, path: p, keyColumn: 'Key' };
    const positions = [5193, 0, 1023, 1024, 1025, 2047, 3000, 4096, 17, 4095, 5000];
    forgetSheetIndex();
    const fresh = await readRowsAt(src, positions);
    const scan = await scanPopulation(src);
    expect(scan.fingerprint.rowCount).toBe(5194); // 5,199 rows less the 5 blank ones
    const indexed = await readRowsAt(src, positions);
    expect(indexed).toEqual(fresh);
    expect(indexed.map((r) => [r.position, r.row, r.key])).toContainEqual([1024, 1027, 'K1027']); // rows 2..1027 less the blank row 997
    expect(indexed.find((r) => r.position === 5193)?.key).toBe('K5200');
    await expect(readRowsAt(src, [5194])).rejects.toThrow(/beyond the population, which has 5,194 rows/);
  });
});

describe('shared strings beyond one 16 MiB page', () => {
  it('every string is read whole on either side of a page boundary', async () => {
    // 1,300 strings of 16,000 bytes (about 20 MB): the text spans two pages.
    const text = (i: number) => `${String(i).padStart(5, '0')}${'é'.repeat(7995)}${i % 10}`;
    const shared = ['<t>Key</t>', '<t>Value</t>', ...Array.from({ length: 1300 }, (_, i) => `<t>${text(i)}</t>`)];
    let rows = '<row r="1"><c r="A1" t="s"><v>0</v></c><c r="B1" t="s"><v>1</v></c></row>';
    for (let i = 0; i < 1300; i++) rows += `<row r="${i + 2}"><c r="A${i + 2}"><v>${i}</v></c><c r="B${i + 2}" t="s"><v>${i + 2}</v></c></row>`;
    const p = file('pages.xlsx', book({ sheets: [{ name: 'Data', rows }], shared }));
    const got = await ourRows(p);
    expect(got).toHaveLength(1301);
    got.slice(1).forEach((r, i) => expect(r.texts[1], `string ${i}`).toBe(text(i)));
  });
});
