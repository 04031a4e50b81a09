import { basename } from 'node:path';
import { noDates } from './month-tally.js';
import { buildValidation, confirmDuplicates, offerText, Problems, RowChecker } from './checker.js';
import { resolveColumns, type ResolvedColumns } from './columns.js';
import { hashFileHere, type FileHash } from './hash.js';
import type { KeyFinder, RowPicker } from './pick.js';
import type { Reporter } from './progress.js';
import type { KeyLookup, PopulationScan, ScanProgress, XlsxSource } from './types.js';
import { Workbook } from './workbook.js';
import type { SheetScanner } from './xlsx-scan.js';

export { cellText } from './cell-text.js';

/**
 * XLSX populations, streamed from the zip by workbook.ts so a big sheet is never held in memory.
 * The sheet read is the one named, else the first visible one. The header is the first row with
 * any value; rows follow by their worksheet row number. Cell values become text as a user sees
 * them (cell-text.ts): numbers to at most 15 significant digits, dates as yyyy-mm-dd (with the
 * time when there is one), formulas as their last computed result, rich text as its plain text.
 */

interface WalkHandlers {
  header?(values: string[], row: number): void;
  /**
   * A data row; `extra` when there are values beyond the last named column. `values` is only
   * valid during the call and may be shorter than the header (missing cells are blank).
   */
  row(values: string[], row: number, position: number, extra: boolean): boolean | void;
  blank?(row: number, count: number): void;
  /**
   * The columns (1-based mask) whose texts the data row at `position` needs; null for all.
   * The other columns read as '' (they are still checked for being empty).
   */
  keep?(position: number): Uint8Array | null;
}

/** A column mask with the given 0-based columns kept. */
function mask(width: number, cols: Array<number | undefined>): Uint8Array {
  const m = new Uint8Array(width + 1);
  for (const c of cols) if (c !== undefined) m[c + 1] = 1;
  return m;
}

/**
 * Row index kept from the last scan of a sheet: where every CHECKPOINT-th data row starts in the
 * sheet's XML, and the row number before it. Pass 2 still unpacks the sheet from its start (a
 * deflate stream cannot be entered in the middle) but parses only near the selected rows, which
 * is most of the work. Used only while the file's size, modification time and inode are the ones
 * scanned; one sheet is kept.
 */
const CHECKPOINT = 1024;
interface SheetIndex {
  key: string;
  rows: number;
  abs: number[];
  prev: number[];
}
let lastIndex: SheetIndex | undefined;

/** Forget the row index kept from the last scan (tests use it to compare both ways). */
export function forgetSheetIndex(): void {
  lastIndex = undefined;
}

interface WalkOptions {
  /** Record a row index for the next pass. */
  index?: boolean;
  /** Use the row index: the next position wanted after each row (-1: none). */
  seek?: () => number;
}

async function walk(
  src: XlsxSource,
  h: WalkHandlers,
  report: Reporter,
  phase: ScanProgress['phase'],
  opts: WalkOptions = {},
): Promise<{ rows: number; sheet: string; size: number }> {
  const wb = await Workbook.open(src.path);
  let pos = 0;
  try {
    const sheet = wb.pick(src.sheet);
    const key = `${wb.fileKey}\0${sheet.part}`;
    const index: SheetIndex | undefined = opts.index ? { key, rows: 0, abs: [], prev: [] } : undefined;
    const use = opts.seek && lastIndex?.key === key ? lastIndex : undefined;
    let width = Infinity;
    let headerSeen = false;
    let last = 0;
    let scanner: SheetScanner | undefined;
    await wb.rows(
      sheet,
      {
        row: (n, texts, lastCol) => {
          if (n > last + 1) h.blank?.(last + 1, n - last - 1);
          last = n;
          if (lastCol === 0) {
            h.blank?.(n, 1);
            return;
          }
          if (!headerSeen) {
            headerSeen = true;
            width = lastCol;
            h.header?.(valuesUpTo(texts, width), n);
          } else {
            if ((pos & 1023) === 0) {
              report.update({ phase, bytesDone: 0, bytesTotal: 0, rows: pos });
              if (index && pos % CHECKPOINT === 0) {
                index.abs.push(scanner!.rowAbs);
                index.prev.push(scanner!.rowPrev);
              }
            }
            // The scanner's own array (valid during the call; it may be shorter than the header).
            if (h.row(texts, n, pos++, lastCol > width) === false) return false;
          }
          if (use) {
            const next = opts.seek!();
            const c = next >= 0 ? Math.floor(next / CHECKPOINT) : -1;
            if (c >= 0 && c < use.abs.length && c * CHECKPOINT > pos) {
              scanner!.skip(use.abs[c]!, use.prev[c]!);
              pos = c * CHECKPOINT;
              last = use.prev[c]!;
            }
          }
        },
      },
      (sc) => {
        scanner = sc;
        sc.width = width;
        sc.keep = headerSeen && h.keep ? h.keep(pos) : null;
      },
    );
    report.update({ phase, bytesDone: wb.size, bytesTotal: wb.size, rows: pos });
    if (index) {
      index.rows = pos;
      lastIndex = index;
    }
    return { rows: use && pos < use.rows ? use.rows : pos, sheet: sheet.name, size: wb.size };
  } finally {
    await wb.close();
  }
}

