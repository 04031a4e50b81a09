/**
 * A test done at an interim date and rolled forward to the period end, through the real
 * interviews and commands: re-performed clean with its memo, then with a tampered roll-forward
 * result; the interview's refusals; a stop that keeps the answers; a roll-forward added to a
 * concluded, signed-off test; the policy's size pro rata for a periodic control; and the
 * status of a test whose roll-forward is open.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { testEntry } from '../../src/engagement/status.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir } from '../fixtures/interview.js';
import { interimAndRollForward, INTERIM_ROWS, rollForwardAnswers, typedResults, writeVouchers } from './fixture.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as rollforward } from '../../src/commands/rollforward/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';

describe('interim and roll-forward: re-performance', () => {
  it('re-performs clean with its memo, and names a tampered roll-forward result (exit 1)', async () => {
    const r = await interimAndRollForward({ interimDeviations: { 3: 'A1' }, rollForwardDeviations: { 5: 'A2' } });
    const wp = loadWorkpaper(r.file);
    const a2 = wp.evaluation!.attributes.find((a) => a.attributeId === 'A2')!;
    expect(a2.parts!.map((p) => [p.part, p.sampleSize, p.deviations])).toEqual([['interim', wp.selection!.sampleSize, 0], ['roll-forward', wp.rollForward!.selection!.sampleSize, 1]]);
    expect(a2.deviations).toBe(1);
    expect(a2.combined!.conservativeDeviations).toBeGreaterThanOrEqual(a2.combined!.deviationsInPopulation!);
    // The memo and its re-performance.
    const m = captureContext(r.dir, false);
    expect(await runCli(['memo', 't1.tolrate.json', '--out', 'memo.docx'], m)).toBe(0);
    const clean = captureContext(r.dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json', '--memo', 'memo.docx'], clean)).toBe(0);
    expect(clean.text()).toContain('roll-forward part: random, random-v1, seed 90817');
    expect(clean.text()).toContain('Everything re-derived agrees');
    // Tamper: the roll-forward deviation of item 5 made to conform.
    const raw = JSON.parse(readFileSync(r.file, 'utf8'));
    const i = raw.rollForward.results.items.findIndex((x: { seq: number }) => x.seq === 5);
    raw.rollForward.results.items[i].attributes.A2 = { result: 'conforms' };
    writeFileSync(r.file, JSON.stringify(raw, null, 2));
    const bad = captureContext(r.dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json'], bad)).toBe(1);
    const out = bad.text();
    expect(out).toContain(`rollForward.results.items[${i}]`);
    expect(out).toContain('A2, roll-forward part: recorded 1 deviation(s), the results give 0');
    expect(out).toContain('A2: recorded 1 deviation(s), the results give 0');
  }, 120_000);

  it('the whole-period limit of a run sized to a published reference case is the reference value', async () => {
    // tests/reference/plan-risks.json, "combined": 600 items with 1 deviation in 40 tested and 400
    // with none in 30, at 95% → 66 deviations (brute force over every allocation, exact rationals,
    // scripts/reference-plan-risks.py with Python 3.11.7).
    const ref = JSON.parse(readFileSync(join(import.meta.dirname, '..', 'reference', 'plan-risks.json'), 'utf8'));
    const c = ref.combined.find((x: { parts: Array<{ sampleSize: number }> }) => x.parts.length === 2 && x.parts[0]!.sampleSize === 40);
    expect(c.deviationsInPopulation).toBe(66);
    const smaller = (prefix: string, n: number): ScriptAnswers => ({
      [`${prefix}plan.approach.size.accept`]: 'other',
      [`${prefix}plan.approach.size.other`]: String(n),
      [`${prefix}plan.approach.size.smallerConfirm`]: true,
      [`${prefix}plan.approach.size.reason`]: 'Sized to a reference case for the check.',
    });
    const r = await interimAndRollForward({ interimDeviations: { 3: 'A1' }, extra: { plan: smaller('', 40), rollforward: smaller('rollforward.', 30) } });
    const a1 = loadWorkpaper(r.file).evaluation!.attributes.find((a) => a.attributeId === 'A1')!;
    expect(a1.parts!.map((p) => [p.populationSize, p.sampleSize, p.deviations])).toEqual(c.parts.map((p: { populationSize: number; sampleSize: number; deviations: number }) => [p.populationSize, p.sampleSize, p.deviations]));
    expect(a1.combined!.deviationsInPopulation).toBe(66);
    expect(a1.upperLimit).toBe(0.066);
    // 66 is not below ⌈6% × 1,000⌉ = 60: not supported for the whole period.
    expect(a1.supportedByRates).toBe(false);
    expect(loadWorkpaper(r.file).conclusion!.attributes.find((a) => a.attributeId === 'A1')!.supportsReliance).toBe(false);
  }, 120_000);
});

describe('tolrate rollforward: the interview', () => {
  async function recordedInterim() {
    const dir = tempDir('tolrate-rfi-');
    const clock = fixedClock('2025-10-14T09:00:00.000Z');
    const interim = writeVouchers(dir, 'vouchers-q1-q3.csv', INTERIM_ROWS, [1, 2, 3, 4, 5, 6, 7, 8, 9], 10001);
    const later = writeVouchers(dir, 'vouchers-q4.csv', 400, [10, 11, 12], 20001);
    const answers = { ...planAnswers(interim.total, INTERIM_ROWS), 'plan.population.file': 'vouchers-q1-q3.csv' };
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(answers), { now: clock })).toBe(0);
    expect(await record(['t1'], captureContext(dir), new ScriptedAsker(typedResults('')), { now: clock })).toBe(0);
    return { dir, clock, later, file: join(dir, 't1.tolrate.json') };
  }

  it('refuses dates that are not dates, outside the period or on its last day, and offers the month before the selection', async () => {
    const t = await recordedInterim();
    const asker = new ScriptedAsker({ ...rollForwardAnswers(t.later.total), 'rollforward.interimDate': ['2025-09-31', '2026-01-15', '2024-12-31', '2025-12-31', '2025-08-31', ''] });
    const c = captureContext(t.dir);
    expect(await rollforward(['t1'], c, asker, { now: t.clock })).toBe(0);
    const why = asker.refusals.map((x) => x.message);
    expect(why[0]).toContain('is not a date');
    expect(why[1]).toContain('outside the period 2025-01-01 to 2025-12-31');
    expect(why[2]).toContain('outside the period');
    expect(why[3]).toContain('the period end: nothing would be left to roll forward');
    // The interim population holds vouchers paid in September (counted here from the file itself):
    // an interim date in August would put them in both parts.
    const september = readFileSync(join(t.dir, 'vouchers-q1-q3.csv'), 'utf8').split('\n').filter((l) => /^PV-\d+,2025-09-/.test(l)).length;
    expect(september).toBeGreaterThan(0);
    expect(why[4]).toContain(`the interim population holds ${september} item(s) dated after 2025-08 (column paid_on, up to 2025-09)`);
    // The blank answer takes the default: the end of the last month the interim population holds items in.
    const wp = loadWorkpaper(t.file);
    expect(wp.rollForward).toMatchObject({ interimDate: '2025-09-30', periodStart: '2025-10-01', periodEnd: '2025-12-31', sampleSize: 72 });
    expect(wp.rollForward!.selection!.seed).toBe('90817');
    expect(wp.rollForward!.sizing).toMatchObject({ kind: 'statistical', computed: 72 });
    expect(c.text()).toContain('record t1.tolrate.json --part roll-forward');
    // Its own fieldwork sheet: the 72 items and 3 spares of the roll-forward selection.
    const sheet = readFileSync(join(t.dir, 't1.rollforward.fieldwork.csv'), 'utf8').trim().split('\n');
    expect(sheet.filter((l) => /^\d+,(sample|spare),/.test(l))).toHaveLength(75);
    expect(sheet.some((l) => l.includes('PV-1'))).toBe(false);
  }, 60_000);

  it('a stop keeps the dates and the answers given; the next run goes on; bad flags and parts are refused (exit 2)', async () => {
    const t = await recordedInterim();
    const answers = rollForwardAnswers(t.later.total);
    const probe = new ScriptedAsker(answers);
    await rollforward(['t1'], captureContext(t.dir), probe, { now: t.clock });
    const stopAt = probe.ids.indexOf('rollforward.plan.population.description');
    expect(stopAt).toBeGreaterThan(0);
    const u = await recordedInterim();
    await expect(rollforward(['t1'], captureContext(u.dir), new ScriptedAsker(rollForwardAnswers(u.later.total), { stopAt }), { now: u.clock })).rejects.toMatchObject({ name: 'ExitPromptError' });
    const mid = loadWorkpaper(u.file);
    expect(mid.rollForward!.interimDate).toBe('2025-09-30');
    expect(mid.rollForward!.population).toBeUndefined();
    expect(mid.unfinishedStep!.answers['rollforward.plan.population.samplingUnit']).toBe('One payment voucher');
    // Recording the roll-forward before it is planned: a clear message, exit 2.
    // (A TolrateInputError: the CLI prints its message and exits 2.)
    await expect(record(['t1', '--part', 'roll-forward'], captureContext(u.dir), new ScriptedAsker({}), { now: u.clock })).rejects.toMatchObject({
      name: 'TolrateInputError',
      message: expect.stringContaining('The roll-forward part is not planned yet (next: Roll-forward: population)'),
    });
    const bad = captureContext(u.dir, false);
    expect(await runCli(['record', 't1.tolrate.json', '--part', 'sideways'], bad)).toBe(2);
    expect(bad.err.join('')).toContain('"sideways" is not a part; give interim or roll-forward');
    // The next run goes on at the population, the kept answers offered (the sampling unit is not scripted).
    const { 'rollforward.plan.population.samplingUnit': _u, ...rest } = rollForwardAnswers(u.later.total);
    const again = new ScriptedAsker({ ...rest, 'rollforward.plan.population.samplingUnit': '' });
    expect(await rollforward(['t1'], captureContext(u.dir), again, { now: u.clock })).toBe(0);
    expect(again.ids).not.toContain('rollforward.interimDate');
    expect(loadWorkpaper(u.file).rollForward!.population!.samplingUnit).toBe('One payment voucher');
  }, 90_000);

  it('refuses a roll-forward for a two-stage plan with a clear message (nothing changed)', async () => {
    const dir = tempDir('tolrate-rf2-');
    const interim = writeVouchers(dir, 'vouchers-q1-q3.csv', INTERIM_ROWS, [1, 2, 3, 4, 5, 6, 7, 8, 9], 10001);
    const answers = { ...planAnswers(interim.total, INTERIM_ROWS), 'plan.population.file': 'vouchers-q1-q3.csv', 'plan.attributes.A2.tolerableRate': '', 'plan.approach.model': 'binomial', 'plan.approach.plan': 'two-stage', 'plan.approach.plan.accept': 'accept' };
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(answers), { now: fixedClock() })).toBe(0);
    const before = readFileSync(join(dir, 't1.tolrate.json'), 'utf8');
    await expect(rollforward(['t1'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() })).rejects.toMatchObject({
      name: 'TolrateInputError',
      message: expect.stringContaining('two-stage sampling plan'),
    });
    expect(readFileSync(join(dir, 't1.tolrate.json'), 'utf8')).toBe(before);
  }, 60_000);

  it('added to a concluded, signed-off test: the conclusion is kept as the earlier one, the sign-off cleared, and conclude needs the roll-forward results', async () => {
    const t = await recordedInterim();
    expect(await conclude(['t1'], captureContext(t.dir), new ScriptedAsker(concludeAnswers()), { now: t.clock })).toBe(0);
    expect(loadWorkpaper(t.file).signoffs?.preparer).toBeDefined();
    const c = captureContext(t.dir);
    expect(await rollforward(['t1'], c, new ScriptedAsker({ ...rollForwardAnswers(t.later.total), 'edit.reason': 'Roll-forward to the year end.' }), { now: t.clock })).toBe(0);
    const wp = loadWorkpaper(t.file);
    expect(wp.conclusion).toBeUndefined();
    expect(wp.evaluation).toBeUndefined();
    expect(wp.earlierConclusion).toBeDefined();
    expect(wp.signoffs).toBeUndefined();
    expect(wp.amendments?.[0]?.why).toBe('Roll-forward to the year end.');
    // Status: the roll-forward's results are open, so the test is not finished.
    const entry = testEntry(wp, t.file, '2026-01-20');
    expect(entry.stepReached).toBe('Roll-forward: results');
    expect(entry.complete).toBe(false);
    // Concluding now names what is missing.
    const early = captureContext(t.dir, false);
    const { concludeInterview } = await import('../../src/interview/stages.js');
    await expect(concludeInterview(early, new ScriptedAsker({}), { file: 't1', now: t.clock })).rejects.toThrow(/72 of 72 roll-forward items have no result yet/);
  }, 90_000);
});

describe('a periodic control tested at an interim date, non-statistically', () => {
  it('plans the interim date first, the interim months to it, then the roll-forward months with the policy size pro rata', async () => {
    const dir = tempDir('tolrate-rfp-');
    const clock = fixedClock('2026-01-10T09:00:00.000Z');
    const base: ScriptAnswers = {
      ...planAnswers('0', 12),
      'plan.control.frequency': 'monthly',
      'plan.population.kind': 'periods',
      'plan.population.frequency': 'monthly',
      'plan.population.samplingUnit': 'One month-end bank reconciliation',
      'plan.population.description': 'The monthly bank reconciliations of the interim months',
      'plan.population.ledgerCount': '',
      'plan.population.tieOutExplanation': 'One reconciliation per month by the control itself.',
      'plan.approach.kind': 'non-statistical',
      'plan.approach.reliance': 'high',
      'plan.approach.tolerableRate': '',
      'plan.selection.spares': '1',
    };
    // Engagement, control and attributes first; stop at the population.
    const probe = new ScriptedAsker(base);
    const stopAt = (await (async () => {
      const d = tempDir('tolrate-rfp-probe-');
      await plan(['t1'], captureContext(d), probe, { now: fixedClock('2026-01-10T09:00:00.000Z') });
      return probe.ids.indexOf('plan.population.kind');
    })());
    await expect(plan(['t1'], captureContext(dir), new ScriptedAsker(base, { stopAt }), { now: clock })).rejects.toMatchObject({ name: 'ExitPromptError' });
    // The interim date; the interim part is not planned yet, so the command says so and stops.
    const c1 = captureContext(dir);
    expect(await rollforward(['t1'], c1, new ScriptedAsker({ 'rollforward.interimDate': '2025-09-30' }), { now: clock })).toBe(0);
    expect(c1.text()).toContain('The interim part is not planned yet');
    // plan goes on: the interim months end at the interim date; then the roll-forward's planning follows.
    const rf: ScriptAnswers = {
      'plan.rollforward.now': true,
      'rollforward.plan.population.kind': '',
      'rollforward.plan.population.frequency': '',
      'rollforward.plan.population.samplingUnit': 'One month-end bank reconciliation',
      'rollforward.plan.population.description': 'The monthly bank reconciliations of October to December',
      'rollforward.plan.population.ledgerCount': '',
      'rollforward.plan.population.tieOutExplanation': 'One reconciliation per month by the control itself.',
      'rollforward.plan.approach.size.accept': 'accept',
      'rollforward.plan.selection.method': 'random',
      'rollforward.plan.selection.spares': '1',
      'rollforward.plan.selection.seed': '3321',
      'rollforward.plan.selection.sheet': '',
    };
    const asker = new ScriptedAsker({ ...base, ...rf });
    expect(await plan(['t1'], captureContext(dir), asker, { now: clock })).toBe(0);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.population!.source).toMatchObject({ kind: 'periods', start: '2025-01-01', end: '2025-09-30' });
    expect(wp.population!.fingerprint.rowCount).toBe(9);
    expect(wp.rollForward!.population!.source).toMatchObject({ kind: 'periods', frequency: 'monthly', start: '2025-10-01', end: '2025-12-31' });
    expect(wp.rollForward!.population!.fingerprint.rowCount).toBe(3);
    // The shipped policy gives 5 months for a monthly control at high reliance (common practice,
    // no single source): 3 of 12 months remain, ⌈5 × 3 / 12⌉ = 2.
    expect(wp.approach!.policy!.size).toBe(5);
    expect(wp.rollForward!.sizing).toMatchObject({ kind: 'policy-pro-rata', policySize: 5, periodMonths: 12, rollForwardMonths: 3, computed: 2 });
    expect(wp.rollForward!.sampleSize).toBe(2);
    // Record both parts (the record command takes the interim part first, then the roll-forward) and conclude.
    expect(await record(['t1'], captureContext(dir), new ScriptedAsker(typedResults('')), { now: clock })).toBe(0);
    const c2 = captureContext(dir);
    expect(await record(['t1'], c2, new ScriptedAsker(typedResults('rollforward.')), { now: clock })).toBe(0);
    expect(c2.text()).toContain('The interim part is recorded: recording the roll-forward part.');
    expect(await conclude(['t1'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: clock })).toBe(0);
    const done = loadWorkpaper(join(dir, 't1.tolrate.json'));
    const a1 = done.evaluation!.attributes[0]!;
    expect(a1.illustrative).toBe(true);
    expect(a1.sampleSize).toBe(7);
    expect(done.conclusion!.control.supportsReliance).toBe(true);
    const rp = captureContext(dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json'], rp)).toBe(0);
    expect(rp.text()).toContain('policy pro rata (5 × 3/12 months): 2 required, 2 adopted');
  }, 120_000);
});
