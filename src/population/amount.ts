/**
 * Amounts as a population file writes them, read exactly.
 *
 * Accepted (default, point as decimal mark): `1234.56`, `1,234.56` (commas only in groups of three),
 * `-12.00`, `+12`, `(12.00)` (negative), `12.`, `.5`, a currency symbol or three-letter code before
 * or after the number (`$1,234.56`, `-$12`, `EUR 12.00`, `12.00 €`, `US$ 5`), spaces around.
 * With `decimalComma` the roles swap: `1.234,56`, `1 234,56`, `-12,00`, `(12,00)`.
 * Refused: exponents (`1e5`), two signs, badly grouped digits (`1,23.4`), anything else.
 *
 * Totals are kept as integers of the smallest unit seen (BigInt plus a safe-integer fast lane), so
 * a million amounts add up to the exact decimal total; nothing passes through float addition.
 */

export interface ParsedAmount {
  negative: boolean;
  /** Integer digits without separators or leading zeros ('0' when none). */
  int: string;
  /** Fraction digits as written (may be ''). */
  frac: string;
}

export interface AmountOptions {
  /** Comma as the decimal mark, point or space as the thousands separator. */
  decimalComma?: boolean;
}

const SYMBOLS = '$€£¥₹¢₩₽₺₪₫₱฿';
const CUR = `(?:[A-Z]{3}|[A-Z]{1,2}\\$|[${SYMBOLS}])`;
const SHAPE = new RegExp(
  `^([+\\-\\u2212]?)\\s*(?:${CUR}\\s*)?([+\\-\\u2212]?)\\s*([0-9][0-9.,' \\u00a0\\u202f]*|[.,][0-9]+)\\s*(?:${CUR}\\s*)?$`,
  'u',
);
const US_NUMBER = /^(\d{1,3}(?:,\d{3})+|\d+)?(?:\.(\d*))?$/;
const COMMA_NUMBER = /^(\d{1,3}(?:[. \u00a0\u202f]\d{3})+|\d+)?(?:,(\d*))?$/;

/** Parse one amount; undefined when the text is blank or not an amount. */
export function parseAmount(text: string, opts: AmountOptions = {}): ParsedAmount | undefined {
  let t = text.trim();
  if (t === '') return undefined;
  let negative = false;
  if (t.startsWith('(') && t.endsWith(')')) {
    negative = true;
    t = t.slice(1, -1).trim();
  }
  const m = SHAPE.exec(t);
  if (!m) return undefined;
  const s1 = m[1]!;
  const s2 = m[2]!;
  if (s1 && s2) return undefined;
  const sign = s1 || s2;
  if (sign && negative) return undefined;
  if (sign === '-' || sign === '\u2212') negative = true;
  const num = m[3]!.trim();
  const nm = (opts.decimalComma ? COMMA_NUMBER : US_NUMBER).exec(num);
  if (!nm) return undefined;
  const intRaw = (nm[1] ?? '').replace(/[^0-9]/g, '');
  const frac = nm[2] ?? '';
  if (intRaw === '' && frac === '') return undefined;
  const int = intRaw.replace(/^0+(?=\d)/, '') || '0';
  return { negative, int, frac };
}

/** The parsed amount as a plain decimal string: '-1234.50'. */
export function amountText(p: ParsedAmount): string {
  const zero = /^0*$/.test(p.int + p.frac);
  return `${p.negative && !zero ? '-' : ''}${p.int}${p.frac ? `.${p.frac}` : ''}`;
}

/** A decimal string with thousands separators for display: '-1234567.8' -> '-1,234,567.8'. */
export function groupDigits(decimal: string): string {
  const m = /^(-?)(\d+)(\.\d+)?$/.exec(decimal);
  if (!m) return decimal;
  return `${m[1]}${m[2]!.replace(/\B(?=(\d{3})+(?!\d))/g, ',')}${m[3] ?? ''}`;
}

