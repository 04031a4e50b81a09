/**
 * `tolrate conclude`: the evaluation table, the qualitative review (an intentional deviation
 * escalates whatever the rates say), follow-up actions kept, edited, removed and added with
 * validated dates, the severity asked (never chosen by the tool), the sign-off, and a
 * signed-off workpaper edited with a reason.
 */
import stdHyperCdf from '@stdlib/stats-base-dists-hypergeometric-cdf';
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { runCli } from '../../src/cli/main.js';
import { SEVERITY_QUESTIONS } from '../../src/control-test/conclude.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, concludeAnswers, fixedClock, plannedTest, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

/** Plan, then type results: A1 deviations at the given items (with the given intent). */
async function recorded(devs: Record<number, 'no' | 'suspected' | 'yes'>) {
  const t = await plannedTest();
  const answers: ScriptAnswers = { 'record.source': 'type', ...FIELDWORK_ANSWERS, 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms' };
  for (const [seq, intent] of Object.entries(devs)) {
    Object.assign(answers, {
      [`record.item.${seq}.A1.result`]: 'deviation',
      [`record.item.${seq}.A1.found`]: `Voucher ${seq} released with one signature`,
      [`record.item.${seq}.A1.cause`]: 'not-performed',
      [`record.item.${seq}.A1.intent`]: intent,
      [`record.item.${seq}.A1.pattern`]: 'isolated',
    });
  }
  await record(['t1.tolrate.json'], captureContext(t.dir), new ScriptedAsker(answers), { now: fixedClock() });
  return t;
}

/** The largest M with HyperCDF(k; N, M, n) > β, from @stdlib (the hypergeometric limit of README, "How the figures are computed"). */
function refLimitCount(k: number, N: number, n: number, beta: number): number {
  let m = k;
  while (m < N && stdHyperCdf(k, N, m + 1, n) > beta) m++;
  return m;
}

describe('tolrate conclude', () => {
  it('shows the figures, asks the severity questions when reliance is not supported, and signs off', async () => {
    const { dir, file } = await recorded({ 3: 'no', 9: 'no', 15: 'no' });
    const answers: ScriptAnswers = {
      ...concludeAnswers(),
      'conclude.compensatingControls': 'Bank payment approval by the treasurer (TR-01), tested separately.',
      'conclude.followUps.1.action': 'keep',
      'conclude.followUps.1.due': ['2026-02-30', '2024-06-30', '2026-02-27'],
      'conclude.followUps.2.action': 'edit',
      'conclude.followUps.2.description': 'Test TR-01 for the whole year.',
      'conclude.followUps.3.action': 'remove',
      'conclude.followUps.add.1': true,
      'conclude.followUps.own.1.kind': 'other',
      'conclude.followUps.own.1.description': 'Walk through the release step again with the finance manager.',
      'conclude.followUps.own.1.owner': '',
      'conclude.followUps.own.1.due': '',
      'conclude.followUps.add.2': false,
      'conclude.severity.classification': ['severe', 'significant-deficiency'],
      'conclude.severity.rationale': ['', 'Three releases with one signature in a key payment control.'],
      'signoff.date': ['2024-12-31', '2026-01-22'],
    };
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(answers);
    expect(await conclude(['t1.tolrate.json'], ctx, asker, { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    const N = 240;
    const n = wp.approach!.sampleSize;
    const ev = wp.evaluation!.attributes.find((a) => a.attributeId === 'A1')!;
    expect([ev.sampleSize, ev.deviations]).toEqual([n, 3]);
    expect(ev.sampleRate).toBeCloseTo(3 / n, 12);
    // Upper limit: M*/N with M* from @stdlib's hypergeometric CDF at β = 5%.
    const mStar = refLimitCount(3, N, n, 0.05);
    expect(ev.deviationsInPopulation).toBe(mStar);
    expect(ev.upperLimit).toBeCloseTo(mStar / N, 12);
    expect(ev.upperLimit).toBeGreaterThan(0.06);
    expect(ev.supportedByRates).toBe(false);
    // Achieved risk at the tolerable rate: HyperCDF(3; 240, ceil(0.06 x 240) = 15, n) (@stdlib).
    expect(ev.achievedRisk).toBeCloseTo(stdHyperCdf(3, N, 15, n), 12);
    const out = ctx.text();
    expect(out).toMatch(new RegExp(`A1\\s+${n}\\s+3\\s+${((3 / n) * 100).toFixed(1)}%`));
    expect(out).toContain('The rates do not support the planned reliance.');
    expect(out).toContain('The tool computes.');
    expect(out).toContain('AU-C 530, ISA 530, AS 2315');

    expect(asker.refusals.map((r) => `${r.id}: ${r.message}`)).toEqual([
      'conclude.followUps.1.due: Due date: 2026-02-30 is not a real calendar date.',
      'conclude.followUps.1.due: Due date: 2024-06-30 is before the start of the period (2025-01-01).',
      'conclude.severity.classification: "severe" is not one of the choices: deficiency, significant-deficiency, material-weakness, none.',
      'conclude.severity.rationale: The rationale must not be empty.',
      'signoff.date: Sign-off date: 2024-12-31 is before the start of the period (2025-01-01).',
    ]);
    const c = wp.conclusion!;
    expect(c.control.supportsReliance).toBe(false);
    expect(c.qualitative.compensatingControls).toMatch(/TR-01/);
    // The proposals in order: extend, compensating control, reduce reliance, communicate, assess severity.
    expect(c.followUps.map((f) => f.kind)).toEqual(['extend-sample', 'test-compensating-control', 'communicate', 'assess-severity', 'other']);
    expect(c.followUps[0]).toMatchObject({ owner: 'Finance manager', due: '2026-02-27', items: ev.extension });
    expect(c.followUps[1]!.description).toBe('Test TR-01 for the whole year.');
    expect(c.followUps[4]).toEqual({ kind: 'other', description: 'Walk through the release step again with the finance manager.' });
    expect(asker.ids.filter((i) => /^conclude\.severity\.q\d$/.test(i))).toHaveLength(SEVERITY_QUESTIONS.length);
    expect(c.severity).toMatchObject({ classification: 'significant-deficiency', rationale: 'Three releases with one signature in a key payment control.' });
    expect(c.severity!.answers.map((a) => a.question)).toEqual([...SEVERITY_QUESTIONS]);
    expect(wp.signoffs).toEqual({ preparer: { name: 'T. Preparer', date: '2026-01-22' } });
    expect(wp.log.slice(-3).map((e) => e.step)).toEqual(['evaluate', 'conclude', 'signoff']);
    expect(wp.log[wp.log.length - 3]!.by).toBe('tolrate');
  });

  it('an intentional deviation escalates even when the rates support reliance', async () => {
    const { dir, file } = await recorded({ 7: 'suspected' });
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker(concludeAnswers());
    await conclude(['t1.tolrate.json'], ctx, asker, { now: fixedClock() });
    const wp = loadWorkpaper(file);
    const ev = wp.evaluation!.attributes.find((a) => a.attributeId === 'A1')!;
    // One deviation in the planned sample: k = k_e, so the rates alone support reliance (README, "How the figures are computed").
    expect(ev.deviations).toBe(1);
    expect(ev.supportedByRates).toBe(true);
    expect(wp.conclusion!.attributes.find((a) => a.attributeId === 'A1')!.supportsReliance).toBe(false);
    expect(wp.conclusion!.qualitative.intentionalFound).toBe(true);
    expect(ctx.text().replace(/\s+/g, ' ')).toContain('An intentional or possibly intentional deviation was recorded: it is escalated whatever the rates say.');
    expect(asker.ids).toContain('conclude.severity.classification');
  });

  it('no deviations: reliance supported, no severity questions; disagreeing needs a reason', async () => {
    const { dir, file } = await recorded({});
    const asker = new ScriptedAsker({ ...concludeAnswers(), 'conclude.attribute.A2.agree': false, 'conclude.attribute.A2.reason': 'The invoices attached were copies, not originals; evidence judged insufficient.' });
    const ctx = captureContext(dir);
    await conclude(['t1.tolrate.json'], ctx, asker, { now: fixedClock() });
    const c = loadWorkpaper(file).conclusion!;
    expect(c.attributes.find((a) => a.attributeId === 'A1')!.supportsReliance).toBe(true);
    expect(c.attributes.find((a) => a.attributeId === 'A2')).toMatchObject({ supportsReliance: false });
    expect(c.attributes.find((a) => a.attributeId === 'A2')!.reasoning).toMatch(/The practitioner concluded otherwise: The invoices attached were copies/);
    expect(c.control.supportsReliance).toBe(false);
    // Not supported by the practitioner's own conclusion: the severity questions follow.
    expect(asker.ids).toContain('conclude.severity.q1');
  });

  it('editing a signed-off workpaper asks why, records it, and needs a new sign-off', async () => {
    const { dir, file } = await recorded({});
    await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers()), { now: fixedClock() });
    expect(loadWorkpaper(file).signoffs?.preparer).toBeDefined();
    const again = new ScriptedAsker({
      ...concludeAnswers(),
      'conclude.again': true,
      'edit.reason': ['', 'Reviewer asked for the compensating control to be named.'],
      'conclude.compensatingControls': 'TR-01 bank release approval.',
      'signoff.date': '2026-01-25',
    });
    const ctx = captureContext(dir);
    await conclude(['t1.tolrate.json'], ctx, again, { now: fixedClock() });
    expect(ctx.text()).toContain('This workpaper was signed off by T. Preparer on 2026-01-21.');
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    const entry = wp.log.find((e) => e.step === 'conclude' && e.reason);
    expect(entry!.reason).toBe('Edited after sign-off: Reviewer asked for the compensating control to be named.');
    expect(entry!.changes.some((c) => c.path[0] === 'signoffs' && c.deleted)).toBe(true);
    expect(wp.signoffs).toEqual({ preparer: { name: 'T. Preparer', date: '2026-01-25' } });
    expect(wp.conclusion!.qualitative.compensatingControls).toBe('TR-01 bank release approval.');
  });

  it('refuses to conclude before every item has a result', async () => {
    const { dir } = await plannedTest();
    const ctx = captureContext(dir);
    expect(await runCli(['conclude', 't1.tolrate.json'], { ...ctx, isTTY: true })).toBe(2);
    expect(ctx.err.join('')).toMatch(/The test cannot be concluded yet \(\d+ of \d+ items have no result yet\)/);
    expect(ctx.err.join('')).toContain('tolrate record t1.tolrate.json');
  });
});
