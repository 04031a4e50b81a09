/**
 * Parsers for typed answers. Each takes the text as typed and returns the value, or throws an
 * AnswerError whose message says what is wrong and what to type instead. The interview passes
 * them as a question's `parse`, so the terminal and the scripted answerer validate alike.
 */
import { existsSync, statSync } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import { isBareFraction, parseCount, parsePercent } from '../util/percent.js';
import { int, pctPlain } from '../util/format.js';
import { nearest } from '../util/text.js';

export class AnswerError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'AnswerError';
  }
}

function rethrow<T>(f: () => T): T {
  try {
    return f();
  } catch (e) {
    throw new AnswerError(e instanceof Error ? e.message : String(e));
  }
}

export function requiredText(field: string): (t: string) => string {
  return (t) => {
    const v = t.trim();
    if (v === '') throw new AnswerError(`${field} must not be empty.`);
    return v;
  };
}

/** Optional text: an empty answer is undefined. */
export function optionalText(t: string): string | undefined {
  const v = t.trim();
  return v === '' ? undefined : v;
}

export interface RateLimits {
  allowZero?: boolean;
  /** The rate must be strictly below this (a fraction), with `belowWhat` naming it. */
  below?: number;
  belowWhat?: string;
  /** The rate must be at least this. */
  atLeast?: number;
  atLeastWhat?: string;
  /** A typical answer for this field, shown when the answer is not a number (default 6). */
  example?: string;
}

/** `what (value)`, or just `what` when it already states the value: never "50% (50%)". */
function named(what: string | undefined, value: number): string {
  const v = pctPlain(value);
  if (what === undefined || what === v) return v;
  return what.includes(v) ? what : `${what} (${v})`;
}

/** An answer meaning "none" for an optional question that shows an earlier answer as its default. */
export const NONE_ANSWER = '-';

function isNone(t: string): boolean {
  const v = t.trim();
  return v === '' || v === NONE_ANSWER;
}

/** A percentage typed as `6`, `6%` or with a decimal comma (`0,5`), returned as a fraction. */
export function rate(field: string, limits: RateLimits = {}): (t: string) => number {
  const example = limits.example ?? '6';
  return (t) => {
    if (t.trim() === '') throw new AnswerError(`${field}: type a percentage, e.g. ${example} or ${example}%.`);
    const v = rethrow(() => parsePercent(t, field, { allowZero: limits.allowZero ?? false, example }));
    if (limits.below !== undefined && !(v < limits.below)) {
      throw new AnswerError(`${field}: ${pctPlain(v)} must be below ${named(limits.belowWhat, limits.below)}.`);
    }
    if (limits.atLeast !== undefined && v < limits.atLeast) {
      if (isBareFraction(t) && v * 100 >= limits.atLeast) {
        const asPercent = String(Number((v * 10_000).toPrecision(12)));
        throw new AnswerError(`${field}: ${t.trim()} is read as ${t.trim()}%; write ${asPercent} for ${asPercent}%.`);
      }
      throw new AnswerError(`${field}: ${pctPlain(v)} must be at least ${named(limits.atLeastWhat, limits.atLeast)}.`);
    }
    return v;
  };
}

/** An optional percentage: an empty answer (or `-`, to clear an earlier answer shown as the default) is undefined. */
export function optionalRate(field: string, limits: RateLimits = {}): (t: string) => number | undefined {
  const p = rate(field, limits);
  return (t) => (isNone(t) ? undefined : p(t));
}

export function count(field: string, opts: { min?: number; max?: number; maxWhat?: string } = {}): (t: string) => number {
  return (t) => {
    const v = rethrow(() => parseCount(t, field, opts.min !== undefined ? { min: opts.min } : {}));
    if (opts.max !== undefined && v > opts.max) {
      throw new AnswerError(`${field}: ${int(v)} is more than ${opts.maxWhat ?? 'the maximum'} (${int(opts.max)}).`);
    }
    return v;
  };
}

