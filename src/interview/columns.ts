/**
 * The column names of a population file, read before the key column is known (so that the
 * interview can list them for the user to pick). They are read by the population reader itself
 * (the same CSV tokenizer, the same workbook reader) and cleaned as it cleans them, so they
 * match the names in the fingerprint.
 */
import { basename } from 'node:path';
import { FileInputError } from '../errors.js';
import { headerNames } from '../population/columns.js';
import { readCsvHeader } from '../population/csv.js';
import { readXlsxHeader } from '../population/xlsx.js';
import { listSheets, sheetLabel, type SheetInfo } from '../population/workbook.js';

export async function csvColumns(path: string, delimiter?: string): Promise<string[]> {
  const head = await readCsvHeader(path, delimiter);
  if (!head) throw new FileInputError(path, `${basename(path)} is empty: it has no header row.`);
  if (head.fields.every((c) => c.trim() === '')) throw new FileInputError(path, `${basename(path)} has no header row.`);
  return headerNames(head.fields).names;
}

/** Header of an XLSX sheet (the first visible sheet when none is named): the first row with any value. */
export async function xlsxColumns(path: string, sheet?: string): Promise<{ sheet: string; columns: string[] }> {
  const got = await readXlsxHeader(path, sheet);
  if (!got.values) throw new FileInputError(path, `The sheet "${got.sheet}" of ${basename(path)} is empty.`);
  return { sheet: got.sheet, columns: headerNames(got.values).names };
}

/** The worksheets of an XLSX workbook, in order, each with whether it is hidden (the rows are not read). */
export async function xlsxSheets(path: string): Promise<SheetInfo[]> {
  const sheets = await listSheets(path);
  if (sheets.length === 0) throw new FileInputError(path, `${basename(path)} has no worksheet.`);
  return sheets;
}

/** "A", "B" (hidden), ... for messages and help lines. */
export function sheetList(sheets: readonly SheetInfo[]): string {
  return sheets.map(sheetLabel).join(', ');
}
