/**
 * Simulation of a two-stage plan through the selection and the evaluation: both stages drawn up
 * front by random-v1 (the first n1 draws stage 1, the next n2 stage 2), the second stage looked at
 * only when the first is inconclusive, and the plan's decision. At the tolerable rate the share
 * of runs that rely on the control must not exceed the declared risk of overreliance; at the
 * expected rate the share that need the second stage and the share that do not rely are the
 * declared ones. Fixed seeds ("sim-1", "sim-2", ...), so the run is the same every time.
 *
 * The declared figures are the engine's (twoStagePlan / planRisks), which are checked against
 * the exact rational table tests/reference/plan-risks.json elsewhere; here the question is
 * whether the selection and the decision rule deliver them. 20,000 runs: a proportion near 5% has
 * a standard error of about 0.15 percentage points; each check allows 4 standard errors.
 * A hundred runs also go through the real worklist and evaluation, which must give the same
 * decision as the rule.
 */
import { describe, expect, it } from 'vitest';
import { planRisks, twoStagePlan } from '../../src/stats/index.js';
import { selectRandom, stageOfDraw } from '../../src/selection/index.js';
import { evaluate, stageDecision, worklist } from '../../src/control-test/index.js';
import type { Workpaper } from '../../src/workpaper/schema.js';

const N = 2000;
const RUNS = 20_000;
const found = twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, model: 'hypergeometric', populationSize: N });
const plan = found.plan;
const n = plan.firstSampleSize + plan.secondSampleSize;

/** One run: the positions drawn, with M deviations in the population (rows 0..M−1: the draw is random, so where they sit does not matter). */
function run(seed: string, M: number) {
  const sel = selectRandom({ populationSize: N, sampleSize: n, seed });
  let k1 = 0;
  let k2 = 0;
  sel.positions.forEach((p, i) => {
    if (p >= M) return;
    if (stageOfDraw(i, plan.firstSampleSize) === 1) k1++;
    else k2++;
  });
  const first = stageDecision(plan, k1);
  const decision = first === 'second-stage-needed' ? stageDecision(plan, k1, k2) : first;
  return { sel, k1, k2, decision, second: first === 'second-stage-needed' };
}

function share(M: number) {
  let accepted = 0;
  let second = 0;
  for (let i = 1; i <= RUNS; i++) {
    const r = run(`sim-${i}`, M);
    if (r.decision === 'accepted-at-first' || r.decision === 'accepted-at-second') accepted++;
    if (r.second) second++;
  }
  return { accepted: accepted / RUNS, second: second / RUNS };
}

const se = (p: number) => Math.sqrt((p * (1 - p)) / RUNS);

describe('two-stage plan through selection and evaluation (simulation)', () => {
  it('does not rely on the control more often than the declared risk at the tolerable rate', () => {
    // ⌈6% × 2,000⌉ = 120 deviations: the tolerable count of the hypergeometric model.
    const declared = found.overrelianceRisk;
    const got = share(120);
    expect(got.accepted).toBeLessThanOrEqual(declared + 4 * se(declared));
    expect(Math.abs(got.accepted - declared)).toBeLessThan(4 * se(declared));
  });

  it('needs the second stage, and fails to rely, as often as declared at the expected rate', () => {
    // ⌊1% × 2,000⌋ = 20 deviations.
    const r = planRisks({ plan, tolerableRate: 0.06, expectedRate: 0.01, model: 'hypergeometric', populationSize: N });
    const got = share(20);
    expect(Math.abs(got.second - r.secondStageProbability)).toBeLessThan(4 * se(r.secondStageProbability));
    expect(Math.abs(1 - got.accepted - r.underrelianceRisk)).toBeLessThan(4 * se(r.underrelianceRisk));
  });

  it('gives through the worklist and the evaluation the decision of the rule', () => {
    let checked = 0;
    for (let i = 1; checked < 100; i++) {
      const r = run(`sim-${i}`, 120);
      const items = r.sel.positions.map((p, j) => ({
        seq: j + 1,
        role: 'sample' as const,
        position: p,
        row: p + 2,
        key: `K${p}`,
        values: {},
        stage: stageOfDraw(j, plan.firstSampleSize),
      }));
      const result = (p: number) => (p < 120 ? { result: 'deviation' as const, found: 'x', cause: 'other' as const, causeDetail: 'x', intentional: 'no' as const, pattern: 'isolated' as const } : { result: 'conforms' as const });
      const wp = {
        attributes: [{ id: 'A1', description: 'a', deviationDefinition: 'd' }],
        population: { fingerprint: { rowCount: N } },
        approach: { kind: 'statistical', confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, model: 'hypergeometric', sizes: [], sampleSize: n, rationale: 'r', plan: { kind: 'two-stage', ...plan, overrelianceRisk: 0, underrelianceRisk: 0, averageSampleNumber: 0, secondStageProbability: 0, allowedUnderrelianceRisk: 0 } },
        selection: { method: 'random', algorithm: 'random-v1', sampleSize: n, spares: 0, items, selectedAt: '2026-01-01T00:00:00.000Z' },
        results: { source: 'interview', items: [] as unknown[], recordedAt: '2026-01-01T00:00:00.000Z' },
      } as unknown as Workpaper;
      // Record what the worklist asks for, stage by stage, as the interview does.
      for (;;) {
        const next = worklist(wp).next;
        if (!next) break;
        (wp.results!.items as unknown[]).push({ key: next.item.key, seq: next.item.seq, attributes: { A1: result(next.item.position) } });
      }
      const ev = evaluate(wp).attributes[0]!;
      expect(ev.stage!.decision).toBe(r.decision);
      expect(wp.results!.items.length).toBe(r.second ? n : plan.firstSampleSize);
      checked++;
    }
  });
});
