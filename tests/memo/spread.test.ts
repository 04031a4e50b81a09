/**
 * The memo's section on how the sample spreads over the period, rendered from workpapers planned
 * through the real interview. The expected figures are counted in the test itself, straight from
 * the invented population file and the selected keys (a second reading, by plain string slicing),
 * never taken from the code under test.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { renderMemo } from '../../src/memo/index.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext, fixedClock, planAnswers, tempDir } from '../fixtures/interview.js';
import { findTable, readDocx } from './docx-text.js';

const HEADERS = ['Month', 'Population items', 'Share of population', 'Population amount', 'Sample items', 'Share of sample', 'Sample amount'];

/**
 * An invented list of 90 payment vouchers dated day/month/year. Every day is 12 or less until the
 * last row (25/11/2025), so the order is known only at the end of the file. March has a single
 * voucher, and August none at all.
 */
function dmyPopulation(dir: string): { rows: Array<{ key: string; month: string; cents: number }>; total: string } {
  const lines = ['voucher,paid_on,payee,amount'];
  const rows: Array<{ key: string; month: string; cents: number }> = [];
  const months = [1, 2, 4, 5, 6, 7, 9, 10, 11, 12];
  let n = 0;
  const add = (day: number, month: number) => {
    const key = `PV-${2001 + n}`;
    const cents = 5_000 + ((n * 7919) % 90_000);
    n++;
    rows.push({ key, month: `2025-${String(month).padStart(2, '0')}`, cents });
    lines.push(`${key},${String(day).padStart(2, '0')}/${String(month).padStart(2, '0')}/2025,Payee ${n % 7},${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, '0')}`);
  };
  add(3, 3);
  for (let i = 0; i < 88; i++) add(1 + (i % 12), months[i % months.length]!);
  add(25, 11);
  writeFileSync(join(dir, 'vouchers.csv'), `${lines.join('\n')}\n`);
  const sum = rows.reduce((a, r) => a + r.cents, 0);
  return { rows, total: `${Math.floor(sum / 100)}.${String(sum % 100).padStart(2, '0')}` };
}

const money = (cents: number) => `${Math.floor(cents / 100).toLocaleString('en-US')}.${String(cents % 100).padStart(2, '0')}`;
const share = (n: number, of: number) => `${((100 * n) / of).toFixed(1)}%`;

async function planned(dir: string, total: string, rows: number, more: Record<string, unknown> = {}): Promise<Workpaper> {
  const answers = { ...planAnswers(total, rows), 'plan.approach.model': 'binomial', ...more };
  expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now: fixedClock() })).toBe(0);
  return loadWorkpaper(join(dir, 't1.tolrate.json'));
}

