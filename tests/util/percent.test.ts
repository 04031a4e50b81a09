/**
 * Typed percentages (src/util/percent.ts): the reading of each form is the convention of
 * README, "Calculators" and DEVELOPERS.md, "Conventions" (the user's side speaks percentages).
 */
import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import { isBareFraction, parsePercent } from '../../src/util/percent.js';

describe('parsePercent', () => {
  it('reads 6, 6%, 6 %, 6.5 and the decimal comma 6,5 as percentages', () => {
    expect(parsePercent('6', 'f')).toBe(0.06);
    expect(parsePercent('6%', 'f')).toBe(0.06);
    expect(parsePercent(' 6 % ', 'f')).toBe(0.06);
    expect(parsePercent('6.5', 'f')).toBe(0.065);
    expect(parsePercent('6,5', 'f')).toBe(0.065);
    expect(parsePercent('0,5', 'f')).toBe(0.005);
    expect(parsePercent(',5', 'f')).toBe(0.005);
    expect(parsePercent('0,125%', 'f')).toBe(0.00125); // "0," cannot start a thousands group
    expect(parsePercent('1,0000', 'f')).toBe(0.01); // four digits after the comma: not a group of three
  });

  it('refuses a thousands separator instead of guessing (1,000 is not silently 1%)', () => {
    for (const t of ['1,000', '12,345', '1,000%', '1.000,5', '1,000,000', '1,5,0']) {
      expect(() => parsePercent(t, '--tolerable'), t).toThrow(TolrateInputError);
      expect(() => parsePercent(t, '--tolerable'), t).toThrow(/thousands separator/);
    }
  });

  it('with refuseBareFraction, a number between 0 and 1 without % is refused with both readings', () => {
    const o = { refuseBareFraction: true, allowZero: true };
    expect(() => parsePercent('0.05', '--tolerable', o)).toThrow('--tolerable: 0.05 is read as 0.05%; write 5 for 5%, or 0.05% if you mean 0.05%.');
    expect(() => parsePercent('0,5', '--expected', o)).toThrow('--expected: 0,5 is read as 0,5%; write 50 for 50%, or 0,5% if you mean 0,5%.');
    expect(parsePercent('0.05%', '--tolerable', o)).toBe(0.0005);
    expect(parsePercent('0', '--expected', o)).toBe(0);
    expect(parsePercent('1', '--expected', o)).toBe(0.01);
    // without the option the same text is simply 0.05%
    expect(parsePercent('0.05', 'f')).toBe(0.0005);
  });

  it('isBareFraction: only 0 < x < 1 without a % sign', () => {
    expect(['0.05', '0,5', '.5', '0.999'].map(isBareFraction)).toEqual([true, true, true, true]);
    expect(['0', '1', '0.5%', '6', 'abc', ''].map(isBareFraction)).toEqual([false, false, false, false, false, false]);
  });
});
