/**
 * The population of a periodic control, made from the period and the control's frequency: its
 * units, its fingerprint, and a monthly control's test planned, selected and re-performed on it.
 * The counts are calendar arithmetic (2025 starts on a Wednesday and is not a leap year).
 */
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { findKeys, readRowsAt, scanPopulation } from '../../src/population/index.js';
import { parseNonWorkingDays } from '../../src/population/periods.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { captureContext, fixedClock, planAnswers, tempDir } from '../fixtures/interview.js';

const year = { start: '2025-01-01', end: '2025-12-31' };

describe('a periodic population', () => {
  it('a monthly control: the 12 months of the year, each with its first and last day', async () => {
    const src = { kind: 'periods' as const, frequency: 'monthly' as const, ...year };
    const scan = await scanPopulation(src);
    const f = scan.fingerprint;
    expect(f.rowCount).toBe(12);
    expect([f.firstKey, f.lastKey]).toEqual(['2025-01', '2025-12']);
    expect(scan.validation.ok).toBe(true);
    // The SHA-256 is of the canonical text the fingerprint shows (computed here with node:crypto).
    expect(f.canonical).toBe('tolrate population: periods, v1\nfrequency: monthly\nperiod: 2025-01-01 to 2025-12-31\nnon-working days: none\n');
    expect(f.sha256).toBe(createHash('sha256').update(f.canonical!).digest('hex'));
    const rows = await readRowsAt(src, [1, 11]);
    // February 2025 has 28 days (not a leap year).
    expect(rows.map((r) => r.values)).toEqual([
      { period: '2025-02', from: '2025-02-01', to: '2025-02-28', weekday: '' },
      { period: '2025-12', from: '2025-12-01', to: '2025-12-31', weekday: '' },
    ]);
    expect((await findKeys(src, ['2025-07', '2026-01'])).unknown).toEqual(['2026-01']);
  });

  it('a daily control: the working days, less the non-working days listed; a listed Saturday changes nothing', async () => {
    const all = await scanPopulation({ kind: 'periods', frequency: 'daily', ...year });
    // 365 days = 52 weeks + 1 day (Wednesday 1 January): 52 × 5 + 1 = 261 weekdays.
    expect(all.fingerprint.rowCount).toBe(261);
    const nonWorkingDays = parseNonWorkingDays('2025-12-26, 2025-01-01; 2025-12-25 2025-12-27');
    expect(nonWorkingDays).toEqual(['2025-01-01', '2025-12-25', '2025-12-26', '2025-12-27']);
    const src = { kind: 'periods' as const, frequency: 'daily' as const, ...year, nonWorkingDays };
    const scan = await scanPopulation(src);
    // 2025-01-01 (Wed), 2025-12-25 (Thu) and 2025-12-26 (Fri) are left out; 2025-12-27 is a Saturday.
    expect(scan.fingerprint.rowCount).toBe(258);
    expect(scan.fingerprint.excludedCount).toBe(3);
    expect([scan.fingerprint.firstKey, scan.fingerprint.lastKey]).toEqual(['2025-01-02', '2025-12-31']);
    expect(scan.validation.notes.join(' ')).toContain('2025-12-27');
    expect(scan.fingerprint.sha256).not.toBe(all.fingerprint.sha256);
    expect((await readRowsAt(src, [0]))[0]!.values).toEqual({ period: '2025-01-02', from: '2025-01-02', to: '2025-01-02', weekday: 'Thursday' });
    expect(() => parseNonWorkingDays('2025-02-30')).toThrow(/not a date written YYYY-MM-DD/);
  });

  it('quarters and weeks: a week the period covers only in part is one unit, cut to the period', async () => {
    expect((await scanPopulation({ kind: 'periods', frequency: 'quarterly', ...year })).fingerprint).toMatchObject({ rowCount: 4, firstKey: '2025-Q1', lastKey: '2025-Q4' });
    const weekly = { kind: 'periods' as const, frequency: 'weekly' as const, ...year };
    const w = await scanPopulation(weekly);
    // Mondays from 2024-12-30 to 2025-12-29: 364 days apart, so 53 weeks.
    expect(w.fingerprint).toMatchObject({ rowCount: 53, firstKey: '2024-12-30', lastKey: '2025-12-29' });
    expect((await readRowsAt(weekly, [0]))[0]!.values).toMatchObject({ from: '2025-01-01', to: '2025-01-05' });
    expect(w.validation.notes.join(' ')).toMatch(/covers part of 2024-12-30 and 2025-12-29 only/);
  });

  it('a monthly control planned on it selects months, and re-performs; a changed period is named', async () => {
    const dir = tempDir();
    const answers = {
      ...planAnswers('0'),
      'plan.control.frequency': 'monthly',
      'plan.control.description': 'The payables ledger is reconciled to the supplier statements each month and the reconciliation reviewed.',
      'plan.population.kind': 'periods',
      'plan.population.frequency': '',
      'plan.population.samplingUnit': 'One month\'s reconciliation',
      'plan.population.description': 'The twelve monthly reconciliations of 2025',
      'plan.population.ledgerCount': '',
      'plan.population.ledgerTotal': '',
      'plan.population.ledgerSource': '',
      'plan.population.tieOutExplanation': 'The months of the period are the population by construction; the reconciliations are filed by month.',
      // A monthly control: the firm policy's size (templates/sampling-policy.json), not a statistical one.
      'plan.approach.kind': 'non-statistical',
      'plan.selection.spares': '1',
    };
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, new ScriptedAsker(answers, { defaults: true }), { now: fixedClock() })).toBe(0);
    const file = join(dir, 't1.tolrate.json');
    const wp = loadWorkpaper(file);
    expect(wp.population!.source).toEqual({ kind: 'periods', frequency: 'monthly', start: '2025-01-01', end: '2025-12-31', nonWorkingDays: [] });
    expect(wp.population!.fingerprint.rowCount).toBe(12);
    expect(wp.approach!.policy!.frequency).toBe('monthly');
    expect(wp.selection!.items.length).toBe(wp.approach!.sampleSize + 1);
    expect(wp.selection!.items.every((i) => /^2025-(0[1-9]|1[0-2])$/.test(i.key))).toBe(true);
    const sheet = readFileSync(join(dir, wp.selection!.fieldworkSheet!), 'utf8');
    expect(sheet.split('\r\n')[0]).toMatch(/^\uFEFFSeq,Role,Row,Key,period,from,to,weekday,A1 result/);

    const rep = async () => {
      const c = captureContext(dir, false);
      const code = await runCli(['reperform', 't1.tolrate.json'], c);
      return { code, out: c.text().replace(/\s+/g, ' ') };
    };
    const clean = await rep();
    expect(clean.out).toMatch(/population agrees periods: each month, 2025-01-01 to 2025-12-31: SHA-256 [0-9a-f]{16}…, 12 rows/);
    expect(clean.out).toMatch(/selection agrees/);
    expect(clean.code).toBe(0);
    const raw = JSON.parse(readFileSync(file, 'utf8'));
    raw.population.source.end = '2025-11-30';
    writeFileSync(file, JSON.stringify(raw, null, 2));
    const changed = await rep();
    expect(changed.code).toBe(1);
    expect(changed.out).toMatch(/population SHA-256 differs/);
    expect(changed.out).toMatch(/population row count differs: recorded 12, file has 11/);
  });
});
