import { AmountTotal, parseAmount } from './amount.js';
import { DateTracker, type DateSummary } from './date.js';
import { MonthTallier, type TallyBucket } from './month-tally.js';
import type { CsvTokenizer } from './csv-tokenizer.js';
import { confirmParts, DuplicateCollector, hashBytes, KeyHashes, mergeDuplicates, utf8Of, type DuplicateResult } from './key-index.js';

export type { DuplicateResult } from './key-index.js';
import type { DateOrder, MonthTally, PopulationValidation, ProblemCount, RowExample } from './types.js';
import { hasControl, visible } from '../io/text.js';

export const EXAMPLES = 5;
export const DUPLICATE_EXAMPLES = 10;

export class Problems implements ProblemCount {
  count = 0;
  examples: RowExample[] = [];
  add(row: number, reason: string, value?: string): void {
    this.count++;
    if (this.examples.length < EXAMPLES) {
      const ex: RowExample = { row, reason };
      if (value !== undefined) ex.value = value.length > 60 ? `${value.slice(0, 57)}...` : value;
      this.examples.push(ex);
    }
  }
  plain(): ProblemCount {
    return { count: this.count, examples: this.examples };
  }
}

/** Which columns matter, by index in the header. */
export interface CheckColumns {
  width: number;
  key: number;
  amount?: number;
  date?: number;
  decimalComma?: boolean;
  dateOrder?: DateOrder;
}

const plain = (c: number) => c > 0x20 && c < 0x7f;

/**
 * Pass-1 bookkeeping shared by the CSV and XLSX readers: row count, first/last key, key hashes for
 * duplicates, blank keys, rows with the wrong shape, amounts (exact total) and dates.
 */
export class RowChecker {
  rows = 0;
  firstKey = '';
  lastKey = '';
  readonly hashes = new KeyHashes();
  readonly blankKeys = new Problems();
  /** Keys holding control or escape characters (a terminal would act on them, not show them). */
  readonly controlKeys = new Problems();
  readonly badRows = new Problems();
  readonly badAmounts = new Problems();
  readonly blankLines = new Problems();
  readonly amounts: AmountTotal | undefined;
  readonly dates: DateTracker | undefined;
  /** The rows by month of the date column (with their amounts), when there is one. */
  readonly tally: MonthTallier | undefined;
  private scratch = new Uint8Array(256);
  private lastLen = -1;
  private readonly dec: number;

  constructor(readonly cols: CheckColumns) {
    this.amounts = cols.amount !== undefined ? new AmountTotal() : undefined;
    this.dates = cols.date !== undefined ? new DateTracker(cols.dateOrder, cols.decimalComma ? 'dmy' : 'mdy') : undefined;
    this.tally = cols.date !== undefined ? new MonthTallier(cols.amount !== undefined) : undefined;
    this.dec = cols.decimalComma ? 0x2c : 0x2e;
  }

  blankLine(row: number): void {
    this.blankLines.add(row, 'blank line');
  }

  /** One CSV record (not the header, not blank). */
  csvRow(t: CsvTokenizer): void {
    const row = t.line;
    const pos = this.rows++;
    const { width, key, amount, date } = this.cols;
    if (t.problem) this.badRows.add(row, t.problem);
    else if (t.count !== width) this.badRows.add(row, `${t.count} field${t.count === 1 ? '' : 's'}; the header has ${width}`);
    const b = t.buf;
    // Key
    if (key < t.count) {
      const s = t.starts[key]!;
      const e = t.ends[key]!;
      const k = t.kinds[key]!;
      if (k <= 1 && e > s && plain(b[s]!) && plain(b[e - 1]!)) {
        hashBytes(b, s, e);
        this.hashes.addCurrent(e - s);
        const len = e - s;
        if (len > this.scratch.length) this.scratch = new Uint8Array(len * 2);
        const sc = this.scratch;
        let suspect = false;
        for (let i = 0; i < len; i++) {
          const c = b[s + i]!;
          sc[i] = c;
          // Controls, DEL, and the lead bytes of C1 controls (C2) and of bidirectional marks (E2).
          if (c < 0x20 || c === 0x7f || c === 0xc2 || c === 0xe2) suspect = true;
        }
        this.lastLen = len;
        if (suspect) this.controlKey(b.toString('utf8', s, e), row);
        if (pos === 0) this.firstKey = b.toString('utf8', s, e);
      } else this.slowKey(t.field(key).trim(), row, pos);
    } else this.slowKey('', row, pos);
    // Date, then the amount (added to the date's month too)
    let cell: TallyBucket | undefined;
    if (date !== undefined) {
      const dt = this.dates!;
      let raw: number;
      if (date < t.count) {
        const k = t.kinds[date]!;
        raw = k <= 1 ? dt.addIsoBytes(b, t.starts[date]!, t.ends[date]!) : 0;
        if (raw === 0) raw = dt.add(t.field(date), row);
      } else raw = dt.add('', row);
      cell = this.tally!.take(raw);
    }
    if (amount !== undefined) {
      const am = this.amounts!;
      if (amount < t.count) {
        const k = t.kinds[amount]!;
        if (k <= 1 && am.addBytes(b, t.starts[amount]!, t.ends[amount]!, this.dec)) cell?.amounts!.addUnits(am.lastNegative, am.lastUnits, am.lastDecimals);
        else this.amountText(t.field(amount), row, cell);
      } else this.badAmounts.add(row, 'no amount (the row is short)');
    }
  }

