/**
 * The part view of a test done in parts (src/control-test/parts.ts): what a view holds, that a
 * changed view goes back to its part only, and the non-statistical roll-forward size.
 */
import { describe, expect, it } from 'vitest';
import { monthsTouched, partPeriod, partView, proRataSize, withPartView } from '../../src/control-test/index.js';
import type { Workpaper } from '../../src/workpaper/schema.js';

const wp = {
  engagement: { entity: 'E', periodStart: '2025-01-01', periodEnd: '2025-12-31', reference: 'R', preparer: 'P', reviewer: 'Q' },
  approach: { kind: 'non-statistical', sampleSize: 25, rationale: 'interim' },
  population: { description: 'interim' },
  selection: { seed: 'i' },
  results: { items: ['interim'] },
  evaluation: { attributes: [] },
  rollForward: { interimDate: '2025-09-30', periodStart: '2025-10-01', periodEnd: '2025-12-31', population: { description: 'rf' }, selection: { seed: 'r' }, sampleSize: 7, rationale: 'rf' },
} as unknown as Workpaper;

describe('partView and withPartView', () => {
  it('the roll-forward view holds the roll-forward members, its size and dates, and no rollForward', () => {
    const v = partView(wp, 'roll-forward');
    expect(v.population).toEqual({ description: 'rf' });
    expect(v.selection).toEqual({ seed: 'r' });
    expect(v.results).toBeUndefined();
    expect(v.approach).toMatchObject({ sampleSize: 7, rationale: 'rf', kind: 'non-statistical' });
    expect(v.engagement).toMatchObject({ periodStart: '2025-10-01', periodEnd: '2025-12-31' });
    expect(v.rollForward).toBeUndefined();
    expect(partView(wp, 'interim').engagement).toMatchObject({ periodStart: '2025-01-01', periodEnd: '2025-09-30' });
    expect(partPeriod(wp, 'interim')).toEqual({ start: '2025-01-01', end: '2025-09-30' });
  });

  it('a changed view goes back to its part; the engagement and approach stay the test\'s; other members follow the view', () => {
    const v = partView(wp, 'roll-forward');
    const { evaluation: _e, ...cleared } = { ...v, results: { items: ['rf'] } } as unknown as Workpaper & { evaluation?: unknown };
    const back = withPartView(wp, 'roll-forward', cleared as Workpaper);
    expect(back.rollForward!.results).toEqual({ items: ['rf'] });
    expect(back.results).toEqual({ items: ['interim'] });
    expect(back.population).toEqual({ description: 'interim' });
    expect(back.engagement).toEqual(wp.engagement);
    expect(back.approach).toEqual(wp.approach);
    expect(back.evaluation).toBeUndefined();
    expect(withPartView(wp, 'interim', partView(wp, 'interim'))).toEqual(wp);
    expect(withPartView(wp, 'roll-forward', partView(wp, 'roll-forward'))).toEqual(wp);
  });
});

describe('the non-statistical roll-forward size: the policy size pro rata to the months remaining, rounded up (common practice, no single source)', () => {
  it('counts the months a range touches and rounds up in whole numbers', () => {
    expect(monthsTouched('2025-10-01', '2025-12-31')).toBe(3);
    expect(monthsTouched('2025-07-01', '2026-06-30')).toBe(12);
    expect(monthsTouched('2025-09-16', '2025-12-31')).toBe(4);
    expect(proRataSize(40, 12, 3, 1000)).toBe(10);
    expect(proRataSize(25, 12, 3, 1000)).toBe(7); // 6.25 rounded up
    expect(proRataSize(2, 12, 3, 1000)).toBe(1); // 0.5 rounded up
    expect(proRataSize(60, 12, 5, 1000)).toBe(25);
    expect(proRataSize(40, 12, 3, 6)).toBe(6); // never more than the population
  });
});
