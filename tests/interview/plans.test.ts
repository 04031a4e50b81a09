/**
 * The sampling plans through the whole test: planned for both risks, and two stages (one that
 * stops at the first stage, one that needs the second), from the interview to the evaluation,
 * the conclusion, the memo and re-performance (clean, and with a tampered second-stage result
 * or a tampered c1).
 *
 * The plans and their risks are checked against tests/reference/plan-risks.json, written by
 * scripts/reference-plan-risks.py (Python 3.11.7, fractions.Fraction and math.comb: exact
 * rational arithmetic), for 95% confidence, a tolerable rate of 6% and an expected rate of 1%
 * (binomial model): the two-stage plan n1 62, c1 0, r1 2, n2 18, c2 1, and for both risks with
 * at most 10% risk of underreliance n 103, c 2.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { fillSheet } from '../fixtures/sheet.js';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { evaluate, worklist } from '../../src/control-test/index.js';
import { renderMemo } from '../../src/memo/index.js';
import { readMemoBlocks } from '../../src/memo/read.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, plannedTest, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

const reference = JSON.parse(readFileSync(join(import.meta.dirname, '../reference/plan-risks.json'), 'utf8'));
/** The reference row of the plan for 95% / 6% / 1%, binomial (exact rationals, scripts/reference-plan-risks.py). */
const REF_PLAN = reference.plans.find((p: any) => p.model === 'binomial' && p.tolerableRate === 0.06 && p.expectedRate === 0.01 && p.plan.n1 === 62);
const REF_TWO = reference.twoStage.find((p: any) => p.confidence === 0.95 && p.tolerableRate === 0.06 && p.expectedRate === 0.01 && p.populationSize === null);
const REF_BOTH = reference.bothRisks.find((p: any) => p.confidence === 0.95 && p.tolerableRate === 0.06 && p.expectedRate === 0.01 && p.underrelianceRisk === 0.1);

/** One tolerable rate for the test (A2 uses the test's), the binomial model, and the plan chosen. */
function planned(extra: ScriptAnswers) {
  return plannedTest({ 'plan.attributes.A2.tolerableRate': '', 'plan.approach.model': 'binomial', ...extra });
}

const TWO: ScriptAnswers = { 'plan.approach.plan': 'two-stage', 'plan.approach.plan.accept': 'accept' };

