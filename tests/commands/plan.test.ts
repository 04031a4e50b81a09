/**
 * `tolrate plan` driven through the scripted answerer: wrong answers and the messages they
 * produce, the population report, the tie-out, the size and why, the policy, the selection.
 */
import stdHyperCdf from '@stdlib/stats-base-dists-hypergeometric-cdf';
import stdBinomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { defaultPolicyPath } from '../../src/interview/policy.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, fixedClock, planAnswers, tempDir, writePopulation } from '../fixtures/interview.js';

async function runPlan(answers: ScriptAnswers, opts: { rows?: number; args?: string[]; dir?: string } = {}) {
  const dir = opts.dir ?? tempDir();
  const pop = writePopulation(dir, opts.rows ?? 240);
  const ctx = captureContext(dir);
  const asker = new ScriptedAsker(answers);
  const code = await plan(opts.args ?? ['t1'], ctx, asker, { now: fixedClock() });
  return { dir, ctx, asker, code, pop, file: join(dir, 't1.tolrate.json') };
}

/** Smallest n with P(X <= ceil(n·edr)) <= 1 − c, from a reference CDF. */
function smallest(cdf: (k: number, n: number) => number, c: number, edr: number, max: number): number {
  for (let n = 1; n <= max; n++) if (cdf(Math.ceil(n * edr - 1e-9), n) <= 1 - c) return n;
  return -1;
}