describe('the memo: spread of the sample over the period', () => {
  it('shows each month of the period, the population and the sample, read day/month as the whole file shows', async () => {
    const dir = tempDir();
    const pop = dmyPopulation(dir);
    // A small sample (95%, 10% tolerable, none expected) leaves some month out with this seed.
    const wp = await planned(dir, pop.total, pop.rows.length, { 'plan.approach.tolerableRate': '10', 'plan.approach.expectedRate': '0' });
    expect(wp.population!.fingerprint.monthTally!.dateOrder).toBe('dmy');
    const doc = await readDocx(await renderMemo(wp, { workpaperPath: join(dir, 't1.tolrate.json') }));
    expect(doc.text).toContain('6. Spread of the sample over the period');
    expect(doc.text).toContain('7. Results by attribute');
    const table = findTable(doc.xml, HEADERS);
    const byKey = new Map(pop.rows.map((r) => [r.key, r]));
    const sample = wp.selection!.items.filter((i) => i.role === 'sample').map((i) => byKey.get(i.key)!);
    const n = sample.length;
    const N = pop.rows.length;
    const expected: string[][] = [];
    const unselected: string[] = [];
    for (let m = 1; m <= 12; m++) {
      const month = `2025-${String(m).padStart(2, '0')}`;
      const p = pop.rows.filter((r) => r.month === month);
      const s = sample.filter((r) => r.month === month);
      if (p.length > 0 && s.length === 0) unselected.push(month);
      const pc = p.reduce((a, r) => a + r.cents, 0);
      const sc = s.reduce((a, r) => a + r.cents, 0);
      expected.push([month, String(p.length), share(p.length, N), p.length ? money(pc) : '0', String(s.length), share(s.length, n), s.length ? money(sc) : '']);
    }
    expected.push(['Total', String(N), '100.0%', money(pop.rows.reduce((a, r) => a + r.cents, 0)), String(n), '100.0%', money(sample.reduce((a, r) => a + r.cents, 0))]);
    expect(table.slice(1)).toEqual(expected);
    // March holds one voucher; August none (said in neutral words, beside the table).
    expect(doc.text).toContain('The population holds no item in these months of the period: 2025-08.');
    expect(unselected.length).toBeGreaterThan(0);
    expect(doc.text).toContain(`No item was selected from these months, in which the population holds items: ${unselected.join(', ')}. Whether that matters for the test is for the practitioner to judge.`);
    expect(doc.text).not.toContain('Every month of the period in which the population holds items has at least one item selected.');
    // The picture is there, with the figures in its text alternative.
    expect(doc.xml).toMatch(/descr="2025-01: Population items \d+, Sample items \d+; 2025-02/);
  });

  it('counts items outside the period and without a readable date on their own rows', async () => {
    const dir = tempDir();
    const lines = ['voucher,paid_on,amount', 'V1,2025-01-10,1.00', 'V2,2024-12-31,2.00', 'V3,,3.00', 'V4,2025-02-01,4.00', 'V5,2026-01-02,5.00'];
    writeFileSync(join(dir, 'vouchers.csv'), `${lines.join('\n')}\n`);
    const wp = await planned(dir, '15.00', 5, {
      'plan.approach.kind': 'non-statistical',
      'plan.population.goOn': true,
      'plan.selection.spares': '0',
      'plan.population.acceptedReason': 'One voucher has no date; it is followed up separately.',
    });
    const doc = await readDocx(await renderMemo(wp));
    const table = findTable(doc.xml, HEADERS);
    const rows = Object.fromEntries(table.slice(1).map((r) => [r[0], r]));
    expect(rows['2025-01']!.slice(0, 4)).toEqual(['2025-01', '1', '20.0%', '1.00']);
    expect(rows['2025-02']!.slice(0, 4)).toEqual(['2025-02', '1', '20.0%', '4.00']);
    expect(rows['2025-03']!.slice(0, 2)).toEqual(['2025-03', '0']);
    // V2 (2024) and V5 (2026) are outside 2025; V3 has no date.
    expect(rows['Outside the period']!.slice(0, 4)).toEqual(['Outside the period', '2', '40.0%', '7.00']);
    expect(rows['No readable date']!.slice(0, 4)).toEqual(['No readable date', '1', '20.0%', '3.00']);
    expect(doc.text).toContain('Population items dated outside the period (2) and with no readable date (1) are counted on their own rows.');
  });

  it('a periodic control: its months; number ranges: the reason there is no table', async () => {
    const dir = tempDir();
    const wp = await planned(dir, '0', 12, {
      'plan.control.frequency': 'monthly',
      'plan.population.kind': 'periods',
      'plan.population.frequency': 'monthly',
      'plan.population.ledgerCount': '',
      'plan.population.ledgerTotal': '',
      'plan.population.ledgerSource': '',
      'plan.population.tieOutExplanation': 'The months of the period are the population by construction.',
      'plan.approach.kind': 'non-statistical',
      'plan.selection.spares': '0',
    });
    const doc = await readDocx(await renderMemo(wp));
    const table = findTable(doc.xml, ['Month', 'Population items', 'Share of population', 'Sample items', 'Share of sample']);
    expect(table[0]).not.toContain('Population amount');
    const picked = new Set(wp.selection!.items.map((i) => i.key));
    for (let m = 1; m <= 12; m++) {
      const month = `2025-${String(m).padStart(2, '0')}`;
      const row = table.find((r) => r[0] === month)!;
      // Each month is one occurrence: 1 of 12; the sample holds it once or not at all.
      expect(row.slice(0, 3)).toEqual([month, '1', '8.3%']);
      expect(row[3]).toBe(picked.has(month) ? '1' : '0');
    }

    const dir2 = tempDir();
    const ranges = await planned(dir2, '0', 500, {
      'plan.population.kind': 'ranges',
      'plan.population.ranges': '70001-70500',
      'plan.population.exclusions': '',
      'plan.population.ledgerTotal': '',
      'plan.approach.kind': 'non-statistical',
    });
    const rdoc = await readDocx(await renderMemo(ranges));
    expect(rdoc.text).toContain('6. Spread of the sample over the period');
    expect(rdoc.text).toContain('The population is a list of document numbers, which carry no dates, so the memo cannot show how the sample spreads over the period.');
  });

  it('a workpaper written before the tally was recorded: the memo leaves the section out and keeps its numbers; re-performance is clean', async () => {
    const dir = tempDir();
    const pop = dmyPopulation(dir);
    await planned(dir, pop.total, pop.rows.length);
    const file = join(dir, 't1.tolrate.json');
    const old = loadWorkpaper(file);
    delete (old.population!.fingerprint as { monthTally?: unknown }).monthTally;
    const doc = await readDocx(await renderMemo(old));
    expect(doc.text).not.toContain('Spread of the sample');
    expect(doc.text).toContain('6. Results by attribute');
    // Re-performance of a file with no tally compares none; with one, it names the month that differs.
    const raw = JSON.parse(readFileSync(file, 'utf8'));
    const rep = async () => {
      const c = captureContext(dir, false);
      const code = await runCli(['reperform', 't1.tolrate.json'], c);
      return { code, out: c.text().replace(/\s+/g, ' ') };
    };
    expect((await rep()).out).toMatch(/population agrees .*, 11 months by paid_on — as recorded/);
    raw.population.fingerprint.monthTally.months[0].count += 1;
    writeFileSync(file, JSON.stringify(raw, null, 2));
    const changed = await rep();
    expect(changed.code).toBe(1);
    const first = raw.population.fingerprint.monthTally.months[0];
    expect(changed.out).toContain(`month ${first.month}: recorded ${first.count} rows, the population has ${first.count - 1}`);
    delete raw.population.fingerprint.monthTally;
    writeFileSync(file, JSON.stringify(raw, null, 2));
    const none = await rep();
    expect(none.out).not.toMatch(/month 20\d\d-\d\d:/);
    expect(none.out).toMatch(/population agrees/);
  });
});
