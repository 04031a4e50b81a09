import { createHash } from 'node:crypto';
import type { Stats } from 'node:fs';
import type { FileHandle } from 'node:fs/promises';
import { stat } from 'node:fs/promises';
import { basename, resolve as resolvePath } from 'node:path';
import { FileInputError, TolrateInputError } from '../errors.js';
import { CsvTokenizer } from './csv-tokenizer.js';
import { resolveColumns, type ResolvedColumns } from './columns.js';
import { noDates } from './month-tally.js';
import { buildValidation, confirmDuplicates, csvKeyText, Problems, RowChecker } from './checker.js';
import { fileError, forEachChunk, openFile } from './file.js';
import type { Reporter } from './progress.js';
import type { CsvSource, KeyLookup, PopulationScan, ScanProgress } from './types.js';
import type { KeyFinder, RowPicker } from './pick.js';
import { hashFileInWorker, WORKER_MIN_BYTES } from './hash.js';

const CANDIDATES = [',', ';', '\t', '|'];

/** Parse the delimiter option: one character, or the words tab/comma/semicolon/pipe. */
export function delimiterOption(d: string): string {
  const words: Record<string, string> = { tab: '\t', '\\t': '\t', comma: ',', semicolon: ';', pipe: '|' };
  const v = words[d.toLowerCase()] ?? d;
  if ([...v].length !== 1 || Buffer.byteLength(v) !== 1) {
    throw new TolrateInputError(`The delimiter must be one character (or tab), not ${JSON.stringify(d)}.`, 'INVALID_DELIMITER');
  }
  if (v === '"' || v === '\n' || v === '\r') {
    throw new TolrateInputError('The delimiter cannot be a quote or a line break.', 'INVALID_DELIMITER');
  }
  return v;
}

/** Show a delimiter in messages. */
export function delimiterName(d: string): string {
  return d === '\t' ? 'TAB' : d === ',' ? 'comma' : d === ';' ? 'semicolon' : d === '|' ? 'pipe' : JSON.stringify(d);
}

/** Refuse files that are plainly not CSV text. */
function checkKind(head: Buffer, path: string): void {
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 3 && head[3] === 4) {
    throw new FileInputError(path, `${path} is a zip file (probably an .xlsx workbook), not CSV text.`, [
      'Give it a name ending in .xlsx, or save it as CSV.',
    ]);
  }
  if (head.length >= 8 && head.readUInt32BE(0) === 0xd0cf11e0) {
    throw new FileInputError(path, `${path} is an old Excel (.xls) workbook, not CSV text.`, ['Save it as .xlsx or CSV UTF-8.']);
  }
  if (head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))) {
    throw new FileInputError(path, `${path} is UTF-16 text.`, ['Save it as "CSV UTF-8" and read it again.']);
  }
  if (head.subarray(0, 4096).includes(0)) {
    throw new FileInputError(path, `${path} holds binary data, not CSV text.`);
  }
}

/** Pick the delimiter that splits the first lines into the same number of fields, most fields first. */
export function detectDelimiter(sample: Buffer, complete: boolean): string {
  let cut = sample.length;
  if (!complete) {
    const nl = sample.lastIndexOf(0x0a);
    if (nl > 0) cut = nl + 1;
  }
  const text = sample.subarray(0, cut);
  let best = ',';
  let bestScore = -1;
  CANDIDATES.forEach((c, order) => {
    const tok = new CsvTokenizer(c.charCodeAt(0), { checkUtf8: false });
    const counts: number[] = [];
    const collect = (t: CsvTokenizer) => {
      if (!t.isBlank()) counts.push(t.count);
      return counts.length < 50;
    };
    try {
      tok.push(text, collect);
      if (!tok.isStopped) tok.end(collect);
    } catch {
      return;
    }
    const head = counts[0] ?? 0;
    if (head < 2) return;
    const same = counts.filter((n) => n === head).length / counts.length;
    // Consistency first, then more fields, then the usual order of the candidates.
    const score = Math.round(same * 100) * 10000 + Math.min(head, 999) * 10 + (CANDIDATES.length - order);
    if (score > bestScore) {
      bestScore = score;
      best = c;
    }
  });
  return best;
}

