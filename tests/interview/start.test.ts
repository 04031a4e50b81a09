/**
 * The start screen (`tolrate` with no command): a new test, continuing a workpaper file in the
 * folder, and the calculators, all through the scripted answerer.
 */
import stdBetaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { runWith as start } from '../../src/commands/start/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

describe('tolrate (start screen)', () => {
  it('starts a new test, stops before recording, and continues it from the folder\'s list', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const a1 = new ScriptedAsker({ 'start.action': 'new', 'start.file': ['', 'payments'], ...planAnswers(total), 'record.source': 'later' });
    const ctx = captureContext(dir);
    expect(await start([], ctx, a1, { now: fixedClock() })).toBe(0);
    expect(a1.refusals[0]!.message).toBe('The file name must not be empty.');
    expect(ctx.text()).toContain('Test the items, then record the results with: tolrate record payments.tolrate.json');
    const planned = loadWorkpaper(join(dir, 'payments.tolrate.json'));
    expect(planned.selection).toBeDefined();
    expect(planned.results).toBeUndefined();

    const a2 = new ScriptedAsker({
      'start.action': 'continue',
      'start.continue.file': 'payments.tolrate.json',
      'record.source': 'type', ...FIELDWORK_ANSWERS,
      'record.item.*.A1.result': 'conforms',
      'record.item.*.A2.result': 'conforms',
      ...concludeAnswers(),
    });
    const ctx2 = captureContext(dir);
    expect(await start([], ctx2, a2, { now: fixedClock() })).toBe(0);
    expect(a2.ids.filter((i) => i.startsWith('plan.'))).toEqual([]);
    const wp = loadWorkpaper(join(dir, 'payments.tolrate.json'));
    expect(wp.conclusion!.control.supportsReliance).toBe(true);
    expect(wp.signoffs!.preparer!.name).toBe('T. Preparer');
    expect(ctx2.text()).toContain('The reviewer reviews it with: tolrate review payments.tolrate.json');
  });

  it('the calculators ask their inputs with the same checks and print the calculator\'s table', async () => {
    const dir = tempDir();
    const size = new ScriptedAsker({
      'start.action': 'calculator',
      'start.calculator': 'size',
      'start.size.confidence': '95',
      'start.size.tolerable': '6',
      'start.size.expected': ['6', '1'],
      'start.size.population': '',
    });
    const ctx = captureContext(dir, false);
    expect(await start([], ctx, size)).toBe(0);
    expect(size.refusals[0]!.message).toBe('Expected rate: 6% must be below the tolerable rate (6%).');
    // 95% / 6% / 1% -> 78 (AICPA Audit Sampling guide's attribute tables; from memory).
    expect(ctx.text()).toContain('Sample size: 78');

    const limit = new ScriptedAsker({
      'start.action': 'calculator',
      'start.calculator': 'limit',
      'start.limit.confidence': '95',
      'start.limit.sample': '78',
      'start.limit.deviations': ['79', '2'],
      'start.limit.tolerable': '6',
      'start.limit.population': '',
    });
    const ctx2 = captureContext(dir, false);
    expect(await start([], ctx2, limit)).toBe(0);
    expect(limit.refusals[0]!.message).toBe('Deviations: 79 is more than the items tested (78).');
    // Clopper–Pearson limit BetaInv(0.95; 3, 76) from @stdlib's beta quantile, shown rounded up to 0.1%.
    const ref = stdBetaQuantile(0.95, 3, 76);
    expect(ctx2.text()).toContain(`Upper deviation limit: ${(Math.ceil(ref * 1000) / 10).toFixed(1)}%`);
  });

  it('`tolrate FILE.tolrate.json` continues that workpaper; without a terminal it says how to run it', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const a1 = new ScriptedAsker({ 'start.action': 'new', 'start.file': 'payments', ...planAnswers(total), 'record.source': 'later' });
    expect(await start([], captureContext(dir), a1, { now: fixedClock() })).toBe(0);
    const a2 = new ScriptedAsker({ 'record.source': 'later' });
    const ctx = captureContext(dir);
    expect(await start(['payments.tolrate.json'], ctx, a2, { now: fixedClock() })).toBe(0);
    expect(a2.ids.some((i) => i.startsWith('start.action'))).toBe(false);
    expect(a2.ids.filter((i) => i.startsWith('plan.'))).toEqual([]);

    const noTty = captureContext(dir, false);
    expect(await runCli(['payments.tolrate.json'], noTty)).toBe(2);
    expect(noTty.err.join('')).toMatch(/needs a terminal/);
  });
});
