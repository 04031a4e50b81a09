/**
 * How the sample spreads over the period, for the memo: the population's rows by month as counted
 * when it was read (the fingerprint's tally) beside the sample's items by month of the same date
 * column, for every month of the engagement period, with the rows outside the period and those
 * with no readable date apart. Counts and exact amount totals only; what they mean is for the
 * practitioner to judge.
 *
 * A test done in parts (interim and roll-forward) is shown over the whole period: each month's
 * population is the two parts' tallies added and its sample the two selections' sample items
 * added, each month marked with the part (or, for the month the interim date falls inside, both
 * parts) it belongs to. A part not selected yet, or whose population has no tally (an older file)
 * or no dates, is named, and the months are shown with what is known.
 */
import { AmountTotal, monthOfDate, parseAmount } from '../population/index.js';
import type { MonthTally } from '../population/index.js';
import { partPeriod, partView, worklist } from '../control-test/index.js';
import type { Workpaper } from '../workpaper/schema.js';

export type SpreadPart = 'interim' | 'roll-forward';

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
  /** A test in parts: the parts a month of the period belongs to (both for the month the interim date falls inside). */
  parts?: SpreadPart[];
  /** A test in parts: no part this month belongs to has its sample selected yet (the row shows the population only). */
  samplePending?: boolean;
  /** A test in parts: no part this month belongs to has its population counted by month (the row shows the sample only). */
  populationUnknown?: boolean;
}

