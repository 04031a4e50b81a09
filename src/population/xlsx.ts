import { createReadStream } from 'node:fs';
import { basename } from 'node:path';
import { FileInputError } from '../errors.js';
import { buildValidation, DuplicateCollector, Problems, RowChecker, type DuplicateResult } from './checker.js';
import { resolveColumns, type ResolvedColumns } from './columns.js';
import { fileError, openFile } from './file.js';
import { assertRegularFile } from '../io/read.js';
import { hashFileHere } from './hash.js';
import { hashString } from './key-index.js';
import type { KeyFinder, RowPicker } from './pick.js';
import type { Reporter } from './progress.js';
import type { KeyLookup, PopulationScan, ScanProgress, XlsxSource } from './types.js';

/**
 * XLSX populations, read with exceljs's streaming reader so a big sheet is never held in memory.
 * The header is the first row with any value; rows follow by their worksheet row number.
 * Cell values become text as a user sees them: numbers to at most 15 significant digits (what a
 * spreadsheet shows; 1234.5599999999999 is 1234.56), dates as yyyy-mm-dd (with the time when
 * there is one), formulas as their last computed result, rich text as its plain text.
 */

interface SheetReader {
  name?: string;
  iterator?: { destroy?: () => void };
  [Symbol.asyncIterator](): AsyncGenerator<XRow>;
}
interface XRow {
  number: number;
  values: unknown;
}
interface BookReader {
  model?: { sheets?: Array<{ name: string }> };
  [Symbol.asyncIterator](): AsyncGenerator<SheetReader>;
}

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/** The text of a cell value as exceljs gives it. */
export function cellText(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'string') return v;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) return String(v);
    if (Number.isInteger(v) && Math.abs(v) < 1e21) return String(v);
    return String(Number(v.toPrecision(15)));
  }
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (v instanceof Date) {
    if (Number.isNaN(v.getTime())) return '';
    const d = `${pad(v.getUTCFullYear(), 4)}-${pad(v.getUTCMonth() + 1)}-${pad(v.getUTCDate())}`;
    const h = v.getUTCHours();
    const m = v.getUTCMinutes();
    const s = v.getUTCSeconds();
    return h || m || s ? `${d} ${pad(h)}:${pad(m)}:${pad(s)}` : d;
  }
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if (Array.isArray(o.richText)) return (o.richText as Array<{ text?: string }>).map((r) => r.text ?? '').join('');
    if ('formula' in o || 'sharedFormula' in o) return cellText(o.result);
    if ('hyperlink' in o) return cellText(o.text);
    if ('error' in o) return String(o.error);
    if ('text' in o) return cellText(o.text);
  }
  return String(v);
}

interface WalkHandlers {
  header?(values: string[], row: number): void;
  /** A data row; `extra` when there are values beyond the last named column. */
  row(values: string[], row: number, position: number, extra: boolean): boolean | void;
  blank?(row: number, count: number): void;
}

