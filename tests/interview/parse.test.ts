import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { column, count, date, decimal, existingFile, isIsoDate, optionalRate, rate } from '../../src/interview/parse.js';
import { decimalDifference, isZeroDecimal } from '../../src/interview/plan-population.js';
import { tempDir } from '../fixtures/interview.js';

describe('answer parsers', () => {
  it('rates: percentages at the user\'s side, fractions inside', () => {
    expect(rate('TDR')('6')).toBe(0.06);
    expect(rate('TDR')('6%')).toBe(0.06);
    expect(rate('TDR')(' 6.5 % ')).toBe(0.065);
    expect(() => rate('TDR')('0')).toThrow(/out of range/);
    expect(() => rate('TDR')('100')).toThrow(/out of range/);
    expect(rate('EDR', { allowZero: true })('0')).toBe(0);
    expect(() => rate('EDR', { allowZero: true, below: 0.06, belowWhat: 'the tolerable rate' })('6')).toThrow('EDR: 6% must be below the tolerable rate (6%).');
    expect(() => rate('Confidence', { atLeast: 0.5 })('40')).toThrow(/at least/);
    expect(optionalRate('A1')('')).toBeUndefined();
  });

  it('dates: YYYY-MM-DD, real calendar dates, not before a given date', () => {
    expect(date('End')('2024-02-29')).toBe('2024-02-29');
    expect(() => date('End')('2025-02-29')).toThrow(/not a real calendar date/);
    expect(() => date('End')('31/12/2025')).toThrow(/YYYY-MM-DD/);
    expect(() => date('End', { notBefore: '2025-01-01', notBeforeWhat: 'the period start' })('2024-12-31')).toThrow(
      'End: 2024-12-31 is before the period start (2025-01-01).',
    );
    expect(isIsoDate('2025-04-31')).toBe(false);
  });

  it('counts and amounts', () => {
    expect(count('n')('3,412')).toBe(3412);
    expect(() => count('k', { max: 78, maxWhat: 'the items tested' })('79')).toThrow('k: 79 is more than the items tested (78).');
    expect(() => count('n')('2.5')).toThrow(/not a whole number/);
    expect(decimal('Total')('23,178,100.48')).toBe('23178100.48');
    expect(() => decimal('Total')('12,34')).toThrow(/not an amount/);
  });

  it('files exist; columns exist (with a suggestion)', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'a.csv'), 'x\n');
    expect(existingFile('Population', dir, ['.csv'])('a.csv')).toBe(join(dir, 'a.csv'));
    expect(() => existingFile('Population', dir)('b.csv')).toThrow(/there is no file at/);
    expect(() => existingFile('Population', dir)('.')).toThrow(/is a folder/);
    expect(() => existingFile('Population', dir, ['.xlsx'])('a.csv')).toThrow(/not a .xlsx file/);
    expect(column('Key', ['invoice_no', 'amount'])('Invoice_No')).toBe('invoice_no');
    expect(() => column('Key', ['invoice_no', 'amount'])('invoice')).toThrow(/Did you mean "invoice_no"/);
  });

  it('exact decimal differences for the tie-out', () => {
    expect(decimalDifference('23178100.48', '23178100.48')).toBe('0.00');
    expect(decimalDifference('82278118.73', '82319368.73')).toBe('-41250.00');
    expect(decimalDifference('0.1', '0.25')).toBe('-0.15');
    expect(decimalDifference('10', '-2.5')).toBe('12.5');
    expect(isZeroDecimal('-0.00')).toBe(true);
    expect(isZeroDecimal('0.01')).toBe(false);
  });
});