  private slowKey(k: string, row: number, pos: number): void {
    if (pos === 0) this.firstKey = k;
    if (k === '') {
      this.blankKeys.add(row, 'blank key');
      this.setLast('');
      return;
    }
    this.controlKey(k, row);
    const [kb, n] = utf8Of(k);
    hashBytes(kb, 0, n);
    this.hashes.addCurrent(n);
    this.setLast(k);
  }

  private controlKey(k: string, row: number): void {
    if (hasControl(k)) this.controlKeys.add(row, 'control characters in the key', visible(k));
  }

  private setLast(k: string): void {
    this.lastKey = k;
    this.lastLen = -1;
  }

  private amountText(text: string, row: number, cell: TallyBucket | undefined): void {
    const p = parseAmount(text, { decimalComma: this.cols.decimalComma });
    if (p) {
      this.amounts!.add(p);
      cell?.amounts!.add(p);
    } else this.badAmounts.add(row, text.trim() === '' ? 'blank amount' : 'not an amount', text);
  }

  /** One row given as texts (XLSX). `extra` tells that cells lie beyond the last named column. */
  textRow(values: readonly string[], row: number, extra: boolean): void {
    const pos = this.rows++;
    const { key, amount, date } = this.cols;
    if (extra) this.badRows.add(row, 'values beyond the last named column');
    this.slowKey((values[key] ?? '').trim(), row, pos);
    const cell = date !== undefined ? this.tally!.take(this.dates!.add(values[date] ?? '', row)) : undefined;
    if (amount !== undefined) this.amountText(values[amount] ?? '', row, cell);
  }

  /** The rows by month, once the scan has ended (the day/month order is known only then). */
  monthTally(dateColumn: string, dates: DateSummary): MonthTally {
    return this.tally!.result(dateColumn, dates.order);
  }

  /** The key of the last data row. */
  finalLastKey(): string {
    return this.lastLen >= 0 ? Buffer.from(this.scratch.subarray(0, this.lastLen)).toString('utf8') : this.lastKey;
  }

  /** Offer a CSV record's key (when not blank) to the confirming pass, as pass 1 hashed it. */
  static offerCsvKey(t: CsvTokenizer, key: number, dc: DuplicateCollector, row: number): void {
    if (key >= t.count) return;
    const b = t.buf;
    const s = t.starts[key]!;
    const e = t.ends[key]!;
    const k = t.kinds[key]!;
    if (k <= 1 && e > s && plain(b[s]!) && plain(b[e - 1]!)) {
      hashBytes(b, s, e);
      dc.offerCurrent(b, s, e, row);
      return;
    }
    offerText(t.field(key).trim(), dc, row);
  }
}

/**
 * The confirming pass: reads the file once per part of the candidates (`read` calls `offer`
 * with each row's key) and merges the parts.
 */
export async function confirmDuplicates(
  hashes: KeyHashes,
  read: (dc: DuplicateCollector) => Promise<void>,
): Promise<DuplicateResult> {
  const candidates = hashes.candidates();
  const parts = confirmParts(candidates, hashes);
  if (parts === 0) return { count: 0, rows: 0, examples: [] };
  const results: DuplicateResult[] = [];
  const dc = new DuplicateCollector(candidates, 0, parts, DUPLICATE_EXAMPLES, EXAMPLES);
  for (let part = 0; part < parts; part++) {
    if (part > 0) dc.reset(part);
    await read(dc);
    results.push(dc.result());
  }
  return mergeDuplicates(results, DUPLICATE_EXAMPLES);
}

/** Offer a key given as text (trimmed; ignored when blank) to the confirming pass. */
export function offerText(text: string, dc: DuplicateCollector, row: number): void {
  if (text === '') return;
  const [b, n] = utf8Of(text);
  hashBytes(b, 0, n);
  dc.offerCurrent(b, 0, n, row);
}

/** The key text of a CSV record (trimmed), '' when missing. */
export function csvKeyText(t: CsvTokenizer, key: number): string {
  return key < t.count ? t.field(key).trim() : '';
}

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;

function exampleList(ex: RowExample[], withValue: boolean, rowWord: string): string {
  return ex
    .map((e) => `${rowWord} ${e.row}${withValue && e.value !== undefined ? ` ${JSON.stringify(e.value)}` : ''} (${e.reason})`)
    .join('; ');
}