function valuesUpTo(texts: string[], width: number): string[] {
  const out = new Array<string>(width);
  for (let i = 0; i < width; i++) out[i] = texts[i] ?? '';
  return out;
}

async function sha256File(path: string): Promise<string> {
  return (await hashFile(path)).sha256;
}

/**
 * The SHA-256 of a workbook, on this thread beside the first pass: a workbook is compressed, so
 * hashing it is a small part of the work, and a worker thread would cost more memory (measured:
 * 20-40 MiB of peak for a 28 MB workbook) than the time it saves.
 */
async function hashFile(path: string): Promise<FileHash> {
  return hashFileHere(path);
}


function valuesOf(names: string[], values: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  names.forEach((n, i) => {
    out[n] = values[i] ?? '';
  });
  return out;
}

export async function scanXlsx(src: XlsxSource, report: Reporter): Promise<PopulationScan> {
  const hashing = hashFile(src.path);
  hashing.catch(() => undefined);
  let r: ResolvedColumns | undefined;
  let c: RowChecker | undefined;
  let keepMask: Uint8Array | undefined;
  const blankRows = new Problems();
  const w = await walk(
    src,
    {
      header: (values) => {
        r = resolveColumns(src, values);
        keepMask = mask(values.length, [r.key, r.amount, r.date]);
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
      keep: () => keepMask!,
      blank: (row, count) => {
        for (let i = 0; i < count; i++) blankRows.add(row + i, 'blank row');
      },
    },
    report,
    'reading',
    { index: true },
  );
  const sha256 = (await hashing).sha256;
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
        monthTally: src.dateColumn !== undefined ? { dateColumn: src.dateColumn, months: [], undated: 0 } : noDates(0),
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
  const keyOnly = mask(rr.names.length, [rr.key]);
  const duplicates = await confirmDuplicates(cc.hashes, async (dc) => {
    await walk(
      { ...src, sheet: w.sheet },
      {
        row: (values, row) => offerText((values[rr.key] ?? '').trim(), dc, row),
        keep: () => keyOnly,
      },
      report,
      'checking duplicates',
    );
  });
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
      monthTally: dateColumn !== undefined && dates ? cc.monthTally(dateColumn, dates) : noDates(cc.rows),
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
  const none = new Uint8Array(0);
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
      keep: (position) => (picker.wants(position) ? null : none),
    },
    report,
    'fetching rows',
    { seek: () => picker.next },
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

/** The header of a sheet (the named one, else the first visible one): the first row with any value. */
export async function readXlsxHeader(path: string, sheet?: string): Promise<{ sheet: string; values: string[] | undefined }> {
  const wb = await Workbook.open(path);
  try {
    const info = wb.pick(sheet);
    let values: string[] | undefined;
    await wb.rows(info, {
      row: (_n, texts, lastCol) => {
        if (lastCol === 0) return;
        values = valuesUpTo(texts, lastCol);
        return false;
      },
    });
    return { sheet: info.name, values };
  } finally {
    await wb.close();
  }
}
