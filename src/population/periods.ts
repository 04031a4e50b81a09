import { createHash } from 'node:crypto';
import { TolrateInputError } from '../errors.js';
import { buildValidation, Problems } from './checker.js';
import { lookupKeys } from './ranges.js';
import type { KeyLookup, MonthTally, PeriodsSource, PopulationRow, PopulationScan } from './types.js';

/**
 * The population of a periodic control, made from the period under test and the control's
 * frequency, without a file: each month, quarter, week or working day of the period is one
 * sampling unit (an occurrence of the control), so a monthly control's test selects months.
 *
 * - Monthly: calendar months (key 2025-03); quarterly: calendar quarters (2025-Q1); weekly: weeks
 *   from Monday to Sunday (key: the Monday, 2025-03-03); daily: working days (key 2025-03-04),
 *   Monday to Friday, less the listed non-working days (public holidays, closures).
 * - A month, quarter or week that the period only partly covers is a unit all the same; its
 *   `from` and `to` are cut to the period.
 * - Units are in date order; the fingerprint hashes a canonical text of the frequency, the period
 *   and the non-working days (shown in the fingerprint), as for number ranges.
 * Weeks starting on Monday and Monday-to-Friday working days: common practice, no single source.
 */

export const PERIOD_FREQUENCIES = ['monthly', 'quarterly', 'weekly', 'daily'] as const;
export type PeriodFrequency = (typeof PERIOD_FREQUENCIES)[number];
export const PERIOD_COLUMNS = ['period', 'from', 'to', 'weekday'] as const;

const DAY = 86_400_000;
const WEEKDAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

function iso(t: number): string {
  return new Date(t).toISOString().slice(0, 10);
}

function day(text: string, what: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text.trim());
  const t = m ? Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) : NaN;
  if (!m || iso(t) !== text.trim()) throw new TolrateInputError(`${what}: "${text}" is not a date written YYYY-MM-DD.`, 'INVALID_PERIOD');
  return t;
}

/** The non-working days as typed ("2025-12-25, 2025-12-26"): each a date, in order, each once. */
export function parseNonWorkingDays(text: string): string[] {
  const out = new Set<string>();
  for (const tok of text.split(/[,;\s]+/)) if (tok !== '') out.add(iso(day(tok, 'Non-working days')));
  return [...out].sort();
}

interface Unit {
  key: string;
  from: number;
  to: number;
}

export interface ParsedPeriods {
  units: Unit[];
  canonical: string;
  /** Listed non-working days that fell on a working day of the period (and were left out). */
  excluded: number;
  /** Listed days outside the period or on a weekend (they change nothing). */
  ignored: string[];
}

export function parsePeriods(src: PeriodsSource): ParsedPeriods {
  if (!(PERIOD_FREQUENCIES as readonly string[]).includes(src.frequency)) {
    throw new TolrateInputError(`A periodic population is made for a monthly, quarterly, weekly or daily control, not "${src.frequency}".`, 'INVALID_PERIOD');
  }
  const start = day(src.start, 'Period start');
  const end = day(src.end, 'Period end');
  if (end < start) throw new TolrateInputError(`The period ends (${src.end}) before it starts (${src.start}).`, 'INVALID_PERIOD');
  if (end - start > 40 * 366 * DAY) throw new TolrateInputError('The period is longer than 40 years.', 'INVALID_PERIOD');
  const off = [...new Set((src.nonWorkingDays ?? []).map((d) => iso(day(d, 'Non-working days'))))].sort();
  const units: Unit[] = [];
  const cut = (from: number, to: number): [number, number] => [Math.max(from, start), Math.min(to, end)];
  const d0 = new Date(start);
  if (src.frequency === 'monthly' || src.frequency === 'quarterly') {
    const step = src.frequency === 'monthly' ? 1 : 3;
    let y = d0.getUTCFullYear();
    let m = src.frequency === 'monthly' ? d0.getUTCMonth() : Math.floor(d0.getUTCMonth() / 3) * 3;
    for (;;) {
      const a = Date.UTC(y, m, 1);
      if (a > end) break;
      const b = Date.UTC(y, m + step, 1) - DAY;
      const [from, to] = cut(a, b);
      const key = step === 1 ? `${y}-${String(m + 1).padStart(2, '0')}` : `${y}-Q${m / 3 + 1}`;
      units.push({ key, from, to });
      m += step;
      if (m >= 12) {
        m -= 12;
        y++;
      }
    }
  } else if (src.frequency === 'weekly') {
    // The Monday on or before the start.
    let a = start - ((d0.getUTCDay() + 6) % 7) * DAY;
    for (; a <= end; a += 7 * DAY) {
      const [from, to] = cut(a, a + 6 * DAY);
      units.push({ key: iso(a), from, to });
    }
  } else {
    const skip = new Set(off);
    for (let t = start; t <= end; t += DAY) {
      const wd = new Date(t).getUTCDay();
      if (wd === 0 || wd === 6 || skip.has(iso(t))) continue;
      units.push({ key: iso(t), from: t, to: t });
    }
  }
  let excluded = 0;
  const ignored: string[] = [];
  for (const d of off) {
    const t = day(d, 'Non-working days');
    const wd = new Date(t).getUTCDay();
    if (src.frequency === 'daily' && t >= start && t <= end && wd !== 0 && wd !== 6) excluded++;
    else ignored.push(d);
  }
  const canonical =
    'tolrate population: periods, v1\n' +
    `frequency: ${src.frequency}\n` +
    `period: ${iso(start)} to ${iso(end)}\n` +
    `non-working days: ${off.length ? off.join(',') : 'none'}\n`;
  return { units, canonical, excluded, ignored };
}

