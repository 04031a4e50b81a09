/** `tolrate demo --engagement`, `tolrate status --help` and `tolrate summary --help` through the CLI. */
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { readMemoBlocks } from '../../src/memo/read.js';
import { stateHash } from '../../src/workpaper/log.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

const require = createRequire(import.meta.url);
/** P(X ≤ x) for x deviations in n drawn from N holding K (@stdlib/stats-base-dists-hypergeometric-cdf). */
const hyperCdf = require('@stdlib/stats-base-dists-hypergeometric-cdf') as (x: number, N: number, K: number, n: number) => number;
const hyperPmf = (x: number, N: number, K: number, n: number) => hyperCdf(x, N, K, n) - (x > 0 ? hyperCdf(x - 1, N, K, n) : 0);

describe('tolrate demo --engagement', () => {
  it('builds the folder, prints its status and writes its summary; the carried-forward test names its prior-year file', async () => {
    const dir = tempDir();
    const ctx = captureContext(dir, false);
    expect(await runCli(['demo', '--engagement', '--out', 'eng'], ctx)).toBe(0);
    const out = ctx.text();
    expect(out).toContain('$ tolrate status eng --as-of 2026-02-15');
    expect(out).toContain('4 workpaper(s), 1 complete, 3 unfinished, 0 cannot be read');
    expect(out).toContain('Summary of 4 workpaper(s): 3 concluded, 1 in progress');
    for (const f of ['tolrate-engagement.json', 'engagement-summary.docx', 'engagement-summary.xlsx', 'supplier-invoice-approval.memo.docx', 'pay-data-changes.memo.docx']) expect(existsSync(join(dir, 'eng', f))).toBe(true);
    const cf = loadWorkpaper(join(dir, 'eng', 'manual-journal-support.tolrate.json'));
    const prior = loadWorkpaper(join(dir, 'eng', cf.carriedForward!.path));
    expect(cf.carriedForward!.stateHash).toBe(stateHash(prior));
    expect(cf.control).toEqual(prior.control);
    expect(cf.engagement!.periodEnd).toBe('2025-12-31');
    // This year's GL-04 is planned as a two-stage plan (n1 53, c1 0, r1 2, n2 17, c2 1 on 318
    // journals). Its risk of overreliance at ⌈6% × 318⌉ = 20 deviations, the second stage drawn
    // from the 265 journals left: P(X1 = 0) + P(X1 = 1)·P(X2 = 0), computed here with
    // @stdlib/stats-base-dists-hypergeometric-cdf.
    const plan = cf.approach!.plan!;
    expect(plan.kind).toBe('two-stage');
    if (plan.kind === 'two-stage') {
      const { firstSampleSize: n1, secondSampleSize: n2 } = plan;
      expect([n1, plan.firstAcceptanceNumber, plan.firstRejectionNumber, n2, plan.secondAcceptanceNumber]).toEqual([53, 0, 2, 17, 1]);
      expect(plan.overrelianceRisk).toBeCloseTo(hyperCdf(0, 318, 20, n1) + hyperPmf(1, 318, 20, n1) * hyperCdf(0, 318 - n1, 19, n2), 12);
      expect(plan.overrelianceRisk).toBeLessThanOrEqual(0.05);
    }
    expect(prior.engagement!.periodEnd).toBe('2024-12-31');
    // Both scenarios take the engagement from the folder file.
    for (const f of ['supplier-invoice-approval', 'manual-journal-approval', 'pay-data-changes']) expect(loadWorkpaper(join(dir, 'eng', `${f}.tolrate.json`)).engagement!.entity).toBe('Brackenmoor Kilnworks Ltd');
    // The test done in two parts: 1 deviation in the interim part, none in the roll-forward part.
    const pay = loadWorkpaper(join(dir, 'eng', 'pay-data-changes.tolrate.json'));
    expect(pay.rollForward).toMatchObject({ interimDate: '2025-09-30', periodStart: '2025-10-01', periodEnd: '2025-12-31' });
    const a1 = pay.evaluation!.attributes.find((a) => a.attributeId === 'A1')!;
    expect(a1.parts!.map((p) => [p.part, p.populationSize, p.sampleSize, p.deviations])).toEqual([
      ['interim', 1164, 76, 1],
      ['roll-forward', 412, 71, 0],
    ]);
    expect(pay.results!.items.every((r) => r.testedBy && r.testedOn && r.evidence?.length)).toBe(true);
    expect(pay.rollForward!.results!.items.every((r) => r.testedBy === 'E. Marchetti' && r.testedOn === '2026-01-19' && r.evidence?.length)).toBe(true);
    // Each part's upper limit (in deviations) is the largest count D whose chance of showing no more
    // deviations than found is still above 5%; the whole period's is the same over both parts, at the
    // allocation of D between them that makes that chance largest. Computed here with
    // @stdlib/stats-base-dists-hypergeometric-cdf (the pmf as differences of its CDF).
    const [pi, pr] = a1.parts!;
    expect(pi!.deviationsInPopulation).toBe(69);
    expect(hyperCdf(1, 1164, 69, 76)).toBeGreaterThan(0.05);
    expect(hyperCdf(1, 1164, 70, 76)).toBeLessThanOrEqual(0.05);
    expect(pr!.deviationsInPopulation).toBe(15);
    expect(hyperCdf(0, 412, 15, 71)).toBeGreaterThan(0.05);
    expect(hyperCdf(0, 412, 16, 71)).toBeLessThanOrEqual(0.05);
    const worst = (d: number) => {
      let most = 0;
      for (let d1 = Math.max(0, d - 412); d1 <= Math.min(d, 1164); d1++) {
        const d2 = d - d1;
        const p = hyperPmf(0, 1164, d1, 76) * hyperCdf(1, 412, d2, 71) + hyperPmf(1, 1164, d1, 76) * hyperPmf(0, 412, d2, 71);
        most = Math.max(most, p);
      }
      return most;
    };
    expect(a1.combined!.deviationsInPopulation).toBe(69);
    expect(worst(69)).toBeGreaterThan(0.05);
    expect(worst(70)).toBeLessThanOrEqual(0.05);
    expect(a1.upperLimit).toBeCloseTo(69 / 1576, 12);
    // 69 is below ⌈6% × 1,576⌉ = 95: supported for the whole period, though the conservative
    // bound beside it (99 deviations, 6.3%) is not below 6%.
    expect(a1.supportedByRates).toBe(true);
    expect(a1.combined!.conservativeDeviations).toBe(99);
    expect(out).toContain('statistical, 76 items to the interim date 2025-09-30 + 71 roll-forward items');
    expect(out).toContain('A1  1 deviation(s) in 147 tested, upper limit 4.4% against 6% tolerable; supports reliance');
    expect(readFileSync(join(dir, 'eng', 'pay-data-changes.filled.csv'), 'utf8')).toContain('performed-late');

    // The memo's table by part: each part's own limit shown so that it is not read as equal to the
    // tolerable rate (69 of 1,164 = 5.93%, below 6%), with its count; the whole period beside it.
    const blocks = await readMemoBlocks(readFileSync(join(dir, 'eng', 'pay-data-changes.memo.docx')));
    const rows = blocks.flatMap((b) => (b.kind === 'table' ? b.rows.map((r) => r.join(' | ')) : []));
    expect(rows).toContain('A1 | Interim | 1,164 | 76 | 1 | 1.3% | 5.93% (69) |  | ');
    expect(rows.some((r) => r.startsWith('A1 | Whole period | 1,576 | 147 | 1 | 0.7% | 4.4% (69) | 6.3% (99) | Supports reliance'))).toBe(true);
    // A reviewer re-performs both parts and the memo: everything agrees.
    const rp = captureContext(join(dir, 'eng'), false);
    expect(await runCli(['reperform', 'pay-data-changes.tolrate.json', '--memo', 'pay-data-changes.memo.docx'], rp), rp.text()).toBe(0);
    expect(rp.text()).toContain('Everything re-derived agrees with the workpaper.');
  }, 180_000);

  it('refuses --engagement with --scenario (exit 2)', async () => {
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['demo', '--engagement', '--scenario', 'small'], ctx)).toBe(2);
  });

  it('status and summary have help texts and are in the command list', async () => {
    for (const c of ['status', 'summary']) {
      const ctx = captureContext(tempDir(), false);
      expect(await runCli([c, '--help'], ctx)).toBe(0);
      expect(ctx.text()).toContain(`Usage: tolrate ${c} [DIR]`);
    }
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['--help'], ctx)).toBe(0);
    expect(ctx.text()).toMatch(/status\s+Where every test of an engagement folder stands/);
    expect(ctx.text()).toMatch(/summary\s+Write the engagement summary/);
  });

  it('a folder that is not there is bad input (exit 2)', async () => {
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['status', 'no-such-folder'], ctx)).toBe(2);
    expect(await runCli(['summary', 'no-such-folder'], ctx)).toBe(2);
    expect(await runCli(['status', '.', '--as-of', '15/02/2026'], ctx)).toBe(2);
  });
});
