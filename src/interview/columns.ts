/**
 * The column names of a population file, read before the key column is known (so that the
 * interview can list them for the user to pick). Names are cleaned as the population reader
 * cleans them, so they match the names in the fingerprint.
 */
import { open } from 'node:fs/promises';
import { basename } from 'node:path';
import { parse } from 'csv-parse/sync';
import { FileInputError } from '../errors.js';
import { assertRegularFile } from '../io/read.js';
import { cellText, detectDelimiter, delimiterOption } from '../population/index.js';
import { headerNames } from '../population/columns.js';

const HEAD_BYTES = 1 << 16;

export async function csvColumns(path: string, delimiter?: string): Promise<string[]> {
  assertRegularFile(path, 'The population file');
  const fh = await open(path, 'r').catch((e: NodeJS.ErrnoException) => {
    throw new FileInputError(path, e.code === 'ENOENT' ? `No file at ${path}.` : `Cannot read ${path}: ${e.message}`);
  });
  let head: Buffer;
  let whole: boolean;
  try {
    const { size } = await fh.stat();
    const n = Math.min(size, HEAD_BYTES);
    head = Buffer.alloc(n);
    if (n > 0) await fh.read(head, 0, n, 0);
    whole = n === size;
  } finally {
    await fh.close();
  }
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b) {
    throw new FileInputError(path, `${basename(path)} is a zip file (probably an .xlsx workbook), not CSV text.`);
  }
  const body = head.length >= 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf ? head.subarray(3) : head;
  const d = delimiter !== undefined ? delimiterOption(delimiter) : detectDelimiter(body, whole);
  const text = body.toString('utf8');
  const firstLines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  if (firstLines.length === 0) throw new FileInputError(path, `${basename(path)} is empty: it has no header row.`);
  let rec: string[] | undefined;
  try {
    const recs = parse(text, { delimiter: d, relax_column_count: true, relax_quotes: true, skip_empty_lines: true, to_line: 1 }) as string[][];
    rec = recs[0];
  } catch (e) {
    throw new FileInputError(path, `The header row of ${basename(path)} cannot be read: ${(e as Error).message}`);
  }
  if (!rec || rec.every((c) => c.trim() === '')) throw new FileInputError(path, `${basename(path)} has no header row.`);
  return headerNames(rec).names;
}

interface XRow {
  values: unknown;
}
interface SheetReader {
  name?: string;
  [Symbol.asyncIterator](): AsyncGenerator<XRow>;
}
interface BookReader {
  model?: { sheets?: Array<{ name: string }> };
  [Symbol.asyncIterator](): AsyncGenerator<SheetReader>;
}

/** Header of an XLSX sheet (the first sheet when none is named): the first row with any value. */
export async function xlsxColumns(path: string, sheet?: string): Promise<{ sheet: string; columns: string[] }> {
  assertRegularFile(path, 'The population file');
  const ExcelJS = (await import('exceljs')).default;
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(path, {
    worksheets: 'emit',
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    entries: 'ignore',
  }) as unknown as BookReader;
  const seen: string[] = [];
  try {
    for await (const ws of reader) {
      const name = ws.name ?? `Sheet${seen.length + 1}`;
      seen.push(name);
      const isTarget = sheet !== undefined ? name.toLowerCase() === sheet.trim().toLowerCase() : seen.length === 1;
      if (!isTarget) continue;
      for await (const r of ws) {
        const raw = r.values as unknown[];
        const vals = raw.slice(1).map((v) => cellText(v));
        let last = vals.length;
        while (last > 0 && vals[last - 1] === '') last--;
        if (last === 0) continue;
        return { sheet: name, columns: headerNames(vals.slice(0, last)).names };
      }
      throw new FileInputError(path, `The sheet "${name}" of ${basename(path)} is empty.`);
    }
  } catch (e) {
    if (e instanceof FileInputError) throw e;
    throw new FileInputError(path, `${basename(path)} cannot be read as an XLSX workbook (${(e as Error).message}).`);
  }
  throw new FileInputError(
    path,
    sheet !== undefined ? `There is no sheet "${sheet}" in ${basename(path)}.` : `${basename(path)} has no worksheet.`,
    seen.length ? [`Sheets: ${seen.map((s) => `"${s}"`).join(', ')}`] : [],
  );
}

/** The names of an XLSX workbook's worksheets, in order (the rows are not read). */
export async function xlsxSheetNames(path: string): Promise<string[]> {
  assertRegularFile(path, 'The population file');
  const ExcelJS = (await import('exceljs')).default;
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(path, {
    worksheets: 'emit',
    sharedStrings: 'ignore',
    styles: 'ignore',
    hyperlinks: 'ignore',
    entries: 'ignore',
  }) as unknown as BookReader;
  const seen: string[] = [];
  try {
    for await (const ws of reader) seen.push(ws.name ?? `Sheet${seen.length + 1}`);
  } catch (e) {
    throw new FileInputError(path, `${basename(path)} cannot be read as an XLSX workbook (${(e as Error).message}).`);
  }
  const names = reader.model?.sheets?.map((s) => s.name) ?? seen;
  if (names.length === 0) throw new FileInputError(path, `${basename(path)} has no worksheet.`);
  return names;
}