/** A test in parts: where each part stands for the spread. */
export interface SpreadParts {
  interimDate: string;
  /** The month the interim date falls inside, when it is not the month's last day: it belongs to both parts. */
  split?: string;
  /** Parts whose population is recorded but whose sample is not selected yet. */
  pending: SpreadPart[];
  /** Parts whose population carries no tally by month (a file written before it was recorded). */
  noTally: SpreadPart[];
  /** Parts whose population carries no dates (a list of numbers, or no date column named). */
  noDates: SpreadPart[];
  /** Parts whose population is not recorded yet. */
  noPopulation: SpreadPart[];
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
      /** Months of the period whose population holds items but from which no item was selected (a month of a part not selected yet is not named). */
      unselected: string[];
      /** Months of the period in which the population holds no item (a month whose population is not counted is not named). */
      empty: string[];
      outside: { population: number; sample: number };
      undated: { population: number; sample: number };
      /** A test in parts only. */
      parts?: SpreadParts;
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

/** One part's population and sample as the spread reads them (the whole test is one such part). */
interface Source {
  part?: SpreadPart;
  /** The tally, when the population records one with a date column. */
  tally?: MonthTally & { dateColumn: string };
  /** The column the sample's dates are read from (the tally's, or the population's own for a file with no tally). */
  dateColumn?: string;
  amountColumn?: string;
  decimalComma: boolean;
  /** The sample items (spares not included); undefined when not selected yet. */
  sample?: Array<{ values: Record<string, string> }>;
}

function sourceOf(wp: Workpaper, part?: SpreadPart): Source | { missing: 'population' | 'tally' | 'dates'; reason?: 'ranges' | 'no-date-column' } {
  const p = wp.population;
  if (!p) return { missing: 'population' };
  const src = p.source;
  const fileLike = src.kind === 'csv' || src.kind === 'xlsx';
  const tally = p.fingerprint.monthTally;
  if (tally && tally.dateColumn === undefined) return { missing: 'dates', reason: src.kind === 'ranges' ? 'ranges' : 'no-date-column' };
  if (!tally && !(fileLike && src.dateColumn)) return { missing: 'dates', reason: src.kind === 'ranges' ? 'ranges' : 'no-date-column' };
  // The sample: the items drawn as the sample (spares are not part of it unless used, which the
  // results record; the spread is of the selection as drawn).
  // Under a two-stage plan the second stage's items count only when they are on the worklist (the
  // first stage left a decision to them); otherwise they were drawn but never tested.
  const listed = wp.selection?.items.some((i) => i.stage === 2) ? new Set(worklist(wp).items.map((x) => x.item.key)) : undefined;
  const sample = wp.selection?.items.filter((i) => i.role === 'sample' && (i.stage !== 2 || listed!.has(i.key)));
  const out: Source = {
    ...(part ? { part } : {}),
    ...(tally ? { tally: tally as MonthTally & { dateColumn: string } } : {}),
    dateColumn: tally?.dateColumn ?? (fileLike ? src.dateColumn : undefined),
    ...(fileLike && src.amountColumn !== undefined ? { amountColumn: src.amountColumn } : {}),
    decimalComma: fileLike && src.decimalComma === true,
    ...(sample ? { sample } : {}),
  };
  return tally ? out : { ...out, missing: 'tally' as const };
}

/** The month of a sample item's date: by the order the scan found, or (no tally) only when the date reads the same either way. */
function sampleMonth(s: Source, value: string): string | undefined {
  if (s.tally) return monthOfDate(value, s.tally.dateOrder);
  const a = monthOfDate(value, 'mdy');
  return a !== undefined && a === monthOfDate(value, 'dmy') ? a : undefined;
}

/**
 * The spread of the sample over the period, or undefined when the workpaper records no tally
 * (a file written before the tally was recorded: the memo leaves the section out). A test in
 * parts is shown over the whole period when at least one part's population records a tally.
 */
export function spreadView(wp: Workpaper): SpreadView | undefined {
  const rf = wp.rollForward;
  if (!rf) {
    const tally = wp.population?.fingerprint.monthTally;
    if (!wp.population || !tally) return undefined;
    const s = sourceOf(wp);
    if ('missing' in s && s.missing === 'dates') return { kind: 'no-dates', reason: s.reason! };
    const src = s as Source;
    if (!src.sample) return { kind: 'no-selection', dateColumn: src.tally!.dateColumn };
    const e = wp.engagement;
    const first = tally.months[0]?.month;
    const last = tally.months[tally.months.length - 1]?.month;
    const period = e ? monthsBetween(e.periodStart.slice(0, 7), e.periodEnd.slice(0, 7)) : first && last ? monthsBetween(first, last) : [];
    return table([src], period, undefined);
  }

  // Each part as its own test (parts.ts is the one place that maps a part to a test).
  const interim = sourceOf(partView(wp, 'interim'), 'interim');
  const later = sourceOf(partView(wp, 'roll-forward'), 'roll-forward');
  const parts: SpreadParts = { interimDate: rf.interimDate, pending: [], noTally: [], noDates: [], noPopulation: [] };
  const sources: Source[] = [];
  for (const [part, s] of [['interim', interim], ['roll-forward', later]] as const) {
    if ('missing' in s) {
      if (s.missing === 'population') parts.noPopulation.push(part);
      else if (s.missing === 'dates') parts.noDates.push(part);
      else parts.noTally.push(part);
    }
    if (!('missing' in s) || s.missing === 'tally') {
      const src = s as Source;
      sources.push(src);
      if (!src.sample) parts.pending.push(part);
    }
  }
  // Nothing counted by month in either part: as for a test in one part, no section.
  if (!sources.some((s) => s.tally)) {
    if (!('reason' in interim) && !('reason' in later)) return undefined;
    const r = ('reason' in interim && interim.reason) || ('reason' in later && later.reason) || 'no-date-column';
    return { kind: 'no-dates', reason: r };
  }
  const columns = [...new Set(sources.map((s) => s.dateColumn!))];
  const dateColumn = columns.length === 1 ? columns[0]! : sources.map((s) => `${s.dateColumn} (${s.part})`).join(', ');
  if (!sources.some((s) => s.sample)) return { kind: 'no-selection', dateColumn };
  const e = wp.engagement;
  const ip = partPeriod(wp, 'interim');
  const lp = partPeriod(wp, 'roll-forward');
  if (!e || !ip || !lp) return undefined;
  const interimMonths = monthsBetween(ip.start.slice(0, 7), ip.end.slice(0, 7));
  const laterMonths = monthsBetween(lp.start.slice(0, 7), lp.end.slice(0, 7));
  const period = monthsBetween(e.periodStart.slice(0, 7), e.periodEnd.slice(0, 7));
  const partsOf = new Map<string, SpreadPart[]>();
  for (const m of period) {
    const ps: SpreadPart[] = [];
    if (interimMonths.includes(m)) ps.push('interim');
    if (laterMonths.includes(m)) ps.push('roll-forward');
    partsOf.set(m, ps);
  }
  const split = period.find((m) => partsOf.get(m)!.length === 2);
  if (split) parts.split = split;
  return table(sources, period, { parts, partsOf, dateColumn });
}

function table(sources: Source[], period: string[], p: { parts: SpreadParts; partsOf: Map<string, SpreadPart[]>; dateColumn: string } | undefined): SpreadView {
  const withAmounts = sources.some((s) => s.amountColumn !== undefined && s.tally?.months.some((m) => m.amountTotal !== undefined));
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
  for (const s of sources) {
    const tally = s.tally;
    if (tally) {
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
    }
    for (const it of s.sample ?? []) {
      const month = sampleMonth(s, it.values[s.dateColumn!] ?? '');
      const c = at(smp, month === undefined ? UND : inPeriod.has(month) ? month : OUT);
      c.count++;
      const a = s.amountColumn !== undefined ? parseAmount(it.values[s.amountColumn] ?? '', { decimalComma: s.decimalComma }) : undefined;
      if (a) c.total.add(a);
    }
  }
  const selected = new Set(sources.filter((s) => s.sample).map((s) => s.part));
  const counted = new Set(sources.filter((s) => s.tally).map((s) => s.part));
  const cellOf = (map: Map<string, Cell>, k: string) => (map.get(k) ?? new Cell()).cell(withAmounts);
  const rows: SpreadRow[] = period.map((month) => {
    const row: SpreadRow = { month, kind: 'month', population: cellOf(pop, month), sample: cellOf(smp, month) };
    if (p) {
      const ps = p.partsOf.get(month)!;
      row.parts = ps;
      if (!ps.some((x) => selected.has(x))) row.samplePending = true;
      if (!ps.some((x) => counted.has(x))) row.populationUnknown = true;
    }
    return row;
  });
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
  // A month is named as having no item selected only when every part it belongs to is selected,
  // and as empty only when every part it belongs to is counted: a part not known yet decides nothing.
  const allSelected = (r: SpreadRow) => !p || r.parts!.every((x) => selected.has(x));
  const allCounted = (r: SpreadRow) => !p || r.parts!.every((x) => counted.has(x));
  return {
    kind: 'table',
    dateColumn: p ? p.dateColumn : sources[0]!.tally!.dateColumn,
    withAmounts,
    rows,
    populationTotal: popTotal.count,
    sampleTotal: smpTotal.count,
    unselected: monthRows.filter((r) => r.population.count > 0 && r.sample.count === 0 && allSelected(r)).map((r) => r.month!),
    empty: monthRows.filter((r) => r.population.count === 0 && allCounted(r)).map((r) => r.month!),
    outside: { population: pop.get(OUT)?.count ?? 0, sample: smp.get(OUT)?.count ?? 0 },
    undated: { population: pop.get(UND)?.count ?? 0, sample: smp.get(UND)?.count ?? 0 },
    ...(p ? { parts: p.parts } : {}),
  };
}