const POW10 = Array.from({ length: 16 }, (_, i) => 10 ** i);
const SMALL_LIMIT = 2 ** 52;
const UNIT_LIMIT = 2 ** 50;

/** An exact running total of amounts with any number of decimal places. */
export class AmountTotal {
  /** Number of amounts added. */
  count = 0;
  /** Number of negative amounts added. */
  negatives = 0;
  private scale = 0;
  private big = 0n;
  private small = 0;
  /** The amount the last successful addBytes read, as addUnits takes it (so a second total can add it without reading it again). */
  lastNegative = false;
  lastUnits = 0;
  lastDecimals = 0;

  private rescale(f: number): void {
    if (f <= this.scale) return;
    this.flush();
    this.big *= 10n ** BigInt(f - this.scale);
    this.scale = f;
  }

  private flush(): void {
    if (this.small !== 0) {
      this.big += BigInt(this.small);
      this.small = 0;
    }
  }

  /** Add an amount given as an integer of digits `v` (a safe integer) with `f` fraction digits. */
  addUnits(negative: boolean, v: number, f: number): void {
    this.count++;
    if (negative && v !== 0) this.negatives++;
    if (f > this.scale) this.rescale(f);
    const shift = this.scale - f;
    if (shift < 16) {
      const units = v * POW10[shift]!;
      if (units <= UNIT_LIMIT) {
        this.small += negative ? -units : units;
        if (this.small > SMALL_LIMIT || this.small < -SMALL_LIMIT) this.flush();
        return;
      }
    }
    const b = BigInt(v) * 10n ** BigInt(shift);
    this.big += negative ? -b : b;
  }

  /** Add a parsed amount. */
  add(p: ParsedAmount): void {
    const digits = p.int + p.frac;
    if (digits.length <= 15) {
      this.addUnits(p.negative, Number(digits), p.frac.length);
      return;
    }
    this.count++;
    if (p.negative && /[1-9]/.test(digits)) this.negatives++;
    this.rescale(p.frac.length);
    const b = BigInt(digits) * 10n ** BigInt(this.scale - p.frac.length);
    this.big += p.negative ? -b : b;
  }

  /**
   * Fast lane for the common byte shape `-?\d+(\.\d+)?` (decimal mark byte `dec`). Returns false
   * when the bytes have any other shape; the caller then decodes the text and uses parseAmount,
   * which accepts everything this accepts with the same result.
   */
  addBytes(buf: Uint8Array, s: number, e: number, dec: number): boolean {
    let i = s;
    let negative = false;
    if (i < e && buf[i] === 0x2d) {
      negative = true;
      i++;
    }
    let v = 0;
    let digits = 0;
    let f = -1;
    for (; i < e; i++) {
      const c = buf[i]!;
      if (c >= 0x30 && c <= 0x39) {
        v = v * 10 + (c - 0x30);
        digits++;
        if (f >= 0) f++;
      } else if (c === dec && f < 0 && digits > 0) {
        f = 0;
      } else return false;
    }
    if (digits === 0 || digits > 15) return false;
    const decimals = f < 0 ? 0 : f;
    this.addUnits(negative, v, decimals);
    this.lastNegative = negative;
    this.lastUnits = v;
    this.lastDecimals = decimals;
    return true;
  }

  /** Add another total to this one (its amounts count as this one's), exactly. */
  merge(o: AmountTotal): void {
    this.count += o.count;
    this.negatives += o.negatives;
    this.rescale(o.scale);
    this.flush();
    this.big += (o.big + BigInt(o.small)) * 10n ** BigInt(this.scale - o.scale);
  }

  /** The exact total as a decimal string with as many decimals as the most precise amount. */
  toString(): string {
    const total = this.big + BigInt(this.small);
    const neg = total < 0n;
    let digits = (neg ? -total : total).toString();
    if (this.scale === 0) return `${neg ? '-' : ''}${digits}`;
    digits = digits.padStart(this.scale + 1, '0');
    return `${neg ? '-' : ''}${digits.slice(0, -this.scale)}.${digits.slice(-this.scale)}`;
  }
}
