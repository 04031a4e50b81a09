/**
 * Problems found by running the interview on a terminal with an XLSX population, document-number
 * ranges, systematic selection with two random starts, a haphazard list and a non-statistical
 * approach, each checked here beside its fix: answers kept when the population is chosen again,
 * the workbook's sheets named, the interval and starts shown, a refused haphazard list offered
 * again for editing, lines that fit the terminal, and what Ctrl-C says before anything is saved.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { TextQuestion } from '../../src/interview/asker.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { run as select } from '../../src/commands/select/index.js';
import { stoppedMessage } from '../../src/cli/stopped.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir, writePopulation } from '../fixtures/interview.js';

/** A scripted answerer that also notes the default each text question offered. */
class DefaultsSeen extends ScriptedAsker {
  readonly defaults: Array<{ id: string; default?: string; editable?: boolean }> = [];
  override async text<T>(q: TextQuestion<T>): Promise<T> {
    this.defaults.push({ id: q.id, ...(q.default !== undefined ? { default: q.default } : {}), ...(q.editable ? { editable: true } : {}) });
    return super.text(q);
  }
}

/** Answers for a ranges population 40001-41200 (no amount column, so no ledger total). */
function rangesAnswers(overrides: ScriptAnswers = {}): ScriptAnswers {
  return {
    ...planAnswers('0'),
    'plan.population.kind': 'ranges',
    'plan.population.ranges': '40001-41200',
    'plan.population.exclusions': '40017, 40233, 40500-40509',
    // 1,200 numbers less the 12 left out (40017, 40233 and the ten of 40500-40509): counted by hand.
    'plan.population.ledgerCount': '1188',
    ...overrides,
  };
}

describe('choosing the population again keeps the answers given', () => {
  it('ranges: after a problem is not accepted, the kind, ranges and exclusions typed are the defaults', async () => {
    const dir = tempDir();
    const asker = new DefaultsSeen(
      rangesAnswers({
        'plan.population.kind': ['ranges', ''],
        'plan.population.ranges': ['40001-41200', ''],
        'plan.population.exclusions': ['39990, 40017', '40017, 40233, 40500-40509'],
        'plan.population.goOn': false,
      }),
    );
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    expect(ctx.text()).toContain('Exclusions outside every range: 39990.');
    const second = asker.defaults.filter((d) => d.id === 'plan.population.ranges')[1];
    expect(second?.default).toBe('40001-41200');
    expect(asker.defaults.filter((d) => d.id === 'plan.population.exclusions')[1]?.default).toBe('39990, 40017');
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.population!.source).toEqual({ kind: 'ranges', ranges: '40001-41200', exclusions: ['40017, 40233, 40500-40509'] });
    expect(wp.population!.fingerprint.rowCount).toBe(1188); // counted by hand, as above
  });

  it('XLSX: a notes sheet in front is named; choosing again keeps the file, and the sheet asked lists the sheets', async () => {
    const dir = tempDir();
    const ExcelJS = (await import('exceljs')).default;
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Notes').addRow(['Extract of the payments register, run 2026-01-10']);
    const ws = wb.addWorksheet('Register');
    ws.addRow(['voucher', 'paid_on', 'amount']);
    for (let i = 0; i < 120; i++) ws.addRow([`PV-${3001 + i}`, new Date(Date.UTC(2025, i % 12, 1 + (i % 27))), 50 + i]);
    await wb.xlsx.writeFile(join(dir, 'register.xlsx'));
    const asker = new DefaultsSeen({
      ...planAnswers('0'),
      'plan.population.kind': ['file', ''],
      'plan.population.file': ['register.xlsx', ''],
      'plan.population.sheet': ['', 'Register'],
      'plan.population.keyColumn': '',
      'plan.population.amountColumn': ['(none)', 'amount'],
      'plan.population.dateColumn': ['(none)', 'paid_on'],
      'plan.population.ledgerCount': '120',
      'plan.population.ledgerTotal': String(Array.from({ length: 120 }, (_, i) => 50 + i).reduce((a, b) => a + b, 0)),
    });
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    const text = ctx.text();
    // The first try takes the default sheet, which is named both as the default and on screen.
    expect(asker.defaults.find((d) => d.id === 'plan.population.sheet')?.default).toBe('Notes');
    expect(text).toContain('Sheet "Notes" (2 sheets in the workbook)');
    expect(text).toContain('The population is empty: there is nothing to sample.');
    // The second try: the file typed before is the default; the sheet default is the one read.
    const files = asker.defaults.filter((d) => d.id === 'plan.population.file');
    expect(files[1]?.default).toBe('register.xlsx');
    expect(asker.defaults.filter((d) => d.id === 'plan.population.sheet')[1]?.default).toBe('Notes');
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.population!.source).toMatchObject({ kind: 'xlsx', path: 'register.xlsx', sheet: 'Register', keyColumn: 'voucher', amountColumn: 'amount' });
    expect(wp.population!.fingerprint.rowCount).toBe(120);
  });
});