async function walk(
  src: XlsxSource,
  h: WalkHandlers,
  report: Reporter,
  phase: ScanProgress['phase'],
): Promise<{ rows: number; sheet: string; size: number }> {
  assertRegularFile(src.path, 'Population file');
  const { fh, size } = await openFile(src.path);
  await fh.close();
  const ExcelJS = (await import('exceljs')).default;
  let pos = 0;
  const file = createReadStream(src.path, { highWaterMark: 1 << 20 });
  let readError: unknown;
  file.on('error', (e) => {
    readError = e;
  });
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(file, {
    worksheets: 'emit',
    sharedStrings: 'cache',
    styles: 'cache',
    hyperlinks: 'ignore',
    entries: 'ignore',
  }) as unknown as BookReader;
  const seen: string[] = [];
  let sheet: string | undefined;
  let stopped = false;
  try {
    for await (const ws of reader) {
      const name = ws.name ?? `Sheet${seen.length + 1}`;
      seen.push(name);
      if (sheet !== undefined || stopped) {
        ws.iterator?.destroy?.();
        continue;
      }
      const target = src.sheet;
      const isTarget =
        target !== undefined
          ? name === target || name.toLowerCase() === target.trim().toLowerCase()
          : name === (reader.model?.sheets?.[0]?.name ?? name);
      if (!isTarget) {
        ws.iterator?.destroy?.();
        continue;
      }
      sheet = name;
      let width = 0;
      let headerSeen = false;
      let last = 0;
      for await (const r of ws) {
        const raw = r.values as unknown[];
        const n = r.number;
        let lastCol = 0;
        for (let i = raw.length - 1; i >= 1; i--) {
          if (cellText(raw[i]) !== '') {
            lastCol = i;
            break;
          }
        }
        if (n > last + 1) h.blank?.(last + 1, n - last - 1);
        last = n;
        if (lastCol === 0) {
          h.blank?.(n, 1);
          continue;
        }
        if (!headerSeen) {
          headerSeen = true;
          width = lastCol;
          const values: string[] = [];
          for (let i = 1; i <= width; i++) values.push(cellText(raw[i]));
          h.header?.(values, n);
          continue;
        }
        const values: string[] = [];
        for (let i = 1; i <= width; i++) values.push(cellText(raw[i]));
        if ((pos & 1023) === 0) report.update({ phase, bytesDone: 0, bytesTotal: 0, rows: pos });
        if (h.row(values, n, pos++, lastCol > width) === false) {
          stopped = true;
          break;
        }
      }
      if (stopped) break;
    }
  } catch (e) {
    if (e instanceof FileInputError) throw e;
    const err = fileError(e, src.path);
    if (err instanceof FileInputError) throw err;
    throw new FileInputError(src.path, `${basename(src.path)} cannot be read as an XLSX workbook (${(e as Error).message}).`, [
      'Open it in a spreadsheet program and save it again as .xlsx, or save the sheet as CSV UTF-8.',
    ]);
  } finally {
    file.destroy();
  }
  if (readError) throw fileError(readError, src.path);
  if (sheet === undefined) {
    const names = reader.model?.sheets?.map((s) => s.name) ?? seen;
    throw new FileInputError(
      src.path,
      src.sheet !== undefined ? `There is no sheet "${src.sheet}" in ${basename(src.path)}.` : `${basename(src.path)} has no worksheet.`,
      names.length ? [`Sheets: ${names.map((s) => `"${s}"`).join(', ')}`] : [],
    );
  }
  report.update({ phase, bytesDone: size, bytesTotal: size, rows: pos });
  return { rows: pos, sheet, size };
}

async function sha256File(path: string): Promise<string> {
  return (await hashFileHere(path)).sha256;
}


function valuesOf(names: string[], values: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  names.forEach((n, i) => {
    out[n] = values[i] ?? '';
  });
  return out;
}

