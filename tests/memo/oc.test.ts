/**
 * The memo's appendix of the operating characteristic, on request (`memo --oc`): one column per
 * attribute, its height at the tolerable rate is the plan's risk of overreliance and at the
 * expected rate one minus the risk of underreliance (those risks are checked against exact
 * rational arithmetic in tests/reference/plan-risks.test.ts); re-performance re-renders it.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { readMemoBlocks } from '../../src/memo/read.js';
import { acceptanceNumber, overrelianceRisk, underrelianceRisk } from '../../src/stats/index.js';
import { pct } from '../../src/util/format.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

describe('memo --oc', () => {
  it('adds Appendix D whose figures agree with the plan risks, and re-performs', async () => {
    const cwd = tempDir('tolrate-oc-');
    expect(await runCli(['demo', '--out', 'o'], captureContext(cwd, false))).toBe(0);
    const dir = join(cwd, 'o');
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', 'supplier-invoice-approval.tolrate.json', '--oc', '--out', 'oc.docx'], ctx)).toBe(0);
    const blocks = await readMemoBlocks(readFileSync(join(dir, 'oc.docx')));
    const i = blocks.findIndex((b) => b.kind === 'paragraph' && b.text === 'Appendix D — Operating characteristic');
    expect(i).toBeGreaterThan(0);
    const table = blocks.slice(i).find((b) => b.kind === 'table') as { rows: string[][] };
    // A1: n = 77, 6% tolerable, N = 3,412 (the demo's plan).
    const N = 3412;
    const c = acceptanceNumber({ sampleSize: 77, tolerableRate: 0.06, confidence: 0.95, populationSize: N, model: 'hypergeometric' })!;
    expect(table.rows[0]![1]).toBe(`A1 (n = 77, c = ${c})`);
    const at6 = table.rows.find((r) => r[0] === '6.0%')!;
    expect(at6[1]).toBe(pct(overrelianceRisk({ sampleSize: 77, deviations: c, tolerableRate: 0.06, populationSize: N, model: 'hypergeometric' })));
    // At 1%: ⌈1% × 3,412⌉ = 35 deviations in the population (the OC's count), so the chance of
    // reliance is the risk function at that rate; the risk of underreliance counts ⌊1% × N⌋ = 34.
    const at1 = table.rows.find((r) => r[0] === '1.0%')!;
    expect(at1[1]).toBe(pct(overrelianceRisk({ sampleSize: 77, deviations: c, tolerableRate: 0.01, populationSize: N, model: 'hypergeometric' })));
    const under = underrelianceRisk({ sampleSize: 77, acceptanceNumber: c, expectedRate: 0.01, populationSize: N, model: 'hypergeometric' });
    expect(Math.abs(1 - under - Number(at1[1]!.replace('%', '')) / 100)).toBeLessThan(0.01);
    const r = captureContext(dir, false);
    expect(await runCli(['reperform', 'supplier-invoice-approval.tolrate.json', '--memo', 'oc.docx'], r)).toBe(0);
  });
});