describe('tolrate plan', () => {
  it('asks again after every wrong answer, with the reason, and records the plan', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers: ScriptAnswers = {
      ...planAnswers(total),
      'plan.engagement.entity': ['', 'Corrow Fittings Ltd'],
      'plan.engagement.periodStart': ['2025-02-30', '2025-01-01'],
      'plan.engagement.periodEnd': ['2024-12-31', '2025-12-31'],
      'plan.attributes.A2.tolerableRate': ['eight', '8'],
      'plan.population.file': ['missing.csv', 'vouchers.csv'],
      'plan.population.keyColumn': ['Voucher No', 'voucher'],
      'plan.population.ledgerCount': ['two hundred and forty', '240'],
      'plan.approach.confidence': ['40', '95'],
      'plan.approach.tolerableRate': ['0', '6'],
      'plan.approach.expectedRate': ['8', '6', '1'],
      'plan.selection.spares': ['999', '4'],
      'plan.selection.sheet': ['sheet.pdf', ''],
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    const shown = asker.refusals.map((r) => `${r.id}: ${r.message}`);
    expect(shown).toEqual([
      'plan.engagement.entity: The entity must not be empty.',
      'plan.engagement.periodStart: Period start: 2025-02-30 is not a real calendar date.',
      'plan.engagement.periodEnd: Period end: 2024-12-31 is before the period start (2025-01-01).',
      'plan.attributes.A2.tolerableRate: A2 tolerable rate: "eight" is not a percentage. Type a number such as 6 or 6% (meaning 6%).',
      `plan.population.file: The population file: there is no file at ${join(dir, 'missing.csv')}.`,
      'plan.population.keyColumn: "Voucher No" is not one of the choices: voucher, paid_on, payee, amount.',
      'plan.population.ledgerCount: The ledger count: "two hundred and forty" is not a whole number.',
      'plan.approach.confidence: Confidence: 40% must be at least 50%, below which a sample gives no assurance.',
      'plan.approach.tolerableRate: Tolerable rate: 0% is out of range; it must be above 0 and below 100.',
      'plan.approach.expectedRate: Expected rate: 8% must be below the tolerable rate (6%).',
      'plan.approach.expectedRate: Expected rate: 6% must be below the tolerable rate (6%).',
      'plan.selection.spares: Spares: 999 is more than the items left in the population (174).',
      'plan.selection.sheet: The sheet must end in .csv or .xlsx; "sheet.pdf" does not.',
    ]);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.log.map((e) => e.step)).toEqual(['plan.engagement', 'plan.control', 'plan.attributes', 'plan.population', 'plan.approach', 'plan.selection']);
    expect(wp.population!.source).toEqual({ kind: 'csv', path: 'vouchers.csv', keyColumn: 'voucher', amountColumn: 'amount', dateColumn: 'paid_on' });
    expect(wp.population!.fingerprint.rowCount).toBe(240);
    expect(wp.population!.tieOut).toMatchObject({ ledgerCount: 240, countDifference: 0, ledgerTotal: total, totalDifference: '0.00' });

    // Each attribute's size, then the largest adopted. Reference: @stdlib's hypergeometric CDF,
    // with M_t = ceil(TDR x N) tolerable deviations and k_e = ceil(n x EDR) (README, "How the figures are computed").
    const N = 240;
    const ref = (tdr: number) => smallest((k, n) => stdHyperCdf(k, N, Math.ceil(tdr * N - 1e-9), n), 0.95, 0.01, N);
    const a = wp.approach!;
    expect(a.sizes.map((x) => [x.attributeId, x.tolerableRate, x.sampleSize])).toEqual([
      ['A1', 0.06, ref(0.06)],
      ['A2', 0.08, ref(0.08)],
    ]);
    expect(a.sampleSize).toBe(Math.max(ref(0.06), ref(0.08)));
    expect(a.model).toBe('hypergeometric');
    // The binomial size beside it: 78 at 95% / 6% / 1% (AICPA Audit Sampling guide's attribute tables, from memory).
    expect(a.finitePopulationCorrection).toEqual({ binomialSampleSize: 78, correctedSampleSize: Math.ceil(78 / (1 + 78 / N)) });
    expect(smallest((k, n) => stdBinomialCdf(k, n, 0.06), 0.95, 0.01, 1000)).toBe(78);

    const out = ctx.text();
    expect(out).toContain(`${a.sampleSize} is the smallest sample for which finding k_e`);
    expect(out).toContain("Beside it, the textbook approximation: the binomial size 78 corrected for the finite");
    expect(out).toMatch(/Sizes at neighbouring rates \(A1, hypergeometric model, N = 240, 95% confidence\)/);
    expect(out).toMatch(/Expected \\ Tolerable\s+5%\s+6%\s+7%/);

    const sel = wp.selection!;
    expect(sel.items).toHaveLength(a.sampleSize + 4);
    expect(sel.items.filter((i) => i.role === 'spare')).toHaveLength(4);
    expect(sel.seed).toBe('4471');
    expect(sel.fieldworkSheet).toBe('t1.fieldwork.csv');
    const header = readFileSync(join(dir, 't1.fieldwork.csv'), 'utf8').split(/\r?\n/)[0]!;
    expect(header).toContain('A1 result [C/D/V],A1 found,A1 cause [code],A1 intent [no/suspected/yes],A1 pattern [isolated/systemic/unclear]');
    expect(header).toContain('A2 result [C/D/V]');
    expect(header).toContain('Void reason');
    // The stored items are the population's rows at the drawn positions.
    const lines = readFileSync(join(dir, 'vouchers.csv'), 'utf8').split('\n');
    for (const it of sel.items) expect(lines[it.position + 1]!.startsWith(`${it.key},`)).toBe(true);
    expect(out).toContain('Test the items, then record the results with: tolrate record t1.tolrate.json');
  });

  it('going on with a population that has problems needs a recorded reason', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const text = readFileSync(join(dir, 'vouchers.csv'), 'utf8').split('\n');
    text[5] = text[4]!; // a duplicate key
    text[9] = text[9]!.replace(/,[\d.]+$/, ',n/a'); // an unreadable amount
    writeFileSync(join(dir, 'vouchers.csv'), text.join('\n'));
    const answers: ScriptAnswers = {
      ...planAnswers(total),
      'plan.population.goOn': [false, true],
      'plan.population.acceptedReason': ['', 'PV-1004 was keyed twice in the extract; the register shows one voucher. Row 10 amount checked to the register.'],
      'plan.population.ledgerTotal': '',
      'plan.population.ledgerCount': '240',
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    expect(await plan(['t1'], ctx, asker, { now: fixedClock() })).toBe(0);
    const out = ctx.text();
    expect(out).toContain('Validation found problems:');
    expect(out).toContain('Fix the population (or choose another) and answer again.');
    expect(asker.ids.filter((i) => i === 'plan.population.file')).toHaveLength(2);
    const v = loadWorkpaper(join(dir, 't1.tolrate.json')).population!.validation;
    expect(v.ok).toBe(false);
    expect(v.messages.join(' ')).toMatch(/PV-1004/);
    expect(v.acceptedReason).toMatch(/keyed twice/);
    expect(asker.refusals.map((r) => r.message)).toEqual(['The reason must not be empty.']);
  });

  it('a tolerable rate of 0.06 without % is confirmed first; "no" asks again and 6 is taken', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers: ScriptAnswers = {
      ...planAnswers(total),
      'plan.approach.tolerableRate': ['0.06', '6'],
      'plan.approach.tolerableRate.belowOnePercent': false,
    };
    const asker = new ScriptedAsker(answers);
    expect(await plan(['t1'], captureContext(dir), asker, { now: fixedClock() })).toBe(0);
    const ids = asker.ids.filter((i) => i.startsWith('plan.approach.tolerableRate'));
    expect(ids).toEqual(['plan.approach.tolerableRate', 'plan.approach.tolerableRate.belowOnePercent', 'plan.approach.tolerableRate']);
    expect(loadWorkpaper(join(dir, 't1.tolrate.json')).approach).toMatchObject({ tolerableRate: 0.06 });
  });

  it('a tie-out difference is shown and needs an explanation', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers: ScriptAnswers = {
      ...planAnswers(total),
      'plan.population.ledgerCount': '241',
      'plan.population.ledgerTotal': '1,000.00',
      'plan.population.tieOutExplanation': ['', 'One voucher of the register was cancelled and re-issued; the listing keeps the re-issue only.'],
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    await plan(['t1'], ctx, asker, { now: fixedClock() });
    expect(ctx.text()).toContain('Count: population 240, ledger 241, difference -1');
    const t = loadWorkpaper(join(dir, 't1.tolrate.json')).population!.tieOut;
    expect(t.countDifference).toBe(-1);
    expect(t.ledgerTotal).toBe('1000.00');
    // Exact decimal arithmetic on the amounts (the listing's total less the ledger's).
    const expected = (Math.round(Number(total) * 100) - 100000) / 100;
    expect(Number(t.totalDifference)).toBeCloseTo(expected, 2);
    expect(t.totalDifference).toMatch(/^\d+\.\d{2}$/);
    expect(t.explanation).toMatch(/re-issued/);
    expect(asker.refusals).toHaveLength(1);
  });

  it('a size below the computed one warns and asks again; another size needs a reason', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers: ScriptAnswers = {
      ...planAnswers(total),
      'plan.approach.size.accept': 'other',
      'plan.approach.size.other': ['10', '241', '80'],
      'plan.approach.size.smallerConfirm': false,
      'plan.approach.size.reason': 'Firm minimum of 80 items for a key payment control.',
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    await plan(['t1'], ctx, asker, { now: fixedClock() });
    const out = ctx.text();
    expect(out).toMatch(/Warning: 10 is smaller than the \d+ the computation gives/);
    expect(asker.refusals.map((r) => r.message)).toEqual(['The sample size: 241 is more than the population size (240).']);
    const a = loadWorkpaper(join(dir, 't1.tolrate.json')).approach!;
    expect(a.sampleSize).toBe(80);
    expect(a.rationale).toMatch(/adopted 80 items instead of \d+: Firm minimum/);
  });

  it('non-statistical: the size comes from the firm policy, or from a firm\'s copy with --policy', async () => {
    const base = (total: string): ScriptAnswers => ({
      ...planAnswers(total),
      'plan.approach.kind': 'non-statistical',
      'plan.approach.reliance': 'moderate',
      'plan.approach.tolerableRate': '',
    });
    {
      const dir = tempDir();
      const { total } = writePopulation(dir);
      const ctx = captureContext(dir);
      await plan(['t1'], ctx, new ScriptedAsker(base(total)), { now: fixedClock() });
      const a = loadWorkpaper(join(dir, 't1.tolrate.json')).approach!;
      // Common practice, no single source: about 25 items for a recurring control at moderate
      // reliance, assuming about 90% confidence and no expected deviations.
      expect(a).toMatchObject({ kind: 'non-statistical', sampleSize: 25, confidence: 0.9, expectedRate: 0, tolerableRate: 0.1 });
      expect(a.policy).toMatchObject({ frequency: 'many-times-daily', reliance: 'Moderate reliance', size: 25 });
      expect(ctx.text()).toMatch(/Sampling risk is not quantified for a non-statistical sample/);
    }
    {
      const dir = tempDir();
      const { total } = writePopulation(dir);
      const policy = JSON.parse(readFileSync(defaultPolicyPath(), 'utf8'));
      policy.name = 'Corrow audit manual 4.2';
      policy.sizes['many-times-daily'].moderate = 30;
      writeFileSync(join(dir, 'firm-policy.json'), JSON.stringify(policy));
      const ctx = captureContext(dir);
      await plan(['t1', '--policy', 'firm-policy.json'], ctx, new ScriptedAsker(base(total)), { now: fixedClock() });
      const a = loadWorkpaper(join(dir, 't1.tolrate.json')).approach!;
      expect(a.sampleSize).toBe(30);
      expect(a.policy!.name).toBe('Corrow audit manual 4.2');
      // A broken copy stops with the problems named and exit 2, before any question.
      policy.sizes.daily = { moderate: 'twenty' };
      writeFileSync(join(dir, 'bad-policy.json'), JSON.stringify(policy));
      const ctx2 = captureContext(dir);
      const code = await runCli(['plan', 't2', '--policy', 'bad-policy.json'], { ...ctx2, isTTY: true });
      // runCli uses the terminal answerer; the policy is checked before it asks anything.
      expect(code).toBe(2);
      expect(ctx2.err.join('')).toMatch(/sizes\.daily\.moderate: must be a whole number of items/);
      expect(existsSync(join(dir, 't2.tolrate.json'))).toBe(false);
    }
  });

  it('systematic selection with random starts, and a haphazard list that warns', async () => {
    {
      const dir = tempDir();
      const { total } = writePopulation(dir);
      const answers: ScriptAnswers = { ...planAnswers(total), 'plan.selection.method': 'systematic', 'plan.selection.starts': ['4', '2'] };
      const asker = new ScriptedAsker(answers);
      await plan(['t1'], captureContext(dir), asker, { now: fixedClock() });
      const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
      const n = wp.approach!.sampleSize;
      expect(n % 4).not.toBe(0);
      expect(asker.refusals[0]!.message).toBe(`Random starts: ${n} is not a multiple of 4.`);
      expect(wp.selection!.method).toBe('systematic');
      expect(wp.selection!.starts).toHaveLength(2);
      // Interval r·N/n: with r random starts each start covers every (r·N/n)-th item (common practice, no single source).
      expect(wp.selection!.interval).toBeCloseTo((2 * 240) / n, 10);
    }
    {
      const dir = tempDir();
      const { total } = writePopulation(dir);
      const keys = Array.from({ length: 26 }, (_, i) => `PV-${1001 + i * 9}`);
      const answers: ScriptAnswers = {
        ...planAnswers(total),
        'plan.approach.kind': 'non-statistical',
        'plan.approach.reliance': 'moderate',
        'plan.approach.tolerableRate': '',
        'plan.selection.method': 'haphazard',
        'plan.selection.haphazard.by': 'T. Preparer',
        'plan.selection.haphazard.how': 'Picked across the twelve months from the printed register, avoiding month ends.',
        'plan.selection.haphazard.keys': ['PV-1001 PV-1002', [...keys.slice(0, 25), 'PV-9999'].join(', '), keys.join(', ')],
      };
      const ctx = captureContext(dir);
      const asker = new ScriptedAsker(answers);
      await plan(['t1'], ctx, asker, { now: fixedClock() });
      expect(asker.refusals[0]!.message).toBe('The planned sample is 25 items; 2 key(s) were listed.');
      expect(ctx.text()).toMatch(/Warning: Haphazard selection: the items were chosen by a person/);
      expect(ctx.text()).toMatch(/1 listed key is not in the population: "PV-9999"/);
      const sel = loadWorkpaper(join(dir, 't1.tolrate.json')).selection!;
      expect(sel.method).toBe('haphazard');
      expect(sel.haphazard).toEqual({ selectedBy: 'T. Preparer', how: 'Picked across the twelve months from the printed register, avoiding month ends.' });
      expect(sel.items.map((i) => i.key)).toEqual(keys);
      expect(sel.items.filter((i) => i.role === 'spare').map((i) => i.key)).toEqual([keys[25]]);
    }
  });

  it('an XLSX population: the sheet is asked, its columns are listed', async () => {
    const dir = tempDir();
    const ExcelJS = (await import('exceljs')).default;
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Notes').addRow(['Extract of the payments register']);
    const ws = wb.addWorksheet('Register');
    ws.addRow(['Voucher No', 'Paid', 'Amount']);
    for (let i = 0; i < 150; i++) ws.addRow([`PV-${2001 + i}`, new Date(Date.UTC(2025, i % 12, 1 + (i % 27))), 100 + i]);
    await wb.xlsx.writeFile(join(dir, 'register.xlsx'));
    const answers: ScriptAnswers = {
      ...planAnswers('0'),
      'plan.population.file': 'register.xlsx',
      'plan.population.sheet': ['Ledger', 'register'],
      'plan.population.keyColumn': 'Voucher No',
      'plan.population.amountColumn': 'Amount',
      'plan.population.dateColumn': 'Paid',
      'plan.population.ledgerCount': '150',
      'plan.population.ledgerTotal': String(Array.from({ length: 150 }, (_, i) => 100 + i).reduce((a, b) => a + b, 0)),
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    await plan(['t1'], ctx, asker, { now: fixedClock() });
    // A name that is not a sheet is refused at the question, which lists the sheets.
    expect(asker.refusals[0]!.message).toBe('There is no sheet "Ledger" in register.xlsx. Sheets: "Notes", "Register".');
    expect(ctx.text()).toContain('Columns found: Voucher No, Paid, Amount');
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.population!.source).toMatchObject({ kind: 'xlsx', path: 'register.xlsx', sheet: 'Register', keyColumn: 'Voucher No' });
    expect(wp.population!.fingerprint.rowCount).toBe(150);
    expect(wp.population!.tieOut.totalDifference).toMatch(/^0(\.0+)?$/);
    expect(wp.selection!.items[0]!.key).toMatch(/^PV-2\d{3}$/);
  });

  it('a population of document-number ranges', async () => {
    const dir = tempDir();
    const answers: ScriptAnswers = {
      ...planAnswers('0'),
      'plan.population.kind': 'ranges',
      'plan.population.ranges': ['40001-', '40001-40300'],
      'plan.population.exclusions': '40017, 40233',
      'plan.population.ledgerCount': '298',
    };
    const asker = new ScriptedAsker(answers);
    await plan(['t1'], captureContext(dir), asker, { now: fixedClock() });
    expect(asker.refusals[0]!.message).toMatch(/"40001-" is not a number or a range/);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.population!.source).toEqual({ kind: 'ranges', ranges: '40001-40300', exclusions: ['40017, 40233'] });
    expect(wp.population!.fingerprint.rowCount).toBe(298);
    expect(wp.selection!.items.every((i) => /^40\d{3}$/.test(i.key) && i.key !== '40017' && i.key !== '40233')).toBe(true);
  });

  it('continues at the first unanswered step, and a change to an answered step clears the later ones', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const answers = planAnswers(total);
    // Stop at the first question of the approach step.
    const probe = new ScriptedAsker(answers);
    await plan(['probe'], captureContext(dir), probe, { now: fixedClock() });
    const at = probe.ids.indexOf('plan.approach.kind');
    const stopper = new ScriptedAsker(answers, { stopAt: at });
    await expect(plan(['t1'], captureContext(dir), stopper, { now: fixedClock() })).rejects.toMatchObject({ name: 'ExitPromptError' });
    const saved = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(saved.population).toBeDefined();
    expect(saved.approach).toBeUndefined();
    const resume = new ScriptedAsker(answers);
    const ctx = captureContext(dir);
    await plan(['t1.tolrate.json'], ctx, resume, { now: fixedClock() });
    expect(resume.ids[0]).toBe('plan.approach.kind');
    expect(resume.ids.some((i) => i.startsWith('plan.engagement') || i.startsWith('plan.population'))).toBe(false);
    expect(ctx.text()).toContain('[done] Population');

    // Revisit: a new tolerable rate changes the approach, which clears the selection (confirmed).
    const change = new ScriptedAsker({
      ...answers,
      'plan.revisit.1': 'plan.approach',
      'plan.approach.tolerableRate': '10',
      'plan.approach.clearLater': true,
      'plan.selection.sheetReplace': false,
      'plan.selection.sheetOther': ['t1.fieldwork.csv', 't1-v2.fieldwork.csv'],
      'plan.revisit.2': 'none',
    });
    const ctx2 = captureContext(dir);
    await plan(['t1.tolrate.json'], ctx2, change, { now: fixedClock() });
    expect(ctx2.text()).toContain('This change makes the later steps out of date: Selection. They will be cleared and asked again.');
    // The sheet of the earlier selection is not overwritten without asking.
    expect(change.refusals.map((r) => r.message)).toEqual(['t1.fieldwork.csv exists too; give a new name.']);
    const after = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(after.approach!.tolerableRate).toBe(0.1);
    expect(after.selection!.sampleSize).toBe(after.approach!.sampleSize);
    expect(after.selection!.fieldworkSheet).toBe('t1-v2.fieldwork.csv');
    expect(existsSync(join(dir, 't1-v2.fieldwork.csv'))).toBe(true);
    expect(change.ids.filter((i) => i === 'plan.selection.method')).toHaveLength(1);
    expect(verifyLog(after)).toEqual([]);

    // Revisit without a change: nothing is cleared and nothing is logged.
    const same = new ScriptedAsker({ ...answers, 'plan.approach.tolerableRate': '10', 'plan.revisit.1': 'plan.engagement', 'plan.revisit.2': 'none' });
    const before = loadWorkpaper(join(dir, 't1.tolrate.json')).log.length;
    await plan(['t1.tolrate.json'], captureContext(dir), same, { now: fixedClock() });
    expect(loadWorkpaper(join(dir, 't1.tolrate.json')).log.length).toBe(before);
  });

  it('without a terminal the interviews exit 2 and say how to run them', async () => {
    const dir = tempDir();
    for (const args of [['plan'], ['record', 'x.tolrate.json'], ['conclude', 'x.tolrate.json'], []]) {
      const ctx = captureContext(dir, false);
      expect(await runCli(args, ctx)).toBe(2);
      const err = ctx.err.join('');
      expect(err).toContain('is an interview and needs a terminal');
      expect(err).toContain('tolrate demo');
      expect(ctx.out.join('')).toBe('');
    }
  });
});