/** Typed results: everything conforms except the A1 deviations at the given items. */
function results(devs: number[]): ScriptAnswers {
  const a: ScriptAnswers = { 'record.source': 'type', ...FIELDWORK_ANSWERS, 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms' };
  for (const seq of devs) {
    Object.assign(a, {
      [`record.item.${seq}.A1.result`]: 'deviation',
      [`record.item.${seq}.A1.found`]: `Voucher ${seq} released with one signature`,
      [`record.item.${seq}.A1.cause`]: 'not-performed',
      [`record.item.${seq}.A1.intent`]: 'no',
      [`record.item.${seq}.A1.pattern`]: 'isolated',
    });
  }
  return a;
}

async function reperform(dir: string) {
  const ctx = captureContext(dir, false);
  const code = await runCli(['reperform', 't1.tolrate.json'], ctx);
  return { code, text: ctx.text().replace(/\s+/g, ' ') };
}

describe('two-stage plan', () => {
  it('is offered with its figures, recorded, and both stages drawn up front', async () => {
    const { file } = await planned(TWO);
    const wp = loadWorkpaper(file);
    const p = wp.approach!.plan!;
    expect(p.kind).toBe('two-stage');
    if (p.kind !== 'two-stage') return;
    // scripts/reference-plan-risks.py (exact rationals, and its brute-force two-stage search).
    expect([p.firstSampleSize, p.firstAcceptanceNumber, p.firstRejectionNumber, p.secondSampleSize, p.secondAcceptanceNumber]).toEqual([REF_TWO.plan.n1, REF_TWO.plan.c1, REF_TWO.plan.r1, REF_TWO.plan.n2, REF_TWO.plan.c2]);
    expect(p.overrelianceRisk).toBeCloseTo(REF_PLAN.overrelianceRisk, 12);
    expect(p.underrelianceRisk).toBeCloseTo(REF_PLAN.underrelianceRisk, 12);
    expect(p.averageSampleNumber).toBeCloseTo(REF_TWO.averageSampleNumber, 9);
    expect(wp.approach!.sampleSize).toBe(80);
    expect(wp.approach!.rationale).toMatch(/the most items that may be tested \(62 \+ 18\)/);
    const sample = wp.selection!.items.filter((x) => x.role === 'sample');
    expect(sample).toHaveLength(80);
    expect(sample.slice(0, 62).every((x) => x.stage === 1)).toBe(true);
    expect(sample.slice(62).every((x) => x.stage === 2)).toBe(true);
    expect(wp.selection!.items.filter((x) => x.role === 'spare').every((x) => x.stage === undefined)).toBe(true);
    // Only the first stage is on the worklist until it is complete.
    expect(worklist(wp).items).toHaveLength(62);
    const sheet = readFileSync(join(file, '..', wp.selection!.fieldworkSheet!), 'utf8');
    expect(sheet).toMatch(/sample, stage 2 \(test only if the first stage is inconclusive\)/);
  });

  it('stops at the first stage when it has no deviation: the stage-2 items are not tested, and re-performance is clean', async () => {
    const { dir, file } = await planned(TWO);
    const a = new ScriptedAsker(results([]));
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, a, { now: fixedClock() })).toBe(0);
    expect(ctx.text().replace(/\s+/g, ' ')).toMatch(/second stage is not needed: the 18 stage-2 items are not tested/);
    expect(a.ids.some((i) => i.startsWith('record.item.63.'))).toBe(false);
    const wp = loadWorkpaper(file);
    const ev = evaluate(wp).attributes;
    for (const e of ev) {
      expect(e.stage).toEqual({ reached: 1, firstSampleSize: 62, firstDeviations: 0, decision: 'accepted-at-first' });
      expect(e.supportedByRates).toBe(true);
      expect(e.sampleSize).toBe(62);
      // The plan's exact risk over both stages (reference table), not the single-stage figure.
      expect(e.achievedRisk).toBeCloseTo(REF_PLAN.overrelianceRisk, 12);
    }
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    const done = loadWorkpaper(file);
    expect(done.conclusion!.control.supportsReliance).toBe(true);
    expect(done.conclusion!.attributes[0]!.reasoning).toMatch(/0 deviation\(s\) in the 62 first-stage items .*supports reliance at the first stage/);
    const r = await reperform(dir);
    expect(r.text).toMatch(/two stages n1 62, c1 0, r1 2, n2 18, c2 1/);
    expect(r.code, r.text).toBe(0);
    // The spread by month counts the items tested: the 18 second-stage items were drawn but, with
    // the first stage deciding, never tested, so the sample's total is the 62 of the first stage.
    const spreadTotal = (await readMemoBlocks(await renderMemo(loadWorkpaper(file), { chart: false })))
      .flatMap((b) => (b.kind === 'table' ? b.rows.map((x) => x.join(' | ')) : []))
      .find((x) => x.startsWith('Total | 240 |'));
    expect(spreadTotal).toMatch(/^Total \| 240 \| 100\.0% \| [\d,.]+ \| 62 \| 100\.0% \|/);

    // A second-stage result added outside the tool, although the first stage decided.
    const t = JSON.parse(readFileSync(file, 'utf8'));
    const item = t.selection.items.find((x: any) => x.seq === 63);
    t.results.items.push({ key: item.key, seq: 63, attributes: { A1: { result: 'conforms' } } });
    writeFileSync(file, JSON.stringify(t, null, 2));
    const tampered = await reperform(dir);
    expect(tampered.code).toBe(1);
    expect(tampered.text).toMatch(/\(item 63, second stage\): a result is recorded, but the first stage decided every attribute/);
  });

  it('needs the second stage for A1 only after one A1 deviation, and decides by k1 + k2 ≤ c2', async () => {
    const { dir, file } = await planned(TWO);
    const a = new ScriptedAsker(results([3]));
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, a, { now: fixedClock() })).toBe(0);
    expect(ctx.text().replace(/\s+/g, ' ')).toMatch(/A1 found more than 0 and fewer than 2 deviation\(s\)/);
    // Stage-2 items are asked for A1 only.
    expect(a.ids).toContain('record.item.63.A1.result');
    expect(a.ids).not.toContain('record.item.63.A2.result');
    const wp = loadWorkpaper(file);
    const [a1, a2] = evaluate(wp).attributes;
    expect(a1!.stage).toEqual({ reached: 2, firstSampleSize: 62, firstDeviations: 1, secondSampleSize: 18, secondDeviations: 0, decision: 'accepted-at-second' });
    expect(a1!.sampleSize).toBe(80);
    expect(a1!.sampleRate).toBeCloseTo(1 / 80, 12);
    expect(a1!.supportedByRates).toBe(true);
    expect(a2!.stage!.decision).toBe('accepted-at-first');
    expect(a2!.sampleSize).toBe(62);
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    expect((await reperform(dir)).code).toBe(0);

    // The memo: the plan in the approach, the decision by stage in the results, each item's stage,
    // and the operating characteristic of the plan adopted.
    const blocks = await readMemoBlocks(await renderMemo(loadWorkpaper(file), { chart: false, operatingCharacteristic: true }));
    const rows = blocks.flatMap((b) => (b.kind === 'table' ? b.rows.map((r) => r.join(' | ')) : []));
    const text = blocks.map((b) => (b.kind === 'paragraph' ? b.text : '')).join('\n');
    expect(rows).toContain('First stage: items (n1) | 62');
    expect(rows).toContain('Relies with at most (c1) | 0');
    expect(rows).toContain('Does not rely from (r1) | 2');
    expect(rows).toContain('Second stage: items (n2) | 18');
    expect(rows).toContain('Relies with at most, both stages (c2) | 1');
    expect(rows).toContain('A1 | 1 / 62 | 0 / 18 | 2 | Relied on after the second stage');
    // The second stage was tested, so the spread by month counts all 80 items.
    expect(rows.find((x) => x.startsWith('Total | 240 |'))).toMatch(/^Total \| 240 \| 100\.0% \| [\d,.]+ \| 80 \| 100\.0% \|/);
    expect(rows).toContain('A2 | 0 / 62 | not needed: the first stage decided | 1 | Relied on at the first stage');
    expect(rows.some((r) => /^63 \| PV-\d+ \| \d+ \| Sample, stage 2 \| Conforms \| — \| Second stage: A1$/.test(r))).toBe(true);
    expect(text).toMatch(/planned in two stages, both selected in advance: 62 items are tested first/);
    // The plan is named with the rate it is computed at, and an accepted two-stage test is summed up by
    // the plan's rule, never by "the upper deviation limit does not exceed the tolerable rate".
    expect(text).toMatch(/risk of overreliance at the tolerable rate of 6\.0% is 5\.0%/);
    expect(text).toMatch(/meet the two-stage plan's rule for reliance, stage by stage/);
    expect(text).not.toMatch(/upper deviation limit does not exceed the tolerable rate/);
    expect(rows.some((r) => r.includes('A1, A2 (n1 = 62, c1 = 0, r1 = 2; n2 = 18, c2 = 1)'))).toBe(true);
    // The chance of relying at 6% is the plan's risk of overreliance (reference table: 4.96%, shown to one decimal).
    expect(rows).toContain('6.0% | 5.0%');
  });

  it('replaces a void by the next spare at either stage; the spare takes the stage and the attributes of the item it replaces', async () => {
    const { dir, file } = await planned(TWO);
    const answers: ScriptAnswers = {
      ...results([3]),
      'record.item.2.A1.result': 'void',
      'record.item.2.void': 'Voucher cancelled before release',
      'record.item.63.A1.result': 'void',
      'record.item.63.void': 'Voucher cancelled before release',
    };
    const a = new ScriptedAsker(answers);
    expect(await record(['t1.tolrate.json'], captureContext(dir), a, { now: fixedClock() })).toBe(0);
    // Spares are items 81-84: 81 replaces item 2 (stage 1, both attributes), 82 replaces item 63 (stage 2, A1 only).
    expect(a.ids).toContain('record.item.81.A2.result');
    expect(a.ids).toContain('record.item.82.A1.result');
    expect(a.ids).not.toContain('record.item.82.A2.result');
    const wp = loadWorkpaper(file);
    const wl = worklist(wp);
    expect(wl.items.find((x) => x.item.seq === 81)).toMatchObject({ stage: 1, replaces: wp.selection!.items[1]!.key, attributes: ['A1', 'A2'] });
    expect(wl.items.find((x) => x.item.seq === 82)).toMatchObject({ stage: 2, attributes: ['A1'] });
    const a1 = evaluate(wp).attributes[0]!;
    expect(a1.stage).toEqual({ reached: 2, firstSampleSize: 62, firstDeviations: 1, secondSampleSize: 18, secondDeviations: 0, decision: 'accepted-at-second' });
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    const r = await reperform(dir);
    expect(r.code, r.text).toBe(0);
  });

  it('rejects after the second stage offers no extension, and re-performance names a tampered stage-2 result and a tampered c1', async () => {
    const { dir, file } = await planned(TWO);
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(results([3, 70])), { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(file);
    const a1 = evaluate(wp).attributes[0]!;
    expect(a1.stage!.decision).toBe('rejected-at-second');
    expect(a1.supportedByRates).toBe(false);
    expect(a1.extension).toBeNull();
    expect(a1.extensionRisk).toBeUndefined();
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    const done = loadWorkpaper(file);
    expect(done.conclusion!.control.supportsReliance).toBe(false);
    expect(done.conclusion!.followUps.some((f) => f.kind === 'extend-sample')).toBe(false);
    expect(done.conclusion!.followUps.map((f) => f.description).join('\n')).toMatch(/two-stage plan already had its second look/);
    expect((await reperform(dir)).code).toBe(0);

    const original = readFileSync(file, 'utf8');
    // A second-stage deviation turned into a conformity outside the tool.
    const t1 = JSON.parse(original);
    const item = t1.results.items.find((x: any) => x.seq === 70);
    item.attributes.A1 = { result: 'conforms' };
    writeFileSync(file, JSON.stringify(t1, null, 2));
    const r1 = await reperform(dir);
    expect(r1.code).toBe(1);
    expect(r1.text).toMatch(/A1: recorded stage 2 reached, 1 deviation\(s\) in 62 at the first stage, 1 in 18 at the second, rejected-at-second; re-derived .* 0 in 18 at the second, accepted-at-second/);
    // c1 raised from 0 to 1 outside the tool.
    const t2 = JSON.parse(original);
    t2.approach.plan.firstAcceptanceNumber = 1;
    writeFileSync(file, JSON.stringify(t2, null, 2));
    const r2 = await reperform(dir);
    expect(r2.code).toBe(1);
    expect(r2.text).toMatch(/first acceptance number c1: recorded 1, recomputed 0/);
  });

  it('is not offered when an attribute has its own tolerable rate, or when no two-stage plan exists, and says why', async () => {
    const own = await planText({ 'plan.approach.model': 'binomial' });
    expect(own.text).toMatch(/Two stages are not offered: a two-stage plan is searched for one tolerable rate, and some attributes have their own/);
    expect(own.asker.ids).toContain('plan.approach.plan');
    const zero = await planText({ 'plan.attributes.A2.tolerableRate': '', 'plan.approach.model': 'binomial', 'plan.approach.expectedRate': '0' });
    expect(zero.text).toMatch(/Two stages are not offered: With an expected rate of 0% a second stage is never expected to be needed/);
    // A scripted choice that is not offered is refused (the script has no other answer).
    await expect(planText({ 'plan.approach.model': 'binomial', 'plan.approach.plan': 'two-stage' })).rejects.toThrow(/two-stage/);
  });
});