interface Opened {
  delimiter: string;
  detected: boolean;
  size: number;
}

async function sniff(src: CsvSource): Promise<Opened> {
  const { fh, size } = await openFile(src.path);
  try {
    const n = Math.min(size, 65536);
    const head = Buffer.alloc(n);
    if (n > 0) await fh.read(head, 0, n, 0);
    checkKind(head, src.path);
    if (src.delimiter !== undefined) return { delimiter: delimiterOption(src.delimiter), detected: false, size };
    const body = head.length >= 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf ? head.subarray(3) : head;
    return { delimiter: detectDelimiter(body, n === size), detected: true, size };
  } finally {
    await fh.close();
  }
}

interface WalkHandlers {
  header?(t: CsvTokenizer): void;
  /** A data row at 0-based position; return false to stop reading. */
  row(t: CsvTokenizer, position: number): boolean | void;
  blank?(line: number): void;
  chunk?(c: Buffer): void;
}

/** Where a walk starts when it does not start at the top of the file. */
interface StartAt {
  offset: number;
  line: number;
  position: number;
}

/** Stream a CSV file through the tokenizer: header, then data rows by position; blank lines apart. */
async function walk(
  path: string,
  delimiter: string,
  h: WalkHandlers,
  report: Reporter,
  phase: ScanProgress['phase'],
): Promise<{ rows: number; tok: CsvTokenizer; size: number; headerSeen: boolean; stats: Stats }> {
  const { fh, size, stats } = await openFile(path);
  try {
    return { ...(await walkHandle(fh, size, path, delimiter, h, report, phase)), stats };
  } finally {
    await fh.close();
  }
}

async function walkHandle(
  fh: FileHandle,
  size: number,
  path: string,
  delimiter: string,
  h: WalkHandlers,
  report: Reporter,
  phase: ScanProgress['phase'],
  at?: StartAt,
): Promise<{ rows: number; tok: CsvTokenizer; size: number; headerSeen: boolean }> {
  const tok = new CsvTokenizer(delimiter.charCodeAt(0), at ? { startLine: at.line, startOffset: at.offset } : {});
  let headerSeen = at !== undefined;
  let pos = at?.position ?? 0;
  const onRecord = (t: CsvTokenizer): boolean | void => {
    if (t.isBlank()) {
      h.blank?.(t.line);
      return;
    }
    if (!headerSeen) {
      headerSeen = true;
      h.header?.(t);
      return;
    }
    return h.row(t, pos++);
  };
  try {
    await forEachChunk(
      fh,
      (buf, start, end, soFar) => {
        h.chunk?.(buf.subarray(start, end));
        const go = tok.pushRange(buf, start, end, onRecord);
        report.update({ phase, bytesDone: soFar, bytesTotal: size, rows: pos });
        return go;
      },
      // A seek to a row needs only a little of the file.
      at ? { from: at.offset, size: 1 << 16 } : {},
    );
    if (!tok.isStopped) tok.end(onRecord);
    if (!at) report.update({ phase, bytesDone: size, bytesTotal: size, rows: pos });
  } catch (e) {
    if (e instanceof FileInputError && e.path === '') {
      throw new FileInputError(path, `${basename(path)}: ${e.message}`, e.details);
    }
    throw fileError(e, path);
  }
  return { rows: pos, tok, size, headerSeen };
}

/**
 * Row index kept from the last scans: the byte offset and line of every CHECKPOINT-th data row.
 * It lets pass 2 seek near each selected row instead of reading the file again from the top.
 * It is used only while the file's size, modification time and inode are unchanged, and never
 * when the caller asks for the SHA-256 to be checked (that reads the whole file).
 */
