/**
 * The population by month of its date column, counted at scan time: CSV (with dates whose
 * day/month order is known only from the last row), XLSX, periods, ranges. Every expected count
 * and total is worked out by hand from the invented rows beside it; calendar facts (2025 starts on
 * a Wednesday) are common knowledge.
 */
import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { monthTallyDifferences, scanPopulation } from '../../src/population/index.js';
import { tempDir } from './helpers.js';

const { file } = tempDir('tolrate-months-');

describe('the rows by month', () => {
  it('waits for the day/month order: 03/04/2026 is counted in April when a later row shows day/month', async () => {
    const rows = [
      'ref,posted,amount',
      'J1,03/04/2026,100.00', // 3 April once the order is known
      'J2,04/03/2026,20.50', // 4 March
      'J3,2026-04-30,1.5', // an ISO date: April whatever the order
      'J4,,7', // blank: undated
      'J5,soon,8', // not a date: undated
      'J6,05/04/2026,(10.00)', // 5 April, a negative amount
      'J7,04/03/2026,n/a', // 4 March, an amount that cannot be read (counted, not added)
      'J8,25/12/2026,3', // only now is the order clear: day/month
    ];
    const s = await scanPopulation({ kind: 'csv', path: file('dmy.csv', rows.join('\n') + '\n'), keyColumn: 'ref', amountColumn: 'amount', dateColumn: 'posted' });
    expect(s.fingerprint.monthTally).toEqual({
      dateColumn: 'posted',
      dateOrder: 'dmy',
      months: [
        { month: '2026-03', count: 2, amountTotal: '20.50' },
        { month: '2026-04', count: 3, amountTotal: '91.50' }, // 100.00 + 1.5 − 10.00
        { month: '2026-12', count: 1, amountTotal: '3' },
      ],
      undated: 2,
      undatedAmountTotal: '15', // J4 and J5: 7 + 8
    });
    // The months and the undated rows add up to the population's total: 20.50 + 91.50 + 3 + 15.
    expect(s.fingerprint.amountTotal).toBe('130.00');
    // Every row is in one place: months plus undated.
    const t = s.fingerprint.monthTally!;
    expect(t.months.reduce((a, m) => a + m.count, 0) + t.undated).toBe(s.fingerprint.rowCount);
    expect(t.undated).toBe(s.validation.badDates.count);
  });

  it('the same rows with a last row that shows month/day count 03/04/2026 in March', async () => {
    const rows = ['ref,posted', 'J1,03/04/2026', 'J2,04/03/2026', 'J3,12/25/2026', 'J4,13/01/2026'];
    const s = await scanPopulation({ kind: 'csv', path: file('mdy.csv', rows.join('\n') + '\n'), keyColumn: 'ref', dateColumn: 'posted' });
    // 12/25 says month/day; 13/01 is then not a date (month 13) and counts as undated, as the validation counts it.
    expect(s.fingerprint.monthTally).toEqual({
      dateColumn: 'posted',
      dateOrder: 'mdy',
      months: [{ month: '2026-03', count: 1 }, { month: '2026-04', count: 1 }, { month: '2026-12', count: 1 }],
      undated: 1,
    });
    expect(s.validation.badDates.count).toBe(1);
  });

  it('an order given by the user is used for the tally too', async () => {
    const rows = ['ref,posted', 'J1,03/04/2026', 'J2,04/03/2026'];
    const s = await scanPopulation({ kind: 'csv', path: file('given.csv', rows.join('\n') + '\n'), keyColumn: 'ref', dateColumn: 'posted', dateOrder: 'dmy' });
    expect(s.fingerprint.monthTally!.months).toEqual([{ month: '2026-03', count: 1 }, { month: '2026-04', count: 1 }]);
  });

  it('a file without a date column and number ranges have every row undated and no column', async () => {
    const s = await scanPopulation({ kind: 'csv', path: file('nodate.csv', 'ref,amount\nA,1\nB,2\n'), keyColumn: 'ref', amountColumn: 'amount' });
    expect(s.fingerprint.monthTally).toEqual({ months: [], undated: 2 });
    const r = await scanPopulation({ kind: 'ranges', ranges: '100-199', exclusions: ['150'] });
    expect(r.fingerprint.monthTally).toEqual({ months: [], undated: 99 });
  });

  it('an XLSX population: date cells and date texts alike', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Journals');
    ws.addRow(['Ref', 'Posted', 'Amount']);
    ws.addRow(['J1', new Date(Date.UTC(2025, 0, 31)), 10.25]);
    ws.addRow(['J2', new Date(Date.UTC(2025, 1, 1)), 5]);
    ws.addRow(['J3', '2025-01-15', 4.75]);
    ws.addRow(['J4', '15/02/2025', 1]); // a text date; day/month from its first number
    ws.addRow(['J5', 'unknown', 2]);
    for (const r of [2, 3]) ws.getCell(`B${r}`).numFmt = 'yyyy-mm-dd';
    const path = file('journals.xlsx', Buffer.alloc(0));
    await wb.xlsx.writeFile(path);
    const s = await scanPopulation({ kind: 'xlsx', path, keyColumn: 'Ref', amountColumn: 'Amount', dateColumn: 'Posted' });
    expect(s.fingerprint.monthTally).toEqual({
      dateColumn: 'Posted',
      dateOrder: 'dmy',
      months: [
        { month: '2025-01', count: 2, amountTotal: '15.00' }, // 10.25 + 4.75, with the decimals of the most precise amount
        { month: '2025-02', count: 2, amountTotal: '6' }, // 5 + 1
      ],
      undated: 1,
      undatedAmountTotal: '2',
    });
  });

  it('a periodic population: each occurrence under the month of its first day', async () => {
    const q = await scanPopulation({ kind: 'periods', frequency: 'quarterly', start: '2025-01-01', end: '2025-12-31' });
    expect(q.fingerprint.monthTally).toEqual({
      dateColumn: 'from',
      months: ['2025-01', '2025-04', '2025-07', '2025-10'].map((month) => ({ month, count: 1 })),
      undated: 0,
    });
    const d = await scanPopulation({ kind: 'periods', frequency: 'daily', start: '2025-01-01', end: '2025-02-28', nonWorkingDays: ['2025-01-01'] });
    // January 2025: 23 weekdays, less New Year's Day; February 2025: 20 weekdays.
    expect(d.fingerprint.monthTally!.months).toEqual([{ month: '2025-01', count: 22 }, { month: '2025-02', count: 20 }]);
    const w = await scanPopulation({ kind: 'periods', frequency: 'weekly', start: '2025-01-01', end: '2025-03-31' });
    // Weeks (Monday to Sunday) cut to the period: the first starts on Wed 1 January; Mondays 6, 13, 20, 27 January, then 4 in February, 5 in March (3 ... 31).
    expect(w.fingerprint.monthTally!.months).toEqual([{ month: '2025-01', count: 5 }, { month: '2025-02', count: 4 }, { month: '2025-03', count: 5 }]);
  });

  it('names each month that differs when a tally is compared with one read again', () => {
    const rec = { dateColumn: 'd', months: [{ month: '2026-01', count: 3, amountTotal: '10' }, { month: '2026-02', count: 1 }], undated: 0 };
    const got = { dateColumn: 'd', months: [{ month: '2026-01', count: 3, amountTotal: '12' }, { month: '2026-03', count: 1 }], undated: 1 };
    expect(monthTallyDifferences(rec, got)).toEqual([
      'month 2026-01: recorded amount 10, the population has 12',
      'month 2026-02: recorded 1 rows, the population has none',
      'month 2026-03: recorded no rows, the population has 1',
      'rows with no readable date: recorded 0, the population has 1',
    ]);
    expect(monthTallyDifferences(rec, rec)).toEqual([]);
  });
});
