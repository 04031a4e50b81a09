import { describe, expect, it } from 'vitest';
import { pct, pctLimit, pctPlain, pctUp } from '../../src/util/format.js';

describe('figures as shown', () => {
  it('sample rates to nearest, limits and risks rounded up, planning rates as typed', () => {
    expect(pct(2 / 78)).toBe('2.6%');
    expect(pctUp(0.078521)).toBe('7.9%');
    expect(pctUp(0.05)).toBe('5.0%');
    expect(pctUp(0.146006)).toBe('14.7%');
    expect(pctPlain(0.06)).toBe('6%');
    expect(pctPlain(0.0025)).toBe('0.25%');
  });

  it('a limit just below the tolerable rate never reads as equal to it', () => {
    // 89 of 1,500 = 5.9333%: "6.0%" against a 6% tolerable rate would contradict "supported".
    expect(pctLimit(89 / 1500, 0.06)).toBe('5.94%');
    expect(pctLimit(0.0599989, 0.06)).toBe('5.9999%');
    expect(pctLimit(0.0785, 0.06)).toBe('7.9%');
    expect(pctLimit(0.052, 0.06)).toBe('5.2%');
    expect(pctLimit(0.06, 0.06)).toBe('6.0%');
    expect(pctLimit(0.0593)).toBe('6.0%');
  });
});