const CHECKPOINT = 1024;
interface RowIndex {
  size: number;
  mtimeMs: number;
  ino: number;
  delimiter: string;
  header: string[];
  rows: number;
  offsets: number[];
  lines: number[];
}
const rowIndexes = new Map<string, RowIndex>();

function remember(path: string, idx: RowIndex): void {
  const key = resolvePath(path);
  rowIndexes.delete(key);
  rowIndexes.set(key, idx);
  while (rowIndexes.size > 8) rowIndexes.delete(rowIndexes.keys().next().value!);
}

/** Forget the row indexes kept from earlier scans (tests use it to compare both ways). */
export function forgetRowIndexes(): void {
  rowIndexes.clear();
}

function headerOf(t: CsvTokenizer): string[] {
  const out: string[] = [];
  for (let i = 0; i < t.count; i++) out.push(t.field(i));
  return out;
}


/** Pass 1 over a CSV file: SHA-256, count, first/last key, validation; pass 1b only for duplicates. */
export async function scanCsv(src: CsvSource, report: Reporter): Promise<PopulationScan> {
  const { delimiter, detected, size: sizeAtStart } = await sniff(src);
  // A big file is hashed by a worker thread beside the main pass; a small one on the way through.
  const inWorker = sizeAtStart >= WORKER_MIN_BYTES ? hashFileInWorker(src.path) : undefined;
  const hash = inWorker ? undefined : createHash('sha256');
  let resolved: ResolvedColumns | undefined;
  let checker: RowChecker | undefined;
  const blankLines = new Problems();
  let header: string[] = [];
  const offsets: number[] = [];
  const lines: number[] = [];
  const w = await walk(
    src.path,
    delimiter,
    {
      chunk: hash ? (c) => hash.update(c) : undefined,
      header: (t) => {
        header = headerOf(t);
        resolved = resolveColumns(src, header);
        checker = new RowChecker({
          width: resolved.names.length,
          key: resolved.key,
          amount: resolved.amount,
          date: resolved.date,
          decimalComma: src.decimalComma,
          dateOrder: src.dateOrder,
        });
      },
      row: (t, pos) => {
        if (pos % CHECKPOINT === 0) {
          offsets.push(t.offset);
          lines.push(t.line);
        }
        checker!.csvRow(t);
      },
      blank: (line) => blankLines.add(line, 'blank line'),
    },
    report,
    'reading',
  );
  const after = await stat(src.path).catch(() => undefined);
  const unchanged = after !== undefined && after.size === w.stats.size && after.mtimeMs === w.stats.mtimeMs && after.ino === w.stats.ino && w.size === w.tok.bytesIn;
  let sha256: string;
  if (inWorker) {
    const hashed = await inWorker;
    if (!unchanged || hashed.bytes !== w.tok.bytesIn) {
      throw new FileInputError(src.path, `${basename(src.path)} changed while it was being read. Read it again when nothing is writing to it.`);
    }
    sha256 = hashed.sha256;
  } else sha256 = hash!.digest('hex');
  if (unchanged) {
    remember(src.path, { size: after.size, mtimeMs: after.mtimeMs, ino: after.ino, delimiter, header, rows: w.rows, offsets, lines });
  }
  const file = basename(src.path);
  if (!resolved || !checker) {
    // No header at all: an empty file (or only blank lines). The key column cannot be checked.
    const validation = buildValidation({
      rowCount: 0,
      duplicates: { count: 0, rows: 0, examples: [] },
      blankKeys: new Problems(),
      badRows: new Problems(),
      badAmounts: new Problems(),
      badEncoding: new Problems(),
      blankLines,
      rowWord: 'line',
      otherProblems: ['The file has no header line (it is empty or blank).'],
    });
    return {
      fingerprint: {
        sha256,
        rowCount: 0,
        firstKey: '',
        lastKey: '',
        columns: [],
        format: 'csv',
        delimiter,
        bytes: w.size,
        file,
        keyColumn: src.keyColumn,
        ...(src.amountColumn !== undefined ? { amountColumn: src.amountColumn, amountTotal: '0', amountCount: 0 } : {}),
        ...(src.dateColumn !== undefined ? { dateColumn: src.dateColumn } : {}),
        monthTally: src.dateColumn !== undefined ? { dateColumn: src.dateColumn, months: [], undated: 0 } : noDates(0),
      },
      validation,
    };
  }
  const r = resolved;
  const c = checker;
  const duplicates = await confirmDuplicates(c.hashes, async (dc) => {
    await walk(
      src.path,
      delimiter,
      {
        row: (t) => RowChecker.offerCsvKey(t, r.key, dc, t.line),
      },
      report,
      'checking duplicates',
    );
  });
  const badEncoding = new Problems();
  if (w.tok.badUtf8Records > 0) {
    badEncoding.count = w.tok.badUtf8Records;
    badEncoding.examples.push({ row: w.tok.firstBadUtf8Line ?? 0, reason: 'not valid UTF-8' });
  }
  const dates = c.dates?.summary();
  const notes = [...r.notes];
  if (detected) notes.push(`Delimiter found from the first lines: ${delimiterName(delimiter)}.`);
  const amountColumn = r.amount !== undefined ? r.names[r.amount] : undefined;
  const dateColumn = r.date !== undefined ? r.names[r.date] : undefined;
  const validation = buildValidation({
    rowCount: c.rows,
    duplicates,
    blankKeys: c.blankKeys.plain(),
    controlKeys: c.controlKeys.plain(),
    badRows: c.badRows.plain(),
    badAmounts: c.badAmounts.plain(),
    dates,
    badEncoding,
    blankLines,
    notes,
    rowWord: 'line',
    amountColumn,
    dateColumn,
  });
  return {
    fingerprint: {
      sha256,
      rowCount: c.rows,
      firstKey: c.firstKey,
      lastKey: c.rows > 0 ? c.finalLastKey() : '',
      columns: r.names,
      ...(c.amounts ? { amountTotal: c.amounts.toString(), amountCount: c.amounts.count } : {}),
      format: 'csv',
      delimiter,
      bytes: w.size,
      file,
      keyColumn: r.names[r.key]!,
      ...(amountColumn !== undefined ? { amountColumn } : {}),
      ...(dateColumn !== undefined ? { dateColumn } : {}),
      ...(dates?.earliest ? { dateRange: { earliest: dates.earliest, latest: dates.latest! } } : {}),
      ...(dates?.order ? { dateOrder: dates.order } : {}),
      monthTally: dateColumn !== undefined && dates ? c.monthTally(dateColumn, dates) : noDates(c.rows),
    },
    validation,
  };
}