describe('systematic selection with two random starts', () => {
  it('shows the interval and both starts, as `tolrate select` does', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const ctx = captureContext(dir);
    const answers = { ...planAnswers(total), 'plan.selection.method': 'systematic', 'plan.selection.starts': '2' };
    expect(await plan(['t1'], ctx, new ScriptedAsker(answers), { now: fixedClock() })).toBe(0);
    const sel = loadWorkpaper(join(dir, 't1.tolrate.json')).selection!;
    // The size 66 is the exact hypergeometric size for N = 240 at 95%, 6%, 1% (tolrate size; the
    // stats tests check it against @stdlib). Interval r·N/n = 2 × 240 / 66 = 80/11 (common practice:
    // the sampling interval of a systematic selection with r starts).
    expect(sel.sampleSize).toBe(66);
    expect(sel.interval).toBeCloseTo(80 / 11, 12);
    const text = ctx.text();
    expect(text).toContain('  Interval 80/11 rows (7.2727)');
    expect(sel.starts).toHaveLength(2);
    const line = text.split('\n').find((l) => l.startsWith('  Random starts '))!;
    for (const st of sel.starts!) expect(line).toContain(`(${Number(st.toFixed(4))})`);
    expect(line.split('),').length).toBe(2);
  });

  it('`tolrate select --help` says the sample size (not N) must be a multiple of the starts', async () => {
    const ctx = captureContext(tempDir());
    expect(await select(['--help'], ctx)).toBe(0);
    const help = ctx.text().replace(/\s+/g, ' ');
    expect(help).toContain('the number of random starts (default 1; the sample size must be a multiple of it)');
    expect(help).not.toContain('N must divide by it');
  });
});

describe('a haphazard list that is refused', () => {
  it('is offered again for editing, so only the wrong keys need retyping; "1 spare" is singular', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    // Planned size 66 (see above); 65 good keys and one that is not in the population, then 67 good keys.
    const good = Array.from({ length: 67 }, (_, i) => `PV-${1001 + i * 3}`);
    const first = [...good.slice(0, 65), 'PV-9999'].join(', ');
    const asker = new DefaultsSeen({
      ...planAnswers(total),
      'plan.selection.method': 'haphazard',
      'plan.selection.haphazard.by': 'T. Preparer',
      'plan.selection.haphazard.how': 'Picked across the months from the printed register.',
      'plan.selection.haphazard.keys': [first, good.join(', ')],
    });
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    const asked = asker.defaults.filter((d) => d.id === 'plan.selection.haphazard.keys');
    expect(asked[0]).toEqual({ id: 'plan.selection.haphazard.keys' });
    expect(asked[1]).toEqual({ id: 'plan.selection.haphazard.keys', default: first, editable: true });
    expect(ctx.text()).toContain('Selected 66 items and 1 spare (haphazard-v1):');
  });
});