export async function scanXlsx(src: XlsxSource, report: Reporter): Promise<PopulationScan> {
  const sha256 = await sha256File(src.path);
  let r: ResolvedColumns | undefined;
  let c: RowChecker | undefined;
  const blankRows = new Problems();
  const w = await walk(
    src,
    {
      header: (values) => {
        r = resolveColumns(src, values);
        c = new RowChecker({
          width: r.names.length,
          key: r.key,
          amount: r.amount,
          date: r.date,
          decimalComma: src.decimalComma,
          dateOrder: src.dateOrder,
        });
      },
      row: (values, row, _p, extra) => c!.textRow(values, row, extra),
      blank: (row, count) => {
        for (let i = 0; i < count; i++) blankRows.add(row + i, 'blank row');
      },
    },
    report,
    'reading',
  );
  const file = basename(src.path);
  const base = { sha256, format: 'xlsx' as const, sheet: w.sheet, bytes: w.size, file };
  if (!r || !c) {
    return {
      fingerprint: {
        ...base,
        rowCount: 0,
        firstKey: '',
        lastKey: '',
        columns: [],
        keyColumn: src.keyColumn,
        ...(src.amountColumn !== undefined ? { amountColumn: src.amountColumn, amountTotal: '0', amountCount: 0 } : {}),
        ...(src.dateColumn !== undefined ? { dateColumn: src.dateColumn } : {}),
      },
      validation: buildValidation({
        rowCount: 0,
        duplicates: { count: 0, rows: 0, examples: [] },
        blankKeys: new Problems(),
        badRows: new Problems(),
        badAmounts: new Problems(),
        badEncoding: new Problems(),
        blankLines: new Problems(),
        rowWord: 'row',
        otherProblems: [`Sheet "${w.sheet}" is empty (no header row).`],
      }),
    };
  }
  const rr = r;
  const cc = c;
  const candidates = cc.hashes.candidates();
  let duplicates: DuplicateResult = { count: 0, rows: 0, examples: [] };
  if (candidates.size > 0) {
    const dc = new DuplicateCollector(candidates);
    await walk(
      { ...src, sheet: w.sheet },
      {
        row: (values, row) => {
          const k = (values[rr.key] ?? '').trim();
          if (k !== '') dc.offer(hashString(k), () => k, row);
        },
      },
      report,
      'checking duplicates',
    );
    duplicates = dc.result();
  }
  const dates = cc.dates?.summary();
  const amountColumn = rr.amount !== undefined ? rr.names[rr.amount] : undefined;
  const dateColumn = rr.date !== undefined ? rr.names[rr.date] : undefined;
  const notes = [...rr.notes, `Sheet read: "${w.sheet}".`];
  return {
    fingerprint: {
      ...base,
      rowCount: cc.rows,
      firstKey: cc.firstKey,
      lastKey: cc.rows > 0 ? cc.finalLastKey() : '',
      columns: rr.names,
      ...(cc.amounts ? { amountTotal: cc.amounts.toString(), amountCount: cc.amounts.count } : {}),
      keyColumn: rr.names[rr.key]!,
      ...(amountColumn !== undefined ? { amountColumn } : {}),
      ...(dateColumn !== undefined ? { dateColumn } : {}),
      ...(dates?.earliest ? { dateRange: { earliest: dates.earliest, latest: dates.latest! } } : {}),
      ...(dates?.order ? { dateOrder: dates.order } : {}),
    },
    validation: buildValidation({
      rowCount: cc.rows,
      duplicates,
      blankKeys: cc.blankKeys.plain(), controlKeys: cc.controlKeys.plain(),
      badRows: cc.badRows.plain(),
      badAmounts: cc.badAmounts.plain(),
      dates,
      badEncoding: new Problems(),
      blankLines: blankRows,
      notes,
      rowWord: 'row',
      amountColumn,
      dateColumn,
    }),
  };
}

export async function readXlsxRowsAt(
  src: XlsxSource,
  picker: RowPicker,
  report: Reporter,
  verify?: (sha256: string) => void,
): Promise<number> {
  if (verify) verify(await sha256File(src.path));
  let r: ResolvedColumns | undefined;
  const w = await walk(
    src,
    {
      header: (values) => {
        r = resolveColumns(src, values);
      },
      row: (values, row, position) => {
        if (picker.wants(position)) {
          picker.take({ position, row, key: (values[r!.key] ?? '').trim(), values: valuesOf(r!.names, values) });
        }
        return picker.finished ? false : undefined;
      },
    },
    report,
    'fetching rows',
  );
  return w.rows;
}

export async function findXlsxKeys(src: XlsxSource, finder: KeyFinder, report: Reporter): Promise<KeyLookup> {
  let r: ResolvedColumns | undefined;
  const w = await walk(
    src,
    {
      header: (values) => {
        r = resolveColumns(src, values);
      },
      row: (values, row, position) => {
        const key = (values[r!.key] ?? '').trim();
        if (finder.wants(key)) finder.found({ position, row, key, values: valuesOf(r!.names, values) });
      },
    },
    report,
    'finding keys',
  );
  return finder.result(w.rows);
}