/** Plan with the fixture's answers and these, and keep what was shown. */
async function planText(extra: ScriptAnswers) {
  const { runWith } = await import('../../src/commands/plan/index.js');
  const dir = tempDir();
  const { total } = writePopulation(dir);
  const ctx = captureContext(dir);
  const asker = new ScriptedAsker({ ...planAnswers(total), ...extra });
  const code = await runWith(['t1'], ctx, asker, { now: fixedClock() });
  if (code !== 0) throw new Error(`planning failed: ${ctx.text().slice(-400)}`);
  return { text: ctx.text().replace(/\s+/g, ' '), asker, wp: loadWorkpaper(join(dir, 't1.tolrate.json')) };
}

describe('plan for both risks', () => {
  it('asks the risk of underreliance (refusing a wrong answer), and decides with k ≤ c, which agrees with the exact risk rule', async () => {
    const { dir, file } = await planned({ 'plan.approach.plan': 'both-risks', 'plan.approach.underrelianceRisk': ['ten', '150', '10'], 'plan.approach.plan.accept': 'accept' });
    const wp = loadWorkpaper(file);
    const p = wp.approach!.plan!;
    expect(p.kind).toBe('both-risks');
    if (p.kind !== 'both-risks') return;
    // scripts/reference-plan-risks.py: n 103, c 2 and both risks exact.
    expect([p.sampleSize, p.acceptanceNumber]).toEqual([REF_BOTH.sampleSize, REF_BOTH.acceptanceNumber]);
    expect(p.overrelianceRisk).toBeCloseTo(REF_BOTH.overrelianceRiskAchieved, 12);
    expect(p.underrelianceRisk).toBeCloseTo(REF_BOTH.underrelianceRiskAchieved, 12);
    expect(wp.approach!.sampleSize).toBe(103);
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(results([3, 9])), { now: fixedClock() })).toBe(0);
    const a1 = evaluate(loadWorkpaper(file)).attributes[0]!;
    // k = 2 = c: supported; the exact risk P(X ≤ 2 | 103, 6%) is the reference's achieved risk.
    expect(a1.deviations).toBe(2);
    expect(a1.supportedByRates).toBe(true);
    expect(a1.achievedRisk).toBeCloseTo(REF_BOTH.overrelianceRiskAchieved, 12);
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    expect(loadWorkpaper(file).conclusion!.attributes[0]!.reasoning).toMatch(/Sample planned for both risks at a tolerable rate of 6% \(rely on the control with at most 2 deviation\(s\) in 103 items at that rate\)/);
    expect((await reperform(dir)).code).toBe(0);
  });

  it('with an attribute of its own tolerable rate, is planned at the lowest rate, and each attribute is judged at its own', async () => {
    // The fixture's A1 uses the test's 6%, A2 its own 8%: planned at 6% as above (reference n 103, c 2).
    const { dir, file } = await plannedTest({ 'plan.approach.model': 'binomial', 'plan.approach.plan': 'both-risks', 'plan.approach.underrelianceRisk': '10', 'plan.approach.plan.accept': 'accept' });
    const wp = loadWorkpaper(file);
    expect(wp.approach!.plan).toMatchObject({ kind: 'both-risks', sampleSize: REF_BOTH.sampleSize, acceptanceNumber: REF_BOTH.acceptanceNumber });
    expect(wp.approach!.rationale).toMatch(/Planned at the lowest of the attributes' tolerable rates \(6%\)/);
    // Three A2 deviations: more than c = 2 (planned at 6%), but A2 is judged at its own 8%, where the
    // exact risk P(X ≤ 3 | 103, 8%) is within 5%: supported, as a sample planned for A2 alone would be.
    const answers: ScriptAnswers = { ...results([]) };
    for (const seq of [3, 9, 15]) {
      Object.assign(answers, {
        [`record.item.${seq}.A2.result`]: 'deviation',
        [`record.item.${seq}.A2.found`]: 'No invoice',
        [`record.item.${seq}.A2.cause`]: 'evidence-missing',
        [`record.item.${seq}.A2.intent`]: 'no',
        [`record.item.${seq}.A2.pattern`]: 'isolated',
      });
    }
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(answers), { now: fixedClock() })).toBe(0);
    const a2 = evaluate(loadWorkpaper(file)).attributes[1]!;
    expect(a2.tolerableRate).toBe(0.08);
    expect(a2.achievedRisk).toBeLessThanOrEqual(0.05);
    expect(a2.supportedByRates).toBe(true);
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() })).toBe(0);
    expect(loadWorkpaper(file).conclusion!.attributes[1]!.reasoning).toMatch(/planned for both risks at a tolerable rate of 6% .*judged at its own tolerable rate of 8% by the exact risk rule/);
    expect((await reperform(dir)).code).toBe(0);
  });

  it('with three deviations (k > c) the results do not support reliance', async () => {
    const { dir, file } = await planned({ 'plan.approach.plan': 'both-risks', 'plan.approach.underrelianceRisk': '10', 'plan.approach.plan.accept': 'accept' });
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(results([3, 9, 15])), { now: fixedClock() })).toBe(0);
    const a1 = evaluate(loadWorkpaper(file)).attributes[0]!;
    expect(a1.supportedByRates).toBe(false);
  });
});

