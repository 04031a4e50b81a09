import { TolrateInputError } from '../errors.js';
import { int } from './format.js';

export interface PercentOptions {
  allowZero?: boolean;
  allowHundred?: boolean;
  /** A typical answer, shown when the text is not a number (default 6). */
  example?: string;
  /**
   * Refuse a number between 0 and 1 typed without a % sign (`0.05`): it reads as 0.05%, but it
   * may have been meant as the fraction 0.05 = 5%. For the calculators' rate flags.
   */
  refuseBareFraction?: boolean;
}

/**
 * Parse a rate typed by a user. The user's side speaks percentages: `6`, `6%`, `6.5 %` all mean
 * 6%, and so does a decimal comma, `6,5` = 6.5%. Returns a fraction (0.06). Throws a
 * TolrateInputError naming the field when the text is not a number, carries a thousands separator
 * (`1,000` or `1.000,5`: a rate has none, and a comma before exactly three digits would be read
 * either way), is outside the open/closed range requested, or, with `refuseBareFraction`, is a
 * number between 0 and 1 without a % sign.
 */
export function parsePercent(text: string, field: string, opts: PercentOptions = {}): number {
  const typed = String(text).trim();
  const hasSign = /%$/.test(typed);
  const t = decimalPoint(typed.replace(/\s*%$/, '').trim(), text, field);
  const example = opts.example ?? '6';
  if (!/^[+]?(\d+(\.\d*)?|\.\d+)$/.test(t)) {
    throw new TolrateInputError(
      `${field}: "${text}" is not a percentage. Type a number such as ${example} or ${example}% (meaning ${example}%).`,
      'INVALID_RATE',
    );
  }
  const pct = Number(t);
  if (opts.refuseBareFraction && !hasSign && pct > 0 && pct < 1) {
    const shown = typed.replace(/^\+/, '');
    throw new TolrateInputError(
      `${field}: ${shown} is read as ${shown}%; write ${Number((pct * 100).toPrecision(12))} for ${Number((pct * 100).toPrecision(12))}%, or ${shown}% if you mean ${shown}%.`,
      'AMBIGUOUS_RATE',
    );
  }
  const low = opts.allowZero ? pct < 0 : pct <= 0;
  const high = opts.allowHundred ? pct > 100 : pct >= 100;
  if (low || high) {
    const range = `${opts.allowZero ? 'from 0' : 'above 0'} and ${opts.allowHundred ? 'up to 100' : 'below 100'}`;
    throw new TolrateInputError(`${field}: ${pct}% is out of range; it must be ${range}.`, 'INVALID_RATE');
  }
  // Avoid binary noise such as 0.07 * 100 -> 7.000000000000001 on the way back.
  return Number((pct / 100).toPrecision(12));
}

/**
 * True when a typed rate is a number between 0 and 1 without a % sign (`0.05`, `0,5`): it is
 * read as a percentage below 1%, which may not be what was meant. False for anything else,
 * including text that is not a number.
 */
export function isBareFraction(text: string): boolean {
  const typed = String(text).trim();
  if (/%$/.test(typed)) return false;
  const t = typed.replace(/^(\d*),(\d+)$/, '$1.$2');
  if (!/^[+]?(\d+(\.\d*)?|\.\d+)$/.test(t)) return false;
  const pct = Number(t);
  return pct > 0 && pct < 1;
}

/** The number with a decimal comma turned into a point; refuses grouping separators. */
function decimalPoint(t: string, text: string, field: string): string {
  if (!t.includes(',')) return t;
  const m = /^([+]?)(\d*),(\d+)$/.exec(t);
  if (m && !(m[3]!.length === 3 && m[2] !== '' && m[2] !== '0')) return `${m[1]}${m[2] || '0'}.${m[3]}`;
  throw new TolrateInputError(
    `${field}: "${text}" looks like a number with a thousands separator; a percentage has none. Type it with one decimal point or comma and no grouping, e.g. 0.5 or 0,5 for 0.5%.`,
    'INVALID_RATE',
  );
}

/** Parse a whole number typed by a user (counts, sizes). */
export function parseCount(text: string, field: string, opts: { min?: number; max?: number } = {}): number {
  const t = String(text).trim().replace(/[,_](?=\d{3}\b)/g, '');
  if (!/^\d+$/.test(t)) {
    throw new TolrateInputError(`${field}: "${text}" is not a whole number.`, 'INVALID_COUNT');
  }
  const v = Number(t);
  if (!Number.isSafeInteger(v)) throw new TolrateInputError(`${field}: ${text} is too large.`, 'INVALID_COUNT');
  if (opts.min !== undefined && v < opts.min) {
    throw new TolrateInputError(`${field}: ${int(v)} is below the minimum of ${int(opts.min)}.`, 'INVALID_COUNT');
  }
  if (opts.max !== undefined && v > opts.max) {
    throw new TolrateInputError(`${field}: ${int(v)} is above the maximum of ${int(opts.max)}.`, 'INVALID_COUNT');
  }
  return v;
}