/**
 * The header of a CSV file as the population reader takes it: the first record that is not a
 * blank line, read by the same tokenizer (so a quoted line break in a header name is read the
 * same way everywhere). `undefined` when the file has no such record.
 */
export async function readCsvHeader(path: string, delimiterGiven?: string): Promise<{ fields: string[]; delimiter: string } | undefined> {
  const { delimiter } = await sniff({ kind: 'csv', path, keyColumn: '-', ...(delimiterGiven !== undefined ? { delimiter: delimiterGiven } : {}) });
  let fields: string[] | undefined;
  await walk(
    path,
    delimiter,
    {
      header: (t) => {
        fields = headerOf(t);
      },
      row: () => false,
    },
    { update() {}, done() {} },
    'reading',
  );
  return fields ? { fields, delimiter } : undefined;
}

function rowValues(t: CsvTokenizer, names: string[]): Record<string, string> {
  const values: Record<string, string> = {};
  names.forEach((n, i) => {
    values[n] = t.field(i);
  });
  for (let i = names.length; i < t.count; i++) values[`(extra field ${i - names.length + 1})`] = t.field(i);
  return values;
}

async function delimiterFor(src: CsvSource): Promise<string> {
  return (await sniff(src)).delimiter;
}

/** Pass 2: fetch the rows at the given positions, stopping after the last one needed. */
export async function readCsvRowsAt(
  src: CsvSource,
  picker: RowPicker,
  report: Reporter,
  verify?: (sha256: string) => void,
): Promise<number> {
  const delimiter = await delimiterFor(src);
  if (!verify) {
    const rows = await readWithIndex(src, delimiter, picker, report);
    if (rows !== undefined) return rows;
  }
  let r: ResolvedColumns | undefined;
  const hash = verify ? createHash('sha256') : undefined;
  const w = await walk(
    src.path,
    delimiter,
    {
      chunk: hash ? (c) => hash.update(c) : undefined,
      header: (t) => {
        r = resolveColumns(src, headerOf(t));
      },
      row: (t, position) => {
        if (!picker.wants(position)) return !hash && picker.finished ? false : undefined;
        picker.take({ position, row: t.line, key: csvKeyText(t, r!.key), values: rowValues(t, r!.names) });
        return !hash && picker.finished ? false : undefined;
      },
    },
    report,
    'fetching rows',
  );
  if (hash && verify) verify(hash.digest('hex'));
  return w.rows;
}

