/**
 * Exact products of a count and a rate, rounded up or down, for the counts the engine derives from
 * rates: the tolerable deviations ⌈TDR·N⌉, the expected deviations ⌈n·EDR⌉, the deviations at the
 * expected rate ⌊EDR·N⌋ and the last size of a run of equal k_e, ⌊k / EDR⌋.
 *
 * Method: a rate is taken as the decimal it was typed as. A string ("0.07", "7e-2") is read
 * digit by digit; a number is read through its shortest round-trip representation
 * (`String(0.07)` is "0.07", ECMAScript Number::toString), which is the decimal the user typed
 * whenever it has at most 15 significant digits. The rate is then D / 10^s with whole D and s,
 * and the product is formed in integer (BigInt) arithmetic, so no binary noise can move a
 * ceiling: ⌈884,590,000 × 0.07⌉ = 61,921,300 exactly. Whole-number fast paths are used when
 * every intermediate stays below 2^53. Internal (the engine's public functions call it).
 */
import { SamplingInputError } from '../errors.js';

/** A rate as the exact decimal D / 10^scale, D ≥ 0. */
export interface ExactDecimal {
  digits: bigint;
  scale: number;
  /** D and 10^scale as numbers when both are exact (≤ 2^53), else undefined. */
  digitsNumber?: number;
  denominatorNumber?: number;
}

const cache = new Map<string, ExactDecimal>();

/** The exact decimal of a rate given as a number (its shortest representation) or a decimal string. */
export function exactDecimal(rate: number | string): ExactDecimal {
  const text = typeof rate === 'number' ? String(rate) : rate.trim();
  const hit = cache.get(text);
  if (hit) return hit;
  const m = /^(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text);
  if (!m || (m[1] === '' && (m[2] ?? '') === '')) {
    throw new SamplingInputError('rate', `the rate ${JSON.stringify(text)} is not a decimal number such as 0.07.`);
  }
  const whole = m[1] ?? '';
  const frac = m[2] ?? '';
  const exp = m[3] === undefined ? 0 : Number.parseInt(m[3], 10);
  let digits = BigInt(`${whole}${frac}` || '0');
  let scale = frac.length - exp;
  if (scale < 0) {
    digits *= 10n ** BigInt(-scale);
    scale = 0;
  }
  while (scale > 0 && digits % 10n === 0n && digits !== 0n) {
    digits /= 10n;
    scale--;
  }
  const out: ExactDecimal = { digits, scale };
  const den = 10n ** BigInt(scale);
  if (digits <= BigInt(Number.MAX_SAFE_INTEGER) && den <= BigInt(Number.MAX_SAFE_INTEGER)) {
    out.digitsNumber = Number(digits);
    out.denominatorNumber = Number(den);
  }
  if (cache.size > 1000) cache.clear();
  cache.set(text, out);
  return out;
}

/** ⌈count × rate⌉, exact. */
export function ceilTimes(count: number, rate: number | string): number {
  const d = exactDecimal(rate);
  if (d.digitsNumber !== undefined && d.denominatorNumber !== undefined) {
    const prod = count * d.digitsNumber;
    if (Number.isSafeInteger(prod + d.denominatorNumber)) {
      const q = Math.floor(prod / d.denominatorNumber);
      // q is within one of the true quotient; settle it with exact whole-number products.
      let c = q;
      while (c * d.denominatorNumber < prod) c++;
      while (c > 0 && (c - 1) * d.denominatorNumber >= prod) c--;
      return c;
    }
  }
  const num = BigInt(count) * d.digits;
  const den = 10n ** BigInt(d.scale);
  return Number((num + den - 1n) / den);
}

/** ⌊count × rate⌋, exact. */
export function floorTimes(count: number, rate: number | string): number {
  const d = exactDecimal(rate);
  const num = BigInt(count) * d.digits;
  return Number(num / 10n ** BigInt(d.scale));
}

/** ⌊count / rate⌋ for a rate above 0, exact: the largest n with n × rate ≤ count. */
export function floorDivide(count: number, rate: number | string): number {
  const d = exactDecimal(rate);
  if (d.digits === 0n) throw new SamplingInputError('rate', 'the rate must be above 0 here.');
  if (d.digitsNumber !== undefined && d.denominatorNumber !== undefined) {
    const prod = count * d.denominatorNumber;
    if (Number.isSafeInteger(prod + d.digitsNumber)) {
      let q = Math.floor(prod / d.digitsNumber);
      while (q * d.digitsNumber > prod) q--;
      while ((q + 1) * d.digitsNumber <= prod) q++;
      return q;
    }
  }
  return Number((BigInt(count) * 10n ** BigInt(d.scale)) / d.digits);
}