describe('lines fit a 100-column terminal', () => {
  it('a haphazard, non-statistical test read from a sheet that stops at a bad cell, then concluded', async () => {
    const dir = tempDir();
    const keys = Array.from({ length: 30 }, (_, i) => String(40001 + i * 37));
    const planCtx = captureContext(dir);
    const answers = rangesAnswers({
      'plan.approach.kind': 'non-statistical',
      'plan.approach.reliance': 'moderate',
      'plan.approach.tolerableRate': '',
      'plan.approach.size.accept': 'accept',
      'plan.selection.method': 'haphazard',
      'plan.selection.haphazard.by': 'T. Preparer',
      'plan.selection.haphazard.how': 'Picked from the binders, two or three a month.',
      'plan.selection.haphazard.keys': keys.join(' '),
    });
    expect(await plan(['t1'], planCtx, new ScriptedAsker(answers, { defaults: true }), { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    const n = wp.approach!.sampleSize;
    // Fill the sheet: all conform, one intentional deviation, and a typo in a later row.
    const sheet = join(dir, 't1.fieldwork.csv');
    const lines = readFileSync(sheet, 'utf8').replace(/^\uFEFF/, '').split(/\r?\n/);
    const head = lines[0]!.split(',');
    const at = (name: string) => head.findIndex((h) => h.startsWith(name));
    const filled = lines.map((l, i) => {
      const c = l.split(',');
      if (i === 0 || !/^\d+$/.test(c[0] ?? '') || Number(c[0]) > n) return l;
      c[at('A1 result')] = c[0] === '12' ? 'X' : 'C';
      c[at('A2 result')] = 'C';
      Object.assign(c, { [at('Tested by')]: 'T. Tester', [at('Date tested')]: '2026-01-19', [at('Evidence')]: `approval log ${c[3]}` });
      if (c[0] === '3') {
        Object.assign(c, { [at('A1 result')]: 'D', [at('A1 found')]: 'Signed by the requester', [at('A1 cause')]: 'wrong-performer', [at('A1 intent')]: 'suspected', [at('A1 pattern')]: 'isolated' });
      }
      return c.join(',');
    });
    writeFileSync(sheet, filled.join('\n'));
    const recCtx = captureContext(dir);
    const rec = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': '', 'record.sheet.problems.1': 'stop' });
    await record(['t1.tolrate.json'], recCtx, rec, { now: fixedClock() });
    expect(recCtx.text()).toMatch(/reading\s+stopped at item 12/);
    writeFileSync(sheet, filled.join('\n').replace(/^(12,.*?),X,/m, '$1,C,'));
    const rec2 = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': '' });
    await record(['t1.tolrate.json'], recCtx, rec2, { now: fixedClock() });
    const conCtx = captureContext(dir);
    expect(await conclude(['t1.tolrate.json'], conCtx, new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    const all = planCtx.text() + recCtx.text() + conCtx.text();
    expect(all).toContain('figures are illustrative only');
    expect(all).toContain('escalated whatever');
    const long = all.split('\n').filter((l) => l.length > 100);
    expect(long).toEqual([]);
    // The first follow-up action comes straight under its heading, without a second blank line.
    expect(conCtx.text()).toMatch(/Follow-up actions\n-+\n1\. /);
  });
});

describe('Ctrl-C before the first step is saved', () => {
  it('does not name a workpaper file that does not exist; once a step is saved it does', async () => {
    const dir = tempDir();
    const early = new ScriptedAsker(planAnswers('0'), { stopAt: 2 });
    const e1 = await plan(['t1'], captureContext(dir), early, { now: fixedClock() }).catch((e: unknown) => e as { message: string; workpaper?: string });
    expect((e1 as Error).message).toMatch(/Stopped at question 2/);
    expect(existsSync(join(dir, 't1.tolrate.json'))).toBe(false);
    expect(stoppedMessage(dir, relative, e1 as { workpaper?: string })).not.toContain('t1.tolrate.json');
    const later = new ScriptedAsker(planAnswers('0'), { stopAt: 8 });
    const e2 = await plan(['t1'], captureContext(dir), later, { now: fixedClock() }).catch((e: unknown) => e as { message: string; workpaper?: string });
    expect((e2 as Error).message).toMatch(/Stopped at question 8/);
    expect(existsSync(join(dir, 't1.tolrate.json'))).toBe(true);
    expect(stoppedMessage(dir, relative, e2 as { workpaper?: string })).toContain('Stopped. t1.tolrate.json holds every step answered before this question.');
  });
});
