import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { AmountTotal, amountText, groupDigits, parseAmount } from '../../src/population/amount.js';

const text = (s: string, decimalComma = false) => {
  const p = parseAmount(s, { decimalComma });
  return p ? amountText(p) : undefined;
};

describe('parseAmount', () => {
  // The accepted forms are the ones the issue lists (common practice for ledger exports).
  it.each([
    ['1234.56', '1234.56'],
    ['1,234.56', '1234.56'],
    ['-12.00', '-12.00'],
    ['(12.00)', '-12.00'],
    ['$1,234.56', '1234.56'],
    ['-$12', '-12'],
    ['$-12', '-12'],
    ['($1,000)', '-1000'],
    ['EUR 12.00', '12.00'],
    ['12.00 €', '12.00'],
    ['£0.5', '0.5'],
    ['US$ 5', '5'],
    ['  +7  ', '7'],
    ['.5', '0.5'],
    ['12.', '12'],
    ['007', '7'],
    ['1,234,567.891', '1234567.891'],
    ['-0.00', '0.00'],
    ['\u221212.50', '-12.50'],
  ])('%s -> %s', (input, expected) => {
    expect(text(input)).toBe(expected);
  });

  it.each(['', '   ', 'abc', '1e5', '1,23.4', '12,34', '--12', '(-12)', '1.2.3', 'USD', '12 34', '(12', '$'])('refuses %j', (input) => {
    expect(parseAmount(input)).toBeUndefined();
  });

  it('reads decimal-comma amounts only when asked', () => {
    expect(text('1.234,56', true)).toBe('1234.56');
    expect(text('1 234,56', true)).toBe('1234.56');
    expect(text('(12,00)', true)).toBe('-12.00');
    expect(text('-12,5 €', true)).toBe('-12.5');
    expect(text('1.234,56')).toBeUndefined();
    expect(text('1,234.56', true)).toBeUndefined();
  });
});

describe('AmountTotal (exact)', () => {
  it('adds decimals exactly where float addition drifts', () => {
    // 0.1 + 0.2 is the classic case where binary floating point gives 0.30000000000000004.
    const t = new AmountTotal();
    t.add(parseAmount('0.1')!);
    t.add(parseAmount('0.2')!);
    expect(t.toString()).toBe('0.3');
    expect(0.1 + 0.2).not.toBe(0.3);
  });

  it('keeps the most precise scale seen and handles signs', () => {
    const t = new AmountTotal();
    for (const s of ['10', '-2.5', '(0.125)', '1,000.00']) t.add(parseAmount(s)!);
    expect(t.toString()).toBe('1007.375');
    expect(t.count).toBe(4);
    expect(t.negatives).toBe(2);
  });

  it('a million amounts of 0.01 total 10000.00 exactly', () => {
    const t = new AmountTotal();
    const b = Buffer.from('0.01');
    for (let i = 0; i < 1_000_000; i++) t.addBytes(b, 0, b.length, 0x2e);
    expect(t.toString()).toBe('10000.00');
  });

  it('goes past 2^53 without losing a cent', () => {
    const t = new AmountTotal();
    for (let i = 0; i < 5; i++) t.add(parseAmount('9,007,199,254,740,993.01')!);
    // Reference: BigInt arithmetic on the same digits.
    expect(t.toString()).toBe(((9007199254740993_01n * 5n) / 100n).toString() + '.05');
  });

  it('equals a BigInt sum of the same amounts (property), by either lane', () => {
    const amount = fc
      .tuple(fc.boolean(), fc.bigInt({ min: 0n, max: 10n ** 17n }), fc.integer({ min: 0, max: 6 }))
      .map(([neg, units, scale]) => ({ neg, units, scale }));
    fc.assert(
      fc.property(fc.array(amount, { maxLength: 40 }), (list) => {
        const viaText = new AmountTotal();
        const viaBytes = new AmountTotal();
        let ref = 0n; // at scale 6
        for (const { neg, units, scale } of list) {
          const digits = units.toString().padStart(scale + 1, '0');
          const s = `${neg ? '-' : ''}${scale ? `${digits.slice(0, -scale)}.${digits.slice(-scale)}` : digits}`;
          viaText.add(parseAmount(s)!);
          const b = Buffer.from(s);
          if (!viaBytes.addBytes(b, 0, b.length, 0x2e)) viaBytes.add(parseAmount(s)!);
          ref += (neg ? -units : units) * 10n ** BigInt(6 - scale);
        }
        const got = viaText.toString();
        expect(viaBytes.toString()).toBe(got);
        const [ip, fp = ''] = got.replace('-', '').split('.');
        const asScale6 = BigInt(ip! + fp.padEnd(6, '0')) * (got.startsWith('-') ? -1n : 1n);
        expect(asScale6).toBe(ref);
      }),
    );
  });

  it('the byte lane refuses what it cannot read exactly, leaving it to parseAmount', () => {
    const t = new AmountTotal();
    for (const s of ['1,234.50', '(5)', '$3', ' 4', '.5', '1234567890123456', '']) {
      const b = Buffer.from(s);
      expect(t.addBytes(b, 0, b.length, 0x2e)).toBe(false);
    }
    expect(t.count).toBe(0);
  });

  it('groups digits for display', () => {
    expect(groupDigits('-1234567.891')).toBe('-1,234,567.891');
    expect(groupDigits('999')).toBe('999');
  });
});