function rowOf(u: Unit, position: number): PopulationRow {
  return {
    position,
    row: position + 1,
    key: u.key,
    values: { period: u.key, from: iso(u.from), to: iso(u.to), weekday: u.from === u.to ? WEEKDAYS[new Date(u.from).getUTCDay()]! : '' },
  };
}

export function scanPeriods(src: PeriodsSource): PopulationScan {
  const p = parsePeriods(src);
  const otherProblems: string[] = [];
  const notes: string[] = [];
  if (p.units.length === 0) otherProblems.push('The period holds no working day: check the period and the non-working days.');
  if (p.ignored.length > 0) {
    const why = src.frequency === 'daily' ? 'outside the period or on a weekend' : `not used for a ${src.frequency} control`;
    notes.push(`Non-working days ${why}, so they change nothing: ${p.ignored.slice(0, 5).join(', ')}${p.ignored.length > 5 ? ', ...' : ''}.`);
  }
  const partial = src.frequency === 'daily' ? [] : p.units.filter((u, i) => (i === 0 || i === p.units.length - 1) && !whole(u, src.frequency));
  if (partial.length > 0) notes.push(`The period covers part of ${partial.map((u) => u.key).join(' and ')} only; each is one unit all the same, from ${partial.map((u) => `${iso(u.from)} to ${iso(u.to)}`).join(' and ')}.`);
  const validation = buildValidation({
    rowCount: p.units.length,
    duplicates: { count: 0, rows: 0, examples: [] },
    blankKeys: new Problems(),
    badRows: new Problems(),
    badAmounts: new Problems(),
    badEncoding: new Problems(),
    blankLines: new Problems(),
    otherProblems,
    notes,
    rowWord: 'row',
  });
  const n = p.units.length;
  return {
    fingerprint: {
      sha256: createHash('sha256').update(p.canonical, 'utf8').digest('hex'),
      rowCount: n,
      firstKey: n ? p.units[0]!.key : '',
      lastKey: n ? p.units[n - 1]!.key : '',
      columns: [...PERIOD_COLUMNS],
      format: 'periods',
      keyColumn: 'period',
      canonical: p.canonical,
      excludedCount: p.excluded,
      ...(n ? { dateRange: { earliest: iso(p.units[0]!.from), latest: iso(p.units[n - 1]!.to) }, dateColumn: 'from' } : {}),
      monthTally: periodMonths(p.units),
    },
    validation,
  };
}

/** The occurrences by month of their first day (the `from` column, cut to the period). */
function periodMonths(units: readonly Unit[]): MonthTally {
  const months: MonthTally['months'] = [];
  for (const u of units) {
    const month = iso(u.from).slice(0, 7);
    const last = months[months.length - 1];
    if (last && last.month === month) last.count++;
    else months.push({ month, count: 1 });
  }
  return { dateColumn: 'from', months, undated: 0 };
}

/** A unit the period covers whole (a full month, quarter or week). */
function whole(u: Unit, f: PeriodsSource['frequency']): boolean {
  const a = new Date(u.from);
  if (f === 'weekly') return u.to - u.from === 6 * DAY;
  const step = f === 'monthly' ? 1 : 3;
  return a.getUTCDate() === 1 && (f === 'monthly' || a.getUTCMonth() % 3 === 0) && u.to === Date.UTC(a.getUTCFullYear(), a.getUTCMonth() + step, 1) - DAY;
}

export function periodsRowsAt(src: PeriodsSource, positions: readonly number[]): PopulationRow[] {
  const p = parsePeriods(src);
  return positions.map((pos) => {
    if (!Number.isSafeInteger(pos) || pos < 0) throw new TolrateInputError(`Row position ${String(pos)} is not a whole number from 0 up.`, 'INVALID_POSITION');
    const u = p.units[pos];
    if (!u) throw new TolrateInputError(`Row position ${pos} is beyond the population, which has ${p.units.length} periods (positions count from 0).`, 'POSITION_OUT_OF_RANGE');
    return rowOf(u, pos);
  });
}

export function periodsFindKeys(src: PeriodsSource, keys: readonly string[]): KeyLookup {
  const p = parsePeriods(src);
  const at = new Map(p.units.map((u, i) => [u.key, i]));
  return lookupKeys(keys, p.units.length, (k) => {
    const i = at.get(k);
    return i === undefined ? [] : [rowOf(p.units[i]!, i)];
  });
}

const EACH: Record<PeriodFrequency, string> = { monthly: 'each month', quarterly: 'each quarter', weekly: 'each week (Monday to Sunday)', daily: 'each working day (Monday to Friday)' };

/** The population in words: "each month, 2025-01-01 to 2025-12-31" (with the non-working days, if any). */
export function describePeriods(src: Pick<PeriodsSource, 'frequency' | 'start' | 'end' | 'nonWorkingDays'>): string {
  const off = src.nonWorkingDays ?? [];
  return `${EACH[src.frequency]}, ${src.start} to ${src.end}${off.length ? `, less ${off.length} non-working day${off.length === 1 ? '' : 's'} (${off.join(', ')})` : ''}`;
}
