import type { DateOrder, RowExample } from './types.js';

/**
 * Dates as population files write them. Accepted:
 * - ISO: 2024-03-15, 2024/03/15, 2024.03.15, optionally with a time (2024-03-15T10:20:30Z,
 *   2024-03-15 10:20); also 20240315;
 * - day and month in numbers: 15/03/2024, 15.03.2024, 3-15-2024, with 2-digit years read as
 *   20yy; whether such a date is day/month or month/day is found from the data (a first number
 *   above 12 means day/month, a second above 12 means month/day) unless the caller says;
 * - English month names: 15-Mar-2024, 15 March 2024, Mar 15, 2024.
 * A date must exist in the calendar (no 2023-02-29). Blank counts as unreadable.
 */

const MONTHS: Record<string, number> = {
  jan: 1, january: 1, feb: 2, february: 2, mar: 3, march: 3, apr: 4, april: 4, may: 5, jun: 6, june: 6,
  jul: 7, july: 7, aug: 8, august: 8, sep: 9, sept: 9, september: 9, oct: 10, october: 10, nov: 11,
  november: 11, dec: 12, december: 12,
};

const TIME = String.raw`(?:[T ]\s*(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,]\d+)?)?\s*(?:Z|[+-]\d{2}:?\d{2}|[AaPp]\.?[Mm]\.?)?)?`;
const ISO = new RegExp(String.raw`^(\d{4})([-/.])(\d{1,2})\2(\d{1,2})${TIME}$`);
const COMPACT = /^(\d{4})(\d{2})(\d{2})$/;
const NUMERIC = new RegExp(String.raw`^(\d{1,2})([-/.])(\d{1,2})\2(\d{4}|\d{2})${TIME}$`);
const DAY_MONTH_NAME = /^(\d{1,2})(?:st|nd|rd|th)?[-\s./]?([A-Za-z]{3,9})\.?[-\s./,]*(\d{4}|\d{2})$/;
const MONTH_NAME_DAY = /^([A-Za-z]{3,9})\.?[-\s]+(\d{1,2})(?:st|nd|rd|th)?,?[-\s]+(\d{4})$/;

export function validYmd(y: number, m: number, d: number): boolean {
  if (y < 1000 || y > 9999 || m < 1 || m > 12 || d < 1) return false;
  const dim = m === 2 ? (y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28) : [4, 6, 9, 11].includes(m) ? 30 : 31;
  return d <= dim;
}

function timeOk(m: RegExpExecArray, from: number): boolean {
  if (m[from] === undefined) return true;
  const h = Number(m[from]);
  const mi = Number(m[from + 1]);
  const s = m[from + 2] === undefined ? 0 : Number(m[from + 2]);
  return h <= 23 && mi <= 59 && s <= 59;
}

const year2 = (t: string): number => (t.length === 2 ? 2000 + Number(t) : Number(t));

export type ParsedDate =
  | { kind: 'exact'; ymd: number }
  | { kind: 'numeric'; first: number; second: number; year: number };

/** Parse a date; 'numeric' means the day/month order still has to be decided. */
export function parseDate(text: string): ParsedDate | undefined {
  const t = text.trim();
  if (t === '') return undefined;
  let m = ISO.exec(t);
  if (m) {
    const y = Number(m[1]);
    const mo = Number(m[3]);
    const d = Number(m[4]);
    return validYmd(y, mo, d) && timeOk(m, 5) ? { kind: 'exact', ymd: y * 10000 + mo * 100 + d } : undefined;
  }
  m = COMPACT.exec(t);
  if (m) {
    const y = Number(m[1]);
    const mo = Number(m[2]);
    const d = Number(m[3]);
    return validYmd(y, mo, d) ? { kind: 'exact', ymd: y * 10000 + mo * 100 + d } : undefined;
  }
  m = NUMERIC.exec(t);
  if (m) {
    if (!timeOk(m, 5)) return undefined;
    return { kind: 'numeric', first: Number(m[1]), second: Number(m[3]), year: year2(m[4]!) };
  }
  m = DAY_MONTH_NAME.exec(t);
  if (m) {
    const mo = MONTHS[m[2]!.toLowerCase()];
    const y = year2(m[3]!);
    const d = Number(m[1]);
    return mo && validYmd(y, mo, d) ? { kind: 'exact', ymd: y * 10000 + mo * 100 + d } : undefined;
  }
  m = MONTH_NAME_DAY.exec(t);
  if (m) {
    const mo = MONTHS[m[1]!.toLowerCase()];
    const y = Number(m[3]);
    const d = Number(m[2]);
    return mo && validYmd(y, mo, d) ? { kind: 'exact', ymd: y * 10000 + mo * 100 + d } : undefined;
  }
  return undefined;
}

/** The ISO text of a yyyymmdd integer. */
export function ymdText(ymd: number): string {
  const y = Math.floor(ymd / 10000);
  const m = Math.floor(ymd / 100) % 100;
  const d = ymd % 100;
  return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
}

const EXAMPLES = 5;