/** Pass 2 through the row index of an earlier scan; undefined when there is none that fits. */
async function readWithIndex(src: CsvSource, delimiter: string, picker: RowPicker, report: Reporter): Promise<number | undefined> {
  const idx = rowIndexes.get(resolvePath(src.path));
  if (!idx || idx.delimiter !== delimiter) return undefined;
  const { fh, size, stats } = await openFile(src.path);
  try {
    if (stats.size !== idx.size || stats.mtimeMs !== idx.mtimeMs || stats.ino !== idx.ino) return undefined;
    const r = resolveColumns(src, idx.header);
    const want = picker.sorted.filter((p) => p < idx.rows);
    let done = 0;
    let i = 0;
    while (i < want.length) {
      const c = Math.floor(want[i]! / CHECKPOINT);
      let j = i;
      while (j + 1 < want.length && Math.floor(want[j + 1]! / CHECKPOINT) === c) j++;
      const last = want[j]!;
      await walkHandle(
        fh,
        size,
        src.path,
        delimiter,
        {
          row: (t, position) => {
            if (picker.wants(position)) {
              picker.take({ position, row: t.line, key: csvKeyText(t, r.key), values: rowValues(t, r.names) });
            }
            return position < last;
          },
        },
        report,
        'fetching rows',
        { offset: idx.offsets[c]!, line: idx.lines[c]!, position: c * CHECKPOINT },
      );
      done += j - i + 1;
      report.update({ phase: 'fetching rows', bytesDone: Math.round((size * done) / want.length), bytesTotal: size, rows: done });
      i = j + 1;
    }
    return idx.rows;
  } finally {
    await fh.close();
  }
}

/** Find the rows of the given keys (haphazard selection). */
export async function findCsvKeys(src: CsvSource, finder: KeyFinder, report: Reporter): Promise<KeyLookup> {
  const delimiter = await delimiterFor(src);
  let r: ResolvedColumns | undefined;
  const w = await walk(
    src.path,
    delimiter,
    {
      header: (t) => {
        r = resolveColumns(src, headerOf(t));
      },
      row: (t, position) => {
        const key = csvKeyText(t, r!.key);
        if (finder.wants(key)) finder.found({ position, row: t.line, key, values: rowValues(t, r!.names) });
      },
    },
    report,
    'finding keys',
  );
  if (!r && finder.size > 0) {
    throw new FileInputError(src.path, `${basename(src.path)} has no header line (it is empty).`);
  }
  return finder.result(w.rows);
}

