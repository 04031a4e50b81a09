/**
 * `tolrate select --every ...`: the occurrences of a periodic control as the population, without
 * an interview. The counts are calendar arithmetic (2025 starts on a Wednesday and is not a leap
 * year, so it has 261 weekdays).
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { captureContext, fixedClock, planAnswers, tempDir } from '../fixtures/interview.js';

const cwd = mkdtempSync(join(tmpdir(), 'tolrate-select-periods-'));
afterAll(() => rmSync(cwd, { recursive: true, force: true }));

async function cli(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  const ctx = captureContext(cwd, false);
  const code = await runCli(args, ctx);
  return { code, out: ctx.text(), err: ctx.err.join('') };
}

const json = (out: string) => JSON.parse(out) as { ok: boolean; fingerprint: { rowCount: number; firstKey: string; lastKey: string; sha256: string }; items: Array<{ key: string; role: string; values: Record<string, string> }> };

describe('tolrate select --every', () => {
  it('--help names the flags of a periodic control', async () => {
    const r = await cli('select', '--help');
    for (const flag of ['--every UNIT', '--from DATE', '--to DATE', '--except DATES', '--every month --from 2025-01-01']) expect(r.out).toContain(flag);
  });

  it("a monthly control's population is the 12 months of the year; the text shows it and how to draw again", async () => {
    const r = await cli('select', '--every', 'month', '--from', '2025-01-01', '--to', '2025-12-31', '--size', '2', '--spares', '1', '--seed', '7', '--out', 'months.csv');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toContain('Population  periods: each month, 2025-01-01 to 2025-12-31');
    expect(r.out).toContain('Occurrences  12');
    expect(r.out).toContain('First, last  2025-01, 2025-12');
    expect(r.out).toContain('To draw the same items again: tolrate select --every month --from 2025-01-01 --to 2025-12-31 --size 2 --spares 1 --seed 7 --out SHEET.csv');
    const j = json((await cli('select', '--every', 'month', '--from', '2025-01-01', '--to', '2025-12-31', '--size', '12', '--seed', '7', '--out', 'all.csv', '--json')).out);
    expect(j.fingerprint).toMatchObject({ rowCount: 12, firstKey: '2025-01', lastKey: '2025-12' });
    // A sample of all 12 holds each month once.
    expect(j.items.map((i) => i.key).sort()).toEqual(Array.from({ length: 12 }, (_, i) => `2025-${String(i + 1).padStart(2, '0')}`));
    expect(readFileSync(join(cwd, 'all.csv'), 'utf8').split('\r\n')[0]).toMatch(/^\uFEFFSeq,Role,Row,Key,period,from,to,weekday,/);
  });

  it('a daily control leaves out weekends and the days given with --except (a weekend day given changes nothing)', async () => {
    const r = await cli('select', '--every', 'day', '--from', '2025-01-01', '--to', '2025-12-31', '--except', '2025-01-01,2025-12-25', '--except', '2025-12-26,2025-12-27', '--size', '25', '--seed', 'D-1', '--out', 'days.csv', '--json');
    expect(r.code).toBe(0);
    const j = json(r.out);
    // 261 weekdays in 2025, less 1 January (Wednesday), 25 and 26 December (Thursday, Friday); the 27th is a Saturday.
    expect(j.fingerprint.rowCount).toBe(258);
    expect(j.fingerprint.firstKey).toBe('2025-01-02');
    for (const it of j.items) {
      expect(['Saturday', 'Sunday']).not.toContain(it.values.weekday);
      expect(['2025-01-01', '2025-12-25', '2025-12-26']).not.toContain(it.key);
    }
    expect(new Set(j.items.map((i) => i.key)).size).toBe(25);
  });

  it('refuses bad dates, an end before the start, an unknown unit and misplaced flags with exit 2', async () => {
    const base = ['select', '--size', '2', '--out', 'bad.csv'];
    const cases: Array<[string[], RegExp]> = [
      [['--every', 'fortnight', '--from', '2025-01-01', '--to', '2025-12-31'], /--every must be month, quarter, week or day, not "fortnight"/],
      [['--every', 'month', '--from', '2025-02-30', '--to', '2025-12-31'], /Period start: "2025-02-30" is not a date written YYYY-MM-DD/],
      [['--every', 'month', '--from', '2025-01-01', '--to', '31/12/2025'], /Period end: "31\/12\/2025" is not a date/],
      [['--every', 'week', '--from', '2025-12-31', '--to', '2025-01-01'], /The period ends \(2025-01-01\) before it starts \(2025-12-31\)/],
      [['--every', 'day', '--from', '2025-01-01', '--to', '2025-12-31', '--except', '2025-13-01'], /Non-working days: "2025-13-01" is not a date/],
      [['--every', 'month', '--from', '2025-01-01'], /--every needs the period: --from DATE and --to DATE/],
      [['--every', 'month', '--from', '2025-01-01', '--to', '2025-12-31', '--except', '2025-05-01'], /--except applies to --every day/],
      [['--every', 'month', '--from', '2025-01-01', '--to', '2025-12-31', '--key', 'x'], /--key applies to a population file, not to --every/],
      [['--every', 'month', '--from', '2025-01-01', '--to', '2025-12-31', '--ranges', '1-9'], /give one population: --ranges or --every, not both/],
      [['--ranges', '1-9', '--from', '2025-01-01'], /--from applies to --every/],
    ];
    for (const [args, message] of cases) {
      const r = await cli(...base, ...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err, args.join(' ')).toMatch(message);
      expect(r.err).not.toMatch(/\n\s+at /);
    }
  });

  it("the same seed gives the same items as the interview's population of the daily control", async () => {
    const dir = tempDir();
    const answers = {
      ...planAnswers('0'),
      'plan.control.frequency': 'daily',
      'plan.control.description': 'The cash position is reconciled to the bank each working day and the reconciliation reviewed.',
      'plan.population.kind': 'periods',
      'plan.population.frequency': 'daily',
      'plan.population.nonWorkingDays': '2025-12-26, 2025-01-01,2025-12-25',
      'plan.population.samplingUnit': "One working day's reconciliation",
      'plan.population.description': 'The daily cash reconciliations of 2025',
      'plan.population.ledgerCount': '',
      'plan.population.ledgerTotal': '',
      'plan.population.ledgerSource': '',
      'plan.population.tieOutExplanation': 'The working days of the period are the population by construction.',
      'plan.approach.kind': 'non-statistical',
      'plan.selection.spares': '2',
      'plan.selection.seed': 'cash-2025',
    };
    expect(await plan(['daily'], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(join(dir, 'daily.tolrate.json'));
    const sel = wp.selection!;
    const r = await cli('select', '--every', 'day', '--from', '2025-01-01', '--to', '2025-12-31', '--except', '2025-01-01,2025-12-25,2025-12-26', '--size', String(sel.sampleSize), '--spares', String(sel.spares), '--seed', 'cash-2025', '--out', 'same.csv', '--json');
    expect(r.code).toBe(0);
    const j = json(r.out);
    expect(j.fingerprint.sha256).toBe(wp.population!.fingerprint.sha256);
    expect(j.items.map((i) => `${i.role} ${i.key}`)).toEqual(sel.items.map((i) => `${i.role} ${i.key}`));
  });
});