export interface ReportInput {
  rowCount: number;
  duplicates: DuplicateResult;
  blankKeys: ProblemCount;
  /** Keys with control or escape characters (shown escaped, e.g. ESC as \x1b). */
  controlKeys?: ProblemCount;
  badRows: ProblemCount;
  badAmounts: ProblemCount;
  dates?: DateSummary;
  badEncoding: ProblemCount;
  blankLines: ProblemCount;
  otherProblems?: string[];
  notes?: string[];
  /** 'line' for text files, 'row' for worksheets. */
  rowWord: 'line' | 'row';
  amountColumn?: string;
  dateColumn?: string;
}

/** Turn the counts into the validation report with one sentence per problem. */
export function buildValidation(r: ReportInput): PopulationValidation {
  const messages: string[] = [];
  const notes = [...(r.notes ?? [])];
  const w = r.rowWord;
  const d = r.duplicates;
  if (d.count > 0) {
    const ex = d.examples
      .map((e) => `${JSON.stringify(e.key)} ×${e.occurrences} (${w}s ${e.rows.join(', ')}${e.occurrences > e.rows.length ? ', ...' : ''})`)
      .join('; ');
    messages.push(`${plural(d.count, 'key')} appear${d.count === 1 ? 's' : ''} on more than one row (${plural(d.rows, 'row')} in all): ${ex}${d.count > d.examples.length ? '; ...' : ''}.`);
  }
  const more = (p: ProblemCount) => (p.count > p.examples.length ? '; ...' : '');
  if (r.blankKeys.count > 0) {
    messages.push(`${plural(r.blankKeys.count, 'row')} ${r.blankKeys.count === 1 ? 'has' : 'have'} a blank key: ${w}s ${r.blankKeys.examples.map((e) => e.row).join(', ')}${more(r.blankKeys)}.`);
  }
  if (r.controlKeys && r.controlKeys.count > 0) {
    const c = r.controlKeys;
    messages.push(
      `${plural(c.count, 'key')} ${c.count === 1 ? 'holds' : 'hold'} control or escape characters, which a screen or printout does not show as they are (shown here written out, e.g. ESC as \\x1b): ` +
        `${c.examples.map((e) => `${w} ${e.row} "${e.value ?? ''}"`).join('; ')}${more(c)}. Check the export; such a key may hide or disguise text.`,
    );
  }
  if (r.badRows.count > 0) {
    messages.push(`${plural(r.badRows.count, 'row')} ${r.badRows.count === 1 ? 'does' : 'do'} not match the header: ${exampleList(r.badRows.examples, false, w)}${more(r.badRows)}.`);
  }
  if (r.badAmounts.count > 0) {
    messages.push(`${plural(r.badAmounts.count, 'amount')} in column "${r.amountColumn}" cannot be read and ${r.badAmounts.count === 1 ? 'is' : 'are'} left out of the total: ${exampleList(r.badAmounts.examples, true, w)}${more(r.badAmounts)}.`);
  }
  const badDates = r.dates?.bad ?? { count: 0, examples: [] };
  if (badDates.count > 0) {
    messages.push(`${plural(badDates.count, 'date')} in column "${r.dateColumn}" cannot be read: ${exampleList(badDates.examples, true, w)}${more(badDates)}.`);
  }
  if (r.badEncoding.count > 0) {
    messages.push(`${plural(r.badEncoding.count, 'line')} ${r.badEncoding.count === 1 ? 'is' : 'are'} not valid UTF-8 text (first: line ${r.badEncoding.examples[0]?.row}); save the file as "CSV UTF-8" and read it again.`);
  }
  const empty = r.rowCount === 0;
  if (empty) messages.push('The population is empty: there are no data rows.');
  for (const o of r.otherProblems ?? []) messages.push(o);
  if (r.blankLines.count > 0) {
    notes.push(`${plural(r.blankLines.count, `blank ${w}`)} ${r.blankLines.count === 1 ? 'is' : 'are'} not counted as rows: ${w}s ${r.blankLines.examples.map((e) => e.row).join(', ')}${more(r.blankLines)}.`);
  }
  if (r.dates?.order) {
    const o = r.dates.order === 'dmy' ? 'day/month/year' : 'month/day/year';
    notes.push(
      r.dates.orderAssumed
        ? `Dates such as 03/04/2024 could be day/month or month/day; they were read as ${o}. Give the date order if that is wrong.`
        : `Dates with the day and month in numbers were read as ${o}.`,
    );
  }
  return {
    ok: messages.length === 0,
    duplicateKeys: { count: d.count, rows: d.rows, examples: d.examples },
    blankKeys: r.blankKeys,
    badRows: r.badRows,
    badAmounts: r.badAmounts,
    badDates,
    badEncoding: r.badEncoding,
    emptyPopulation: empty,
    otherProblems: r.otherProblems ?? [],
    messages,
    notes,
  };
}