describe('two-stage plan, results read from the fieldwork sheet', () => {
  it('reads the second stage for the attributes that need it (others left blank), and names a blank one', async () => {
    const { dir, file } = await planned(TWO);
    const wp = loadWorkpaper(file);
    const sheet = join(dir, wp.selection!.fieldworkSheet!);
    const cells: Record<number, Record<string, string>> = {};
    for (let seq = 1; seq <= 62; seq++) cells[seq] = { 'A1 result': 'C', 'A2 result': 'C' };
    cells[3] = { 'A1 result': 'D', 'A1 found': 'One signature only', 'A1 cause': 'not-performed', 'A1 intent': 'no', 'A1 pattern': 'isolated', 'A2 result': 'C' };
    // The second stage, A1 only; item 64 filled for A2 instead of A1 at first.
    for (let seq = 63; seq <= 80; seq++) cells[seq] = seq === 64 ? { 'A2 result': 'C' } : { 'A1 result': 'C' };
    fillSheet(sheet, join(dir, 'filled.csv'), cells);
    const a = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'filled.csv', 'record.sheet.problems.1': 'stop' });
    const ctx = captureContext(dir);
    await record(['t1.tolrate.json'], ctx, a, { now: fixedClock() });
    const flat = ctx.text().replace(/\s+/g, ' ');
    expect(flat).toMatch(/test the 18 stage-2 items for A1/);
    expect(flat).toMatch(/blank: item 64 is tested for A1 at the second stage/);
    const mid = loadWorkpaper(file);
    expect(worklist(mid).next!.item.seq).toBe(64);
    // Filled in, read again: complete, and the stage-2 items hold A1 only.
    cells[64] = { 'A1 result': 'C' };
    fillSheet(sheet, join(dir, 'filled.csv'), cells);
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'filled.csv' }), { now: fixedClock() })).toBe(0);
    const done = loadWorkpaper(file);
    const second = done.results!.items.filter((r) => r.seq > 62 && r.seq <= 80);
    expect(second).toHaveLength(18);
    expect(second.every((r) => Object.keys(r.attributes).join() === 'A1')).toBe(true);
    expect(evaluate(done).attributes[0]!.stage!.decision).toBe('accepted-at-second');
  });
});
