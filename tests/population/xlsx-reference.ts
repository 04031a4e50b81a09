/**
 * The rows of a sheet as the previous population reader read them: exceljs's streaming
 * WorkbookReader (the library that reads and writes XLSX for this project since the start),
 * each value turned into text by cellText. Kept here, for the tests only, so the new reader can
 * be compared with it cell for cell.
 */
import ExcelJS from 'exceljs';
import { cellText } from '../../src/population/cell-text.js';
import { Workbook } from '../../src/population/workbook.js';

export interface ReadRow {
  row: number;
  /** Texts of columns 1..last non-empty column. */
  texts: string[];
}

interface XRow {
  number: number;
  values: unknown;
}
interface SheetReader {
  name?: string;
  [Symbol.asyncIterator](): AsyncGenerator<XRow>;
}

function trimmed(texts: string[]): string[] {
  let n = texts.length;
  while (n > 0 && texts[n - 1] === '') n--;
  return texts.slice(0, n);
}

/** Rows with any text, by exceljs. */
export async function exceljsRows(path: string, sheet: string): Promise<ReadRow[]> {
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(path, {
    worksheets: 'emit',
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    entries: 'ignore',
  }) as unknown as AsyncIterable<SheetReader>;
  const out: ReadRow[] = [];
  for await (const ws of reader) {
    if (ws.name !== sheet) {
      for await (const _ of ws) void _;
      continue;
    }
    for await (const r of ws) {
      const raw = r.values as unknown[];
      const texts: string[] = [];
      for (let i = 1; i < raw.length; i++) texts.push(cellText(raw[i]));
      const t = trimmed(texts);
      if (t.length) out.push({ row: r.number, texts: t });
    }
  }
  return out;
}

/** Rows with any text, by the population's workbook reader. */
export async function ourRows(path: string, sheet?: string): Promise<ReadRow[]> {
  const wb = await Workbook.open(path);
  const out: ReadRow[] = [];
  try {
    await wb.rows(wb.pick(sheet), {
      row: (n, texts, last) => {
        if (last === 0) return;
        const t: string[] = [];
        for (let i = 0; i < last; i++) t.push(texts[i] ?? '');
        out.push({ row: n, texts: t });
      },
    });
  } finally {
    await wb.close();
  }
  return out;
}
