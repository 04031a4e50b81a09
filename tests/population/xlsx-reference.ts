/**
 * The rows of a sheet as the previous population reader read them: exceljs's streaming
 * WorkbookReader (the library that reads and writes XLSX for this project since the start),
 * each value turned into text by cellText. Kept here, for the tests only, so the new reader can
 * be compared with it cell for cell.
 */
import { readFileSync } from 'node:fs';
import { Readable } from 'node:stream';
import ExcelJS from 'exceljs';
import JSZip from 'jszip';
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

const FIRST = ['_rels/.rels', 'xl/_rels/workbook.xml.rels', 'xl/workbook.xml', 'xl/styles.xml', 'xl/sharedStrings.xml'];

/**
 * The same parts, in the order exceljs's streaming reader needs to read a sheet as it streams
 * (workbook, relationships, styles and shared strings first). In any other order it copies each
 * sheet to a temporary file and reads it afterwards, a path that fails now and then under load
 * (an ENOENT from its temporary files, or "Cannot read properties of undefined"); the parts and
 * their bytes are the same, so the reference texts are too.
 */
async function inReadingOrder(path: string): Promise<Buffer> {
  const src = await JSZip.loadAsync(readFileSync(path));
  const out = new JSZip();
  const names = Object.keys(src.files).filter((n) => !src.files[n]!.dir);
  const ordered = [...FIRST.filter((n) => names.includes(n)), ...names.filter((n) => !FIRST.includes(n))];
  for (const n of ordered) out.file(n, await src.files[n]!.async('nodebuffer'));
  return out.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
}

/** Rows with any text, by exceljs. */
export async function exceljsRows(path: string, sheet: string): Promise<ReadRow[]> {
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from([await inReadingOrder(path)]), {
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
