import { TolrateInputError } from '../errors.js';
import { int } from './format.js';

/**
 * Parse a rate typed by a user. The user's side speaks percentages: `6`, `6%`, `6.5 %` all mean
 * 6%. Returns a fraction (0.06). Throws a TolrateInputError naming the field when the text is not
 * a number or is outside the open/closed range requested.
 */
export function parsePercent(
  text: string,
  field: string,
  opts: { allowZero?: boolean; allowHundred?: boolean } = {},
): number {
  const t = String(text).trim().replace(/\s*%$/, '').trim();
  if (!/^[+]?(\d+(\.\d*)?|\.\d+)$/.test(t)) {
    throw new TolrateInputError(
      `${field}: "${text}" is not a percentage. Type a number such as 6 or 6% (meaning 6%).`,
      'INVALID_RATE',
    );
  }
  const pct = Number(t);
  const low = opts.allowZero ? pct < 0 : pct <= 0;
  const high = opts.allowHundred ? pct > 100 : pct >= 100;
  if (low || high) {
    const range = `${opts.allowZero ? 'from 0' : 'above 0'} and ${opts.allowHundred ? 'up to 100' : 'below 100'}`;
    throw new TolrateInputError(`${field}: ${pct}% is out of range; it must be ${range}.`, 'INVALID_RATE');
  }
  // Avoid binary noise such as 0.07 * 100 -> 7.000000000000001 on the way back.
  return Number((pct / 100).toPrecision(12));
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
