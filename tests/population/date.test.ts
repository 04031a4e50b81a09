import { describe, expect, it } from 'vitest';
import { DateTracker, parseDate, validYmd, ymdText } from '../../src/population/date.js';

const exact = (s: string) => {
  const p = parseDate(s);
  return p?.kind === 'exact' ? ymdText(p.ymd) : p;
};

describe('parseDate', () => {
  it.each([
    ['2024-03-15', '2024-03-15'],
    ['2024/3/5', '2024-03-05'],
    ['2024.03.15', '2024-03-15'],
    ['2024-03-15T10:20:30Z', '2024-03-15'],
    ['2024-03-15 23:59', '2024-03-15'],
    ['2024-03-15T10:20:30.123+02:00', '2024-03-15'],
    ['20240315', '2024-03-15'],
    ['15-Mar-2024', '2024-03-15'],
    ['15 March 2024', '2024-03-15'],
    ['Mar 15, 2024', '2024-03-15'],
    ['1st Feb 24', '2024-02-01'],
  ])('%s', (s, iso) => {
    expect(exact(s)).toBe(iso);
  });

  it('leaves day/month order open for numeric dates', () => {
    expect(parseDate('03/04/2024')).toEqual({ kind: 'numeric', first: 3, second: 4, year: 2024 });
    expect(parseDate('3.4.24')).toEqual({ kind: 'numeric', first: 3, second: 4, year: 2024 });
  });

  // Calendar rules: Gregorian leap years (divisible by 4, except centuries not divisible by 400).
  it('knows the calendar', () => {
    expect(validYmd(2024, 2, 29)).toBe(true);
    expect(validYmd(2023, 2, 29)).toBe(false);
    expect(validYmd(1900, 2, 29)).toBe(false);
    expect(validYmd(2000, 2, 29)).toBe(true);
    expect(validYmd(2024, 4, 31)).toBe(false);
  });

  it.each(['', 'n/a', '2024-02-30', '2024-13-01', '2024-03-15T25:00', '31-Foo-2024', '2024-3', '12345'])('refuses %j', (s) => {
    expect(parseDate(s)).toBeUndefined();
  });
});

describe('DateTracker', () => {
  it('finds day/month order from a day above 12', () => {
    const t = new DateTracker();
    ['03/04/2024', '25/04/2024', '01/12/2024'].forEach((d, i) => t.add(d, i + 2));
    const s = t.summary();
    expect(s.order).toBe('dmy');
    expect(s.orderAssumed).toBe(false);
    expect(s.bad.count).toBe(0);
    expect([s.earliest, s.latest]).toEqual(['2024-04-03', '2024-12-01']);
  });

  it('finds month/day order from a second number above 12', () => {
    const t = new DateTracker();
    ['03/04/2024', '04/25/2024'].forEach((d, i) => t.add(d, i + 2));
    const s = t.summary();
    expect(s.order).toBe('mdy');
    expect([s.earliest, s.latest]).toEqual(['2024-03-04', '2024-04-25']);
  });

  it('says when the order had to be assumed, and honours a given order', () => {
    const t = new DateTracker();
    t.add('03/04/2024', 2);
    expect(t.summary()).toMatchObject({ order: 'mdy', orderAssumed: true, earliest: '2024-03-04' });
    const g = new DateTracker('dmy');
    g.add('03/04/2024', 2);
    g.add('04/25/2024', 3);
    const s = g.summary();
    expect(s).toMatchObject({ order: 'dmy', orderAssumed: false, earliest: '2024-04-03' });
    expect(s.bad.count).toBe(1);
    expect(s.bad.examples[0]).toMatchObject({ row: 3, value: '04/25/2024' });
  });

  it('counts unreadable and blank dates with their rows, and the ISO fast lane agrees', () => {
    const t = new DateTracker();
    t.add('2024-01-31', 2);
    t.add('', 3);
    t.add('yesterday', 4);
    const b = Buffer.from('2024-02-29');
    expect(t.addIsoBytes(b, 0, b.length)).toBe(20240229);
    const bad = Buffer.from('2023-02-29');
    expect(t.addIsoBytes(bad, 0, bad.length)).toBe(0);
    const s = t.summary();
    expect(s.bad.count).toBe(2);
    expect(s.bad.examples.map((e) => [e.row, e.reason])).toEqual([
      [3, 'blank date'],
      [4, 'not a date'],
    ]);
    expect([s.earliest, s.latest]).toEqual(['2024-01-31', '2024-02-29']);
  });
});
