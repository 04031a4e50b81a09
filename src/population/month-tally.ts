import { AmountTotal } from './amount.js';
import { validYmd } from './date.js';
import type { DateOrder, MonthTally } from './types.js';

/** One tally cell: the rows counted and, with an amount column, their amounts. */
export interface TallyBucket {
  count: number;
  amounts: AmountTotal | undefined;
}

/**
 * The population counted by month of its date column, as the scan reads it (for the memo's
 * spread of the sample over the period, and for re-performance).
 *
 * Whether dates such as 03/04/2026 are day/month or month/day is decided only at the end of the
 * scan (date.ts, DateTracker.summary), so no month is guessed on the way: a date whose order is
 * known is counted under its month (yyyymm), one that still has to be decided under its raw
 * numbers (the negative key DateTracker.add returns: one cell per year, first and second number,
 * at most 372 a year), and `result` folds those into months once the order is known. A raw date
 * that is not a date in the order found counts as undated, as the validation counts it as bad.
 */
export class MonthTallier {
  /** Dates whose month is known: one array of 13 cells (index = month) per year. */
  private readonly years = new Map<number, Array<TallyBucket | undefined>>();
  private lastYear = -1;
  private lastYearCells: Array<TallyBucket | undefined> = [];
  /** Dates such as 03/04/2026, by their raw negative key, until the order is known. */
  private readonly raw = new Map<number, TallyBucket>();
  private readonly none: TallyBucket;

  constructor(private readonly withAmounts: boolean) {
    this.none = this.bucket();
  }

  private bucket(): TallyBucket {
    return { count: 0, amounts: this.withAmounts ? new AmountTotal() : undefined };
  }

  /** The cell of a raw date key (DateTracker.add / addIsoBytes), with one more row counted. */
  take(raw: number): TallyBucket {
    let b: TallyBucket | undefined;
    if (raw > 0) {
      const y = Math.floor(raw / 10000);
      const m = Math.floor(raw / 100) % 100;
      let cells = this.lastYearCells;
      if (y !== this.lastYear) {
        let got = this.years.get(y);
        if (!got) this.years.set(y, (got = new Array<TallyBucket | undefined>(13).fill(undefined)));
        cells = got;
        this.lastYear = y;
        this.lastYearCells = cells;
      }
      b = cells[m];
      if (!b) b = cells[m] = this.bucket();
    } else if (raw === 0) b = this.none;
    else {
      b = this.raw.get(raw);
      if (!b) this.raw.set(raw, (b = this.bucket()));
    }
    b.count++;
    return b;
  }

  /** The tally, once the order of day and month is known (`order` undefined when no date needed one). */
  result(dateColumn: string, order: DateOrder | undefined): MonthTally {
    const months = new Map<number, TallyBucket>();
    let undated = 0;
    const undatedAmounts = this.withAmounts ? new AmountTotal() : undefined;
    const none = (b: TallyBucket) => {
      undated += b.count;
      if (undatedAmounts && b.amounts) undatedAmounts.merge(b.amounts);
    };
    const into = (month: number, b: TallyBucket) => {
      const m = months.get(month);
      if (!m) months.set(month, { count: b.count, amounts: b.amounts ? merged(b.amounts) : undefined });
      else {
        m.count += b.count;
        if (m.amounts && b.amounts) m.amounts.merge(b.amounts);
      }
    };
    for (const [y, cells] of this.years) cells.forEach((b, m) => b && into(y * 100 + m, b));
    none(this.none);
    for (const [key, b] of this.raw) {
      const n = -key;
      const year = Math.floor(n / 10000);
      const first = Math.floor(n / 100) % 100;
      const second = n % 100;
      const [m, d] = order === 'dmy' ? [second, first] : [first, second];
      if (validYmd(year, m, d)) into(year * 100 + m, b);
      else none(b);
    }
    const list = [...months.entries()].sort((a, b) => a[0] - b[0]).map(([k, b]) => ({
      month: `${String(Math.floor(k / 100)).padStart(4, '0')}-${String(k % 100).padStart(2, '0')}`,
      count: b.count,
      ...(b.amounts ? { amountTotal: b.amounts.toString() } : {}),
    }));
    return { dateColumn, ...(order ? { dateOrder: order } : {}), months: list, undated, ...(undatedAmounts ? { undatedAmountTotal: undatedAmounts.toString() } : {}) };
  }
}

function merged(a: AmountTotal): AmountTotal {
  const t = new AmountTotal();
  t.merge(a);
  return t;
}

/** The tally of a population without dates (number ranges, or a file without a date column): every row undated. */
export function noDates(rowCount: number): MonthTally {
  return { months: [], undated: rowCount };
}

/**
 * Every difference between a recorded tally and one read again, named by month (for
 * re-performance): a month whose count or amount differs, a month only one of them has, the
 * undated rows, the column and the day/month order.
 */
export function monthTallyDifferences(recorded: MonthTally, got: MonthTally | undefined): string[] {
  if (!got) return ['the rows by month cannot be counted again (the population read has no tally)'];
  const out: string[] = [];
  if ((recorded.dateColumn ?? '') !== (got.dateColumn ?? '')) out.push(`rows by month: recorded from column "${recorded.dateColumn ?? '(none)'}", read again from "${got.dateColumn ?? '(none)'}"`);
  if ((recorded.dateOrder ?? '') !== (got.dateOrder ?? '')) out.push(`rows by month: dates such as 03/04 recorded as ${recorded.dateOrder ?? '(none)'}, read again as ${got.dateOrder ?? '(none)'}`);
  const a = new Map(recorded.months.map((m) => [m.month, m]));
  const b = new Map(got.months.map((m) => [m.month, m]));
  for (const month of [...new Set([...a.keys(), ...b.keys()])].sort()) {
    const r = a.get(month);
    const g = b.get(month);
    if (!g) out.push(`month ${month}: recorded ${r!.count} rows, the population has none`);
    else if (!r) out.push(`month ${month}: recorded no rows, the population has ${g.count}`);
    else {
      if (r.count !== g.count) out.push(`month ${month}: recorded ${r.count} rows, the population has ${g.count}`);
      if ((r.amountTotal ?? '') !== (g.amountTotal ?? '')) out.push(`month ${month}: recorded amount ${r.amountTotal ?? '(none)'}, the population has ${g.amountTotal ?? '(none)'}`);
    }
  }
  if (recorded.undated !== got.undated) out.push(`rows with no readable date: recorded ${recorded.undated}, the population has ${got.undated}`);
  if ((recorded.undatedAmountTotal ?? '') !== (got.undatedAmountTotal ?? '')) out.push(`amount of the rows with no readable date: recorded ${recorded.undatedAmountTotal ?? '(none)'}, the population has ${got.undatedAmountTotal ?? '(none)'}`);
  return out;
}