export function optionalCount(field: string, opts: { min?: number; max?: number; maxWhat?: string } = {}): (t: string) => number | undefined {
  const p = count(field, opts);
  return (t) => (isNone(t) ? undefined : p(t));
}

/** True for a real calendar date written YYYY-MM-DD. */
export function isIsoDate(t: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(t);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const dt = new Date(Date.UTC(y, mo - 1, d));
  return dt.getUTCFullYear() === y && dt.getUTCMonth() === mo - 1 && dt.getUTCDate() === d;
}

export function date(field: string, opts: { notBefore?: string; notBeforeWhat?: string } = {}): (t: string) => string {
  return (t) => {
    const v = t.trim();
    if (!/^\d{4}-\d{2}-\d{2}$/.test(v)) throw new AnswerError(`${field}: "${t}" is not a date written YYYY-MM-DD (e.g. 2025-12-31).`);
    if (!isIsoDate(v)) throw new AnswerError(`${field}: ${v} is not a real calendar date.`);
    if (opts.notBefore && v < opts.notBefore) {
      throw new AnswerError(`${field}: ${v} is before ${opts.notBeforeWhat ?? opts.notBefore} (${opts.notBefore}).`);
    }
    return v;
  };
}

export function optionalDate(field: string, opts: { notBefore?: string; notBeforeWhat?: string } = {}): (t: string) => string | undefined {
  const p = date(field, opts);
  return (t) => (isNone(t) ? undefined : p(t));
}

/** An amount such as `1,234.50` or `-12`, returned as a decimal string without separators. */
export function decimal(field: string): (t: string) => string {
  return (t) => {
    const v = t.trim().replace(/,(?=\d{3}(\D|$))/g, '').replace(/\s/g, '');
    if (!/^-?\d+(\.\d+)?$/.test(v)) throw new AnswerError(`${field}: "${t}" is not an amount; type it like 1234.50 or 1,234.50.`);
    return v;
  };
}

export function optionalDecimal(field: string): (t: string) => string | undefined {
  const p = decimal(field);
  return (t) => (isNone(t) ? undefined : p(t));
}

/** An existing file, typed relative to `baseDir`; returns the absolute path. */
export function existingFile(field: string, baseDir: string, exts?: readonly string[]): (t: string) => string {
  return (t) => {
    const v = t.trim().replace(/^["']|["']$/g, '');
    if (v === '') throw new AnswerError(`${field}: type the path of the file.`);
    const abs = isAbsolute(v) ? v : resolve(baseDir, v);
    if (!existsSync(abs)) throw new AnswerError(`${field}: there is no file at ${abs}.`);
    const st = statSync(abs);
    if (st.isDirectory()) throw new AnswerError(`${field}: ${abs} is a folder, not a file.`);
    if (!st.isFile()) throw new AnswerError(`${field}: ${abs} is ${st.isFIFO() ? 'a named pipe' : st.isSocket() ? 'a socket' : 'a device'}, not a regular file. Give the path of a file saved on disk.`);
    if (exts && !exts.some((e) => abs.toLowerCase().endsWith(e))) {
      throw new AnswerError(`${field}: ${abs} is not a ${exts.join(' or ')} file.`);
    }
    return abs;
  };
}

/** One of `columns` (exact, or differing only in case); suggests the nearest when not found. */
export function column(field: string, columns: readonly string[]): (t: string) => string {
  return (t) => {
    const v = t.trim();
    if (columns.includes(v)) return v;
    const ci = columns.filter((c) => c.toLowerCase() === v.toLowerCase());
    if (ci.length === 1) return ci[0]!;
    const guess = nearest(v, columns);
    throw new AnswerError(`${field}: there is no column "${v}".${guess ? ` Did you mean "${guess}"?` : ''} Columns: ${columns.join(', ')}.`);
  };
}

export function optionalColumn(field: string, columns: readonly string[]): (t: string) => string | undefined {
  const p = column(field, columns);
  return (t) => (t.trim() === '' ? undefined : p(t));
}

/** A name and an ISO date, used by sign-offs: returns the date. */
export function today(now: Date): string {
  return now.toISOString().slice(0, 10);
}
