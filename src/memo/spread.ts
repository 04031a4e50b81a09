/**
 * How the sample spreads over the period, for the memo: the population's rows by month as counted
 * when it was read (the fingerprint's tally) beside the sample's items by month of the same date
 * column, for every month of the engagement period, with the rows outside the period and those
 * with no readable date apart. Counts and exact amount totals only; what they mean is for the
 * practitioner to judge.
 */
import { AmountTotal, monthOfDate, parseAmount } from '../population/index.js';
import type { Workpaper } from '../workpaper/schema.js';

export interface SpreadCell {
  count: number;
  /** Exact total of the readable amounts ('' when the population has no amount column). */
  amount: string;
}

export interface SpreadRow {
  /** 'YYYY-MM' for a month of the period; undefined for the 'outside' and 'undated' rows. */
  month?: string;
  kind: 'month' | 'outside' | 'undated' | 'total';
  population: SpreadCell;
  sample: SpreadCell;
}

export type SpreadView =
  | { kind: 'no-dates'; reason: 'ranges' | 'no-date-column' }
  | { kind: 'no-selection'; dateColumn: string }
  | {
      kind: 'table';
      dateColumn: string;
      withAmounts: boolean;
      /** Every month of the period in order, then the outside and undated rows when they hold anything, then the total. */
      rows: SpreadRow[];
      populationTotal: number;
      sampleTotal: number;
      /** Months of the period whose population holds items but from which no item was selected. */
      unselected: string[];
      /** Months of the period in which the population holds no item. */
      empty: string[];
      outside: { population: number; sample: number };
      undated: { population: number; sample: number };
    };

function monthsBetween(start: string, end: string): string[] {
  const out: string[] = [];
  let y = Number(start.slice(0, 4));
  let m = Number(start.slice(5, 7));
  const ey = Number(end.slice(0, 4));
  const em = Number(end.slice(5, 7));
  // A period is at most a few years; the cap keeps a mistyped year from making thousands of rows.
  while ((y < ey || (y === ey && m <= em)) && out.length < 600) {
    out.push(`${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}`);
    if (++m > 12) {
      m = 1;
      y++;
    }
  }
  return out;
}

class Cell {
  count = 0;
  readonly total = new AmountTotal();
  cell(withAmounts: boolean): SpreadCell {
    return { count: this.count, amount: withAmounts ? this.total.toString() : '' };
  }
}

/**
 * The spread of the sample over the period, or undefined when the workpaper records no tally
 * (a file written before the tally was recorded: the memo leaves the section out).
 */
export function spreadView(wp: Workpaper): SpreadView | undefined {
  const p = wp.population;
  const tally = p?.fingerprint.monthTally;
  if (!p || !tally) return undefined;
  if (tally.dateColumn === undefined) return { kind: 'no-dates', reason: p.source.kind === 'ranges' ? 'ranges' : 'no-date-column' };
  const s = wp.selection;
  if (!s) return { kind: 'no-selection', dateColumn: tally.dateColumn };
  const src = p.source;
  const amountColumn = src.kind === 'csv' || src.kind === 'xlsx' ? src.amountColumn : undefined;
  const decimalComma = (src.kind === 'csv' || src.kind === 'xlsx') && src.decimalComma === true;
  const withAmounts = amountColumn !== undefined && tally.months.some((m) => m.amountTotal !== undefined);
  const e = wp.engagement;
  const first = tally.months[0]?.month;
  const last = tally.months[tally.months.length - 1]?.month;
  const period = e ? monthsBetween(e.periodStart.slice(0, 7), e.periodEnd.slice(0, 7)) : first && last ? monthsBetween(first, last) : [];
  const inPeriod = new Set(period);
  const pop = new Map<string, Cell>();
  const smp = new Map<string, Cell>();
  const at = (map: Map<string, Cell>, k: string) => {
    let c = map.get(k);
    if (!c) map.set(k, (c = new Cell()));
    return c;
  };
  const OUT = 'outside';
  const UND = 'undated';
  for (const m of tally.months) {
    const c = at(pop, inPeriod.has(m.month) ? m.month : OUT);
    c.count += m.count;
    const a = m.amountTotal !== undefined ? parseAmount(m.amountTotal) : undefined;
    if (a) c.total.add(a);
  }
  const und = at(pop, UND);
  und.count += tally.undated;
  const ua = tally.undatedAmountTotal !== undefined ? parseAmount(tally.undatedAmountTotal) : undefined;
  if (ua) und.total.add(ua);
  // The sample: the items drawn as the sample (spares are not part of it unless used, which the
  // results record; the spread is of the selection as drawn).
  const sample = s.items.filter((i) => i.role === 'sample');
  for (const it of sample) {
    const month = monthOfDate(it.values[tally.dateColumn] ?? '', tally.dateOrder);
    const c = at(smp, month === undefined ? UND : inPeriod.has(month) ? month : OUT);
    c.count++;
    const a = amountColumn !== undefined ? parseAmount(it.values[amountColumn] ?? '', { decimalComma }) : undefined;
    if (a) c.total.add(a);
  }
  const cellOf = (map: Map<string, Cell>, k: string) => (map.get(k) ?? new Cell()).cell(withAmounts);
  const rows: SpreadRow[] = period.map((month) => ({ month, kind: 'month', population: cellOf(pop, month), sample: cellOf(smp, month) }));
  for (const k of [OUT, UND] as const) {
    if ((pop.get(k)?.count ?? 0) + (smp.get(k)?.count ?? 0) > 0) rows.push({ kind: k, population: cellOf(pop, k), sample: cellOf(smp, k) });
  }
  const sum = (map: Map<string, Cell>) => {
    const c = new Cell();
    for (const x of map.values()) {
      c.count += x.count;
      c.total.merge(x.total);
    }
    return c.cell(withAmounts);
  };
  const popTotal = sum(pop);
  const smpTotal = sum(smp);
  rows.push({ kind: 'total', population: popTotal, sample: smpTotal });
  const monthRows = rows.filter((r) => r.kind === 'month');
  return {
    kind: 'table',
    dateColumn: tally.dateColumn,
    withAmounts,
    rows,
    populationTotal: popTotal.count,
    sampleTotal: smpTotal.count,
    unselected: monthRows.filter((r) => r.population.count > 0 && r.sample.count === 0).map((r) => r.month!),
    empty: monthRows.filter((r) => r.population.count === 0).map((r) => r.month!),
    outside: { population: pop.get(OUT)?.count ?? 0, sample: smp.get(OUT)?.count ?? 0 },
    undated: { population: pop.get(UND)?.count ?? 0, sample: smp.get(UND)?.count ?? 0 },
  };
}