class Side {
  min = Infinity;
  max = -Infinity;
  bad = 0;
  examples: RowExample[] = [];
  take(ymd: number): void {
    if (ymd < this.min) this.min = ymd;
    if (ymd > this.max) this.max = ymd;
  }
  fail(row: number, value: string, reason: string): void {
    this.bad++;
    if (this.examples.length < EXAMPLES) this.examples.push({ row, value, reason });
  }
}

export interface DateSummary {
  bad: { count: number; examples: RowExample[] };
  earliest?: string;
  latest?: string;
  /** Set when the file has dates such as 03/04/2024. */
  order?: DateOrder;
  /** True when that order could not be told from the data and was assumed. */
  orderAssumed: boolean;
}

/** Follows the dates of a column: unreadable ones, the earliest and the latest. */
export class DateTracker {
  private exact = new Side();
  private dmy = new Side();
  private mdy = new Side();
  private numericRows = 0;
  private ambiguousRows = 0;

  constructor(
    private readonly order?: DateOrder,
    private readonly defaultOrder: DateOrder = 'mdy',
  ) {}

  /**
   * Take one date. Returns its raw key for a tally that must not guess the day/month order before
   * the end of the file (see month-tally.ts): the yyyymmdd number of a date whose order is known,
   * minus (year × 10000 + first × 100 + second) of one such as 03/04/2024, 0 when unreadable.
   */
  add(text: string, row: number): number {
    const p = parseDate(text);
    if (!p) {
      this.exact.fail(row, text, text.trim() === '' ? 'blank date' : 'not a date');
      return 0;
    }
    if (p.kind === 'exact') {
      this.exact.take(p.ymd);
      return p.ymd;
    }
    this.numericRows++;
    const { first, second, year } = p;
    const asDmy = validYmd(year, second, first);
    const asMdy = validYmd(year, first, second);
    if (asDmy) this.dmy.take(year * 10000 + second * 100 + first);
    else this.dmy.fail(row, text, 'not a date when read as day/month/year');
    if (asMdy) this.mdy.take(year * 10000 + first * 100 + second);
    else this.mdy.fail(row, text, 'not a date when read as month/day/year');
    if (asDmy && asMdy && first !== second) this.ambiguousRows++;
    return -(year * 10000 + first * 100 + second);
  }

  /** Fast lane for exactly `yyyy-mm-dd`: its yyyymmdd number; 0 (nothing taken) when the bytes have another shape. */
  addIsoBytes(b: Uint8Array, s: number, e: number): number {
    if (e - s !== 10 || b[s + 4] !== 0x2d || b[s + 7] !== 0x2d) return 0;
    let y = 0;
    let m = 0;
    let d = 0;
    for (let i = 0; i < 10; i++) {
      if (i === 4 || i === 7) continue;
      const c = b[s + i]! - 0x30;
      if (c < 0 || c > 9) return 0;
      if (i < 4) y = y * 10 + c;
      else if (i < 7) m = m * 10 + c;
      else d = d * 10 + c;
    }
    if (!validYmd(y, m, d)) return 0;
    const ymd = y * 10000 + m * 100 + d;
    this.exact.take(ymd);
    return ymd;
  }

  summary(): DateSummary {
    let order: DateOrder | undefined;
    let assumed = false;
    if (this.numericRows > 0) {
      if (this.order) order = this.order;
      else if (this.dmy.bad === 0 && this.mdy.bad > 0) order = 'dmy';
      else if (this.mdy.bad === 0 && this.dmy.bad > 0) order = 'mdy';
      else if (this.dmy.bad === this.mdy.bad) {
        order = this.defaultOrder;
        assumed = this.ambiguousRows > 0;
      } else {
        order = this.dmy.bad < this.mdy.bad ? 'dmy' : 'mdy';
        assumed = true;
      }
    }
    const side = order === 'dmy' ? this.dmy : order === 'mdy' ? this.mdy : undefined;
    const examples = [...this.exact.examples, ...(side?.examples ?? [])].sort((a, b) => a.row - b.row).slice(0, EXAMPLES);
    const min = Math.min(this.exact.min, side?.min ?? Infinity);
    const max = Math.max(this.exact.max, side?.max ?? -Infinity);
    const out: DateSummary = {
      bad: { count: this.exact.bad + (side?.bad ?? 0), examples },
      orderAssumed: assumed,
    };
    if (order) out.order = order;
    if (Number.isFinite(min)) {
      out.earliest = ymdText(min);
      out.latest = ymdText(max);
    }
    return out;
  }
}

/**
 * The month ('2026-03') of a date as the population reader takes it, with the day/month order the
 * scan found (`order`) for dates such as 03/04/2026; undefined when it is not a readable date.
 */
export function monthOfDate(text: string, order: DateOrder | undefined): string | undefined {
  const p = parseDate(text);
  if (!p) return undefined;
  let y: number;
  let m: number;
  if (p.kind === 'exact') {
    y = Math.floor(p.ymd / 10000);
    m = Math.floor(p.ymd / 100) % 100;
  } else {
    const o = order ?? 'mdy';
    y = p.year;
    m = o === 'dmy' ? p.second : p.first;
    const d = o === 'dmy' ? p.first : p.second;
    if (!validYmd(y, m, d)) return undefined;
  }
  return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}`;
}
