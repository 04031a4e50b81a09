/**
 * Problems found by using the interview on a terminal as a practitioner would, each checked
 * here beside its fix: layout of the validation report, refusal wording, clearing an earlier
 * optional answer, which later steps a change really invalidates, the note on automated
 * controls, and a fieldwork sheet saved as XLSX at selection and read back.
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { optionalCount, optionalDate, optionalDecimal, optionalRate, rate } from '../../src/interview/parse.js';
import { scanLines } from '../../src/interview/plan-population.js';
import { dependents } from '../../src/interview/flow.js';
import { askControl, AUTOMATED_NOTE } from '../../src/interview/plan-basics.js';
import { newSession } from '../../src/interview/session.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { scanPopulation } from '../../src/population/index.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext, fixedClock, planAnswers, plannedTest, tempDir, writePopulation } from '../fixtures/interview.js';

describe('the validation report (plan, population step)', () => {
  it('puts the bullet on the first line of a wrapped problem only', async () => {
    // A key column picked by mistake: every key repeats, and the message wraps over several lines.
    const dir = tempDir();
    const names = ['E. Varrow', 'M. Quillon', 'T. Fenwright', 'S. Okabe-Lind', 'R. Castellane', 'J. Hobwood'];
    const rows = ['claim_id,employee,amount', ...Array.from({ length: 60 }, (_, i) => `EC-${70001 + i},${names[i % names.length]},10.00`)];
    writeFileSync(join(dir, 'claims.csv'), `${rows.join('\n')}\n`);
    const scan = await scanPopulation({ kind: 'csv', path: join(dir, 'claims.csv'), keyColumn: 'employee' });
    expect(scan.validation.ok).toBe(false);
    const lines = scanLines(scan);
    const start = lines.indexOf('  Validation found problems:');
    const body = lines.slice(start + 1).filter((l) => !l.trimStart().startsWith('Note:'));
    expect(body.length).toBeGreaterThan(1); // wrapped
    expect(body.filter((l) => l.startsWith('    - '))).toHaveLength(scan.validation.messages.length);
    // Continuation lines sit under the text, without a bullet of their own.
    for (const l of body.filter((x) => !x.startsWith('    - '))) expect(l).toMatch(/^ {6}[^\s-]/);
  });
});

describe('rate refusals', () => {
  it('a blank required rate says what to type, not \'"" is not a percentage\'', () => {
    expect(() => rate('Tolerable rate')('')).toThrow('Tolerable rate: type a percentage, e.g. 6 or 6%.');
    expect(() => rate('Confidence', { example: '95' })('abc')).toThrow('Confidence: "abc" is not a percentage. Type a number such as 95 or 95% (meaning 95%).');
  });

  it('states a limit once: never "below 50% (50%)" or "(A1) (0.5%)"', () => {
    expect(() => rate('Tolerable rate', { below: 0.5, belowWhat: '50%' })('60')).toThrow('Tolerable rate: 60% must be below 50%.');
    expect(() => rate('Confidence', { atLeast: 0.5, atLeastWhat: '50%, below which a sample gives no assurance' })('40')).toThrow(
      'Confidence: 40% must be at least 50%, below which a sample gives no assurance.',
    );
    expect(() => rate('Expected rate', { allowZero: true, below: 0.005, belowWhat: "A1's own tolerable rate" })('1')).toThrow(
      "Expected rate: 1% must be below A1's own tolerable rate (0.5%).",
    );
  });
});

describe('clearing an earlier optional answer', () => {
  it('"-" means none for optional rates, counts, amounts and dates (a blank takes the default shown)', () => {
    expect(optionalRate('A1 tolerable rate')('-')).toBeUndefined();
    expect(optionalRate('A1 tolerable rate')(' - ')).toBeUndefined();
    expect(optionalCount('The ledger count')('-')).toBeUndefined();
    expect(optionalDecimal('The ledger total')('-')).toBeUndefined();
    expect(optionalDate('Due date')('-')).toBeUndefined();
    expect(optionalRate('A1 tolerable rate')('5')).toBe(0.05);
    expect(optionalDecimal('The ledger total')('-12.50')).toBe('-12.50');
  });

  it('an attribute\'s own tolerable rate set by mistake can be dropped when the step is changed', async () => {
    const { dir, file } = await plannedTest();
    expect(loadWorkpaper(file).attributes![1]!.tolerableRate).toBe(0.08);
    const asker = new ScriptedAsker(
      {
        'plan.revisit.1': 'plan.attributes',
        'plan.revisit.2': 'none',
        'plan.attributes.*.description': '',
        'plan.attributes.*.deviation': '',
        'plan.attributes.A1.tolerableRate': '',
        'plan.attributes.A2.tolerableRate': '-',
        'plan.attributes.more.*': '',
        'plan.attributes.clearLater': true,
        'plan.approach.*': '',
        'plan.approach.tolerableRate': '6',
        'plan.selection.*': '',
        'plan.selection.sheetReplace': true,
      },
      { defaults: true },
    );
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(file);
    expect(wp.attributes![1]!.tolerableRate).toBeUndefined();
    // The attributes do not change the population: it is kept, not asked again.
    expect(ctx.text()).toContain('This change makes the later steps out of date: Approach and sample size, Selection.');
    expect(asker.ids.some((id) => id.startsWith('plan.population.'))).toBe(false);
    expect(wp.population).toBeDefined();
  });
});

describe('which later steps a change invalidates', () => {
  const nonStat = { approach: { kind: 'non-statistical', policy: { frequency: 'daily' } } } as unknown as Workpaper;
  const stat = { approach: { kind: 'statistical' } } as unknown as Workpaper;

  it('attributes: the approach onwards, not the population', () => {
    expect(dependents('plan.attributes')).toEqual(['plan.approach', 'plan.selection', 'record', 'conclude']);
    expect(dependents('plan.population')).toEqual(['plan.approach', 'plan.selection', 'record', 'conclude']);
    expect(dependents('plan.engagement')).toEqual([]);
  });

  it('control: the approach onwards only when a policy size was read for a frequency that changed', () => {
    expect(dependents('plan.control', nonStat, { frequency: 'weekly' })).toEqual(['plan.approach', 'plan.selection', 'record', 'conclude']);
    expect(dependents('plan.control', nonStat, { frequency: 'daily' })).toEqual([]);
    expect(dependents('plan.control', stat, { frequency: 'weekly' })).toEqual([]);
  });
});

describe('control step', () => {
  it('an automated control gets the note that sampling may not be the right test', async () => {
    const dir = tempDir();
    const out: string[] = [];
    const answers = {
      'plan.control.id': 'EXP-02',
      'plan.control.description': 'Claims over the limit are blocked by the expenses system until approved.',
      'plan.control.objective': 'Only approved claims are paid.',
      'plan.control.owner': 'Finance manager',
      'plan.control.frequency': 'many-times-daily',
      'plan.control.key': true,
    };
    for (const nature of ['automated', 'manual'] as const) {
      out.length = 0;
      const s = newSession({ asker: new ScriptedAsker({ ...answers, 'plan.control.nature': nature }), out: { write: (t) => out.push(t) }, path: join(dir, 'x.tolrate.json') });
      const c = await askControl(s);
      expect(c.nature).toBe(nature);
      expect(out.join('').replace(/\s+/g, ' ').includes(AUTOMATED_NOTE)).toBe(nature === 'automated');
    }
  });
});

describe('a fieldwork sheet written as XLSX', () => {
  it('has pick lists, a frozen header and the instructions; a filled workbook is read back, a bad code named by sheet, row and column', async () => {
    const ExcelJS = (await import('exceljs')).default;
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers = { ...planAnswers(total), 'plan.selection.sheet': 't1.fieldwork.xlsx' };
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(answers), { now: fixedClock() })).toBe(0);
    const n = loadWorkpaper(join(dir, 't1.tolrate.json')).selection!.sampleSize;
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(join(dir, 't1.fieldwork.xlsx'));
    const ws = wb.getWorksheet('Fieldwork')!;
    const header = (ws.getRow(1).values as unknown[]).slice(1) as string[];
    const col = (start: string) => header.findIndex((h) => h.startsWith(start)) + 1;
    expect(ws.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
    expect(ws.getCell(2, col('A1 result')).dataValidation).toMatchObject({ type: 'list', formulae: ['"C,D,V"'] });
    expect(ws.getCell(2, col('A2 cause')).dataValidation.formulae).toEqual(['"not-performed,performed-late,wrong-performer,evidence-missing,system,other"']);
    expect(ws.getCell(2, col('A1 intent')).dataValidation.formulae).toEqual(['"no,suspected,yes"']);
    expect(ws.getCell(2, col('A1 pattern')).dataValidation.formulae).toEqual(['"isolated,systemic,unclear"']);
    expect(ws.getColumn(col('A1 result')).width).toBeLessThanOrEqual(12);
    const instructions = wb.getWorksheet('Instructions')!;
    const lines = instructions.getColumn(1).values.slice(1).map(String);
    expect(lines.some((l) => l.startsWith('Result: C = conforms'))).toBe(true);

    // The tester fills it in the spreadsheet: every sample item conforms, tester, date and evidence; a bad code at item 4.
    for (let seq = 1; seq <= n; seq++) {
      const r = ws.getRow(seq + 1);
      r.getCell(col('A1 result')).value = seq === 4 ? 'Y' : 'C';
      r.getCell(col('A2 result')).value = 'C';
      r.getCell(col('Tested by')).value = 'T. Tester';
      // Typed as text in the text-formatted column; on item 2 the tester made the cell a date cell.
      if (seq === 2) {
        r.getCell(col('Date tested')).numFmt = 'yyyy-mm-dd';
        r.getCell(col('Date tested')).value = new Date(Date.UTC(2026, 0, 16));
      } else r.getCell(col('Date tested')).value = '2026-01-15';
      r.getCell(col('Evidence')).value = `voucher ${r.getCell(4).value}`;
    }
    await wb.xlsx.writeFile(join(dir, 'filled.xlsx'));
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'filled.xlsx', 'record.sheet.problems.1': 'stop' });
    await record(['t1.tolrate.json'], ctx, asker, { now: fixedClock() });
    expect(ctx.text()).toMatch(/filled\.xlsx, sheet Fieldwork\s+5\s+A1 result \[C\/D\/V\]\s+Y\s+not a result: write C/);
    expect(ctx.text()).toContain('Read 3 item(s) from filled.xlsx.');
    ws.getRow(5).getCell(col('A1 result')).value = 'C';
    await wb.xlsx.writeFile(join(dir, 'filled.xlsx'));
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'filled.xlsx' }), { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.results!.sheetPath).toBe('filled.xlsx');
    // A date cell reads as its date; the evidence as typed.
    expect(wp.results!.items[1]!.testedOn).toBe('2026-01-16');
    expect(wp.results!.items[3]).toMatchObject({ testedBy: 'T. Tester', testedOn: '2026-01-15', evidence: [{ ref: `voucher ${wp.results!.items[3]!.key}` }] });
  });
});
