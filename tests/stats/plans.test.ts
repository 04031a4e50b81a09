/**
 * Properties and input checks of the plan functions (two-stage plans, underreliance, both-risk
 * planning, extensions, the combined limit, the decision helper) and of the fast size search.
 * Reference values are in tests/reference/plan-risks.test.ts; these checks compare the engine
 * with itself under definitions that must hold (e.g. the fast path equals the plain scan).
 */
import { describe, expect, it } from 'vitest';
import { SamplingInputError } from '../../src/errors.js';
import {
  acceptanceNumber,
  combinedUpperLimit,
  decision,
  extensionRisk,
  extensionSize,
  limitDecision,
  operatingCharacteristic,
  overrelianceRisk,
  planForBothRisks,
  planRisks,
  sampleSize,
  tolerableDeviations,
  twoStagePlan,
  underrelianceRisk,
  upperLimit,
} from '../../src/stats/index.js';
import { riskFunction } from '../../src/stats/risk-function.js';
import { smallestSampleSize } from '../../src/stats/smallest-sample-size.js';

describe('tolerable count and size search', () => {
  it('⌈TDR × N⌉ exactly at very large N: 884,590,000 × 7% = 61,921,300 (decimal arithmetic; 0.07 × 884590000 is 61921300.000000007 in binary)', () => {
    expect(0.07 * 884590000).toBeGreaterThan(61921300);
    expect(tolerableDeviations(884590000, 0.07)).toBe(61921300);
  });

  it('the fast path (Berry–Esseen skip, exact walk) returns exactly what the plain run scan returns', () => {
    for (const N of [10_000_000, 100_000_000]) {
      for (const [c, T, E] of [[0.95, 0.1, 0.099], [0.9, 0.06, 0.059], [0.95, 0.5, 0.495], [0.8, 0.02, 0.0198]] as const) {
        const M = tolerableDeviations(N, T);
        const risk = riskFunction('hypergeometric', T, N);
        const fast = smallestSampleSize(risk, E, 1 - c, N, M, { kind: 'hypergeometric', N, M });
        const plain = smallestSampleSize(risk, E, 1 - c, N, M);
        expect(fast, `${N} ${c} ${T} ${E}`).toEqual(plain);
        expect(fast!.sampleSize).toBeGreaterThan(20_000); // the fast path was taken (more than 2,000 runs)
      }
    }
  });

  it('95% / 10% / 9.99% at N = 1e9 gives a size whose risk passes and whose predecessor fails', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.1, expectedRate: 0.0999, populationSize: 1e9 });
    expect(r.achievedRisk).toBeLessThanOrEqual(0.05 * (1 + 1e-12));
    const k1 = Math.ceil((r.sampleSize - 1) * 0.0999 - 1e-9);
    expect(overrelianceRisk({ sampleSize: r.sampleSize - 1, deviations: k1, tolerableRate: 0.1, populationSize: 1e9 })).toBeGreaterThan(0.05);
    expect(r.sizeRemark).toMatch(/common practice/);
  });

  it('the size result carries the acceptance number (≥ k_e) and its risk of underreliance', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 });
    expect(r.acceptanceNumber).toBe(1);
    expect(r.underrelianceRisk).toBeCloseTo(underrelianceRisk({ sampleSize: 78, acceptanceNumber: 1, expectedRate: 0.01 }), 15);
    expect(r.sizeRemark).toBeUndefined();
    expect(acceptanceNumber({ sampleSize: 78, tolerableRate: 0.06, confidence: 0.95 })).toBe(1);
    expect(acceptanceNumber({ sampleSize: 10, tolerableRate: 0.06, confidence: 0.95 })).toBeNull();
  });
});

describe('two-stage plans', () => {
  it.each<[{ confidence: number; tolerableRate: number; expectedRate: number; populationSize?: number }]>([
    [{ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 }],
    [{ confidence: 0.9, tolerableRate: 0.05, expectedRate: 0.005 }],
    [{ confidence: 0.95, tolerableRate: 0.08, expectedRate: 0.02, populationSize: 900 }],
  ])('%j: within β, no worse underreliance than one stage, fewer items on average', (o) => {
    const r = twoStagePlan(o);
    expect(r.overrelianceRisk).toBeLessThanOrEqual((1 - o.confidence) * (1 + 1e-12));
    expect(r.underrelianceRisk).toBeLessThanOrEqual(r.singleStage.underrelianceRisk * (1 + 1e-12));
    expect(r.averageSampleNumber).toBeLessThan(r.singleStage.sampleSize);
    const again = planRisks({ plan: r.plan, tolerableRate: o.tolerableRate, expectedRate: o.expectedRate, ...(o.populationSize ? { populationSize: o.populationSize } : {}) });
    expect(again.overrelianceRisk).toBe(r.overrelianceRisk);
    // One item fewer in the second stage breaks the risk of overreliance (n2 is the smallest that works).
    if (r.plan.secondSampleSize > 1) {
      const fewer = { ...r.plan, secondSampleSize: r.plan.secondSampleSize - 1 };
      const p = planRisks({ plan: fewer, tolerableRate: o.tolerableRate, expectedRate: o.expectedRate, ...(o.populationSize ? { populationSize: o.populationSize } : {}) });
      expect(p.overrelianceRisk).toBeGreaterThan(1 - o.confidence);
    }
  });

  it('the operating characteristic falls as the true rate rises, from 1 at 0%', () => {
    const r = twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 });
    const oc = operatingCharacteristic({ plan: r.plan });
    expect(oc[0]).toMatchObject({ rate: 0, acceptanceProbability: 1, averageSampleNumber: r.plan.firstSampleSize });
    for (let i = 1; i < oc.length; i++) expect(oc[i]!.acceptanceProbability).toBeLessThanOrEqual(oc[i - 1]!.acceptanceProbability);
    const at6 = operatingCharacteristic({ plan: r.plan, rates: [0.06] })[0]!;
    expect(at6.acceptanceProbability).toBe(r.overrelianceRisk);
  });

  it('bad plans and options are refused naming the parameter', () => {
    const bad = (f: () => unknown, param: string) => {
      try {
        f();
        expect.unreachable();
      } catch (e) {
        expect(e).toBeInstanceOf(SamplingInputError);
        expect((e as SamplingInputError).parameter).toBe(param);
      }
    };
    const plan = { firstSampleSize: 50, firstAcceptanceNumber: 0, firstRejectionNumber: 2, secondSampleSize: 30, secondAcceptanceNumber: 1 };
    bad(() => planRisks({ plan: { ...plan, firstRejectionNumber: 1 }, tolerableRate: 0.06, expectedRate: 0.01 }), 'plan.firstRejectionNumber');
    bad(() => planRisks({ plan: { ...plan, secondAcceptanceNumber: 0 }, tolerableRate: 0.06, expectedRate: 0.01 }), 'plan.secondAcceptanceNumber');
    bad(() => planRisks({ plan: { ...plan, secondSampleSize: 0 }, tolerableRate: 0.06, expectedRate: 0.01 }), 'plan.secondSampleSize');
    bad(() => planRisks({ plan, tolerableRate: 0.06, expectedRate: 0.01, populationSize: 60 }), 'plan.secondSampleSize');
    bad(() => planRisks({ plan, tolerableRate: 6, expectedRate: 0.01 }), 'tolerableRate');
    bad(() => operatingCharacteristic({ plan, rates: [0.1, 2] }), 'rates[1]');
    bad(() => twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.07 }), 'expectedRate');
    bad(() => planForBothRisks({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, underrelianceRisk: 0 }), 'underrelianceRisk');
    bad(() => underrelianceRisk({ sampleSize: 10, acceptanceNumber: 11, expectedRate: 0.01 }), 'acceptanceNumber');
    bad(() => combinedUpperLimit({ parts: [], confidence: 0.95 }), 'parts');
    bad(() => combinedUpperLimit({ parts: [{ populationSize: 10, sampleSize: 20, deviations: 0 }], confidence: 0.95 }), 'parts[0].sampleSize');
    bad(() => combinedUpperLimit({ parts: [{ populationSize: 100, sampleSize: 20, deviations: 21 }], confidence: 0.95 }), 'parts[0].deviations');
  });
});

describe('planning for both risks', () => {
  it('is the smallest n: no smaller sample meets both risks with any acceptance number', () => {
    const r = planForBothRisks({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, underrelianceRisk: 0.1 });
    for (let n = 1; n < r.sampleSize; n++) {
      for (let c = 0; c < n; c++) {
        const over = overrelianceRisk({ sampleSize: n, deviations: c, tolerableRate: 0.06 });
        if (over > 0.05 * (1 + 1e-12)) break;
        expect(underrelianceRisk({ sampleSize: n, acceptanceNumber: c, expectedRate: 0.01 })).toBeGreaterThan(0.1);
      }
    }
  });
});

describe('extensions', () => {
  it('never beyond the untested remainder of a known population, with the binomial model too; none when k = n', () => {
    expect(() => extensionSize({ sampleSize: 80, deviations: 2, tolerableRate: 0.06, confidence: 0.95, populationSize: 100, model: 'binomial' })).toThrow(/20 untested/);
    expect(() => extensionSize({ sampleSize: 59, deviations: 59, tolerableRate: 0.05, confidence: 0.95 })).toThrow(/every item tested deviated/);
    const r = extensionRisk({ sampleSize: 59, deviations: 59, tolerableRate: 0.05, confidence: 0.95 });
    expect(r.extensionSize).toBeNull();
    expect(r.note).toMatch(/every item tested deviated/);
  });

  it('the procedure risks are above the planned risk, and repeating extensions raises them further', () => {
    const r = extensionRisk({ sampleSize: 78, deviations: 2, tolerableRate: 0.06, confidence: 0.95 });
    expect(r.extensionSize).toBe(25);
    expect(r.singleStageFigure!).toBeLessThanOrEqual(0.05);
    expect(r.procedureRisk).toBeGreaterThan(r.plannedRisk);
    expect(r.repeatedProcedureRisk).toBeGreaterThan(r.procedureRisk);
  });
});

describe('combined limit and the decision helper', () => {
  it('one part: the combined limit is the hypergeometric limit, over a grid', () => {
    for (const [N, n, k] of [[1000, 88, 1], [800, 78, 2], [300, 40, 0], [5000, 120, 4]] as const) {
      for (const confidence of [0.9, 0.95]) {
        const c = combinedUpperLimit({ parts: [{ populationSize: N, sampleSize: n, deviations: k }], confidence });
        expect(c.deviationsInPopulation).toBe(upperLimit({ sampleSize: n, deviations: k, confidence, populationSize: N }).deviationsInPopulation);
      }
    }
  });

  it('with a tolerable rate, says whether the whole population\'s limit is below the tolerable count', () => {
    const c = combinedUpperLimit({ parts: [{ populationSize: 600, sampleSize: 40, deviations: 1 }, { populationSize: 400, sampleSize: 30, deviations: 0 }], confidence: 0.95, tolerableRate: 0.07 });
    expect(c.deviationsInPopulation).toBe(66); // tests/reference/plan-risks.json (brute force, exact rationals)
    expect(c.supported).toBe(true); // 66 < ⌈7% × 1,000⌉ = 70
  });

  it('limitDecision agrees with the risk decision everywhere on a grid, and words the hypergeometric rule as "below"', () => {
    for (const populationSize of [undefined, 500, 1000]) {
      for (const n of [40, 59, 88, 120]) {
        for (let k = 0; k <= 4; k++) {
          for (const t of [0.04, 0.05, 0.06]) {
            const o = { sampleSize: n, deviations: k, confidence: 0.95, tolerableRate: t, ...(populationSize ? { populationSize } : {}) };
            const d = limitDecision(o);
            expect(d.supported).toBe(decision({ achievedRisk: overrelianceRisk(o), confidence: 0.95 }).supported);
            if (populationSize) expect(d.supported).toBe(d.relation === 'below');
            else expect(d.supported).toBe(d.relation !== 'above');
          }
        }
      }
    }
    expect(limitDecision({ sampleSize: 88, deviations: 1, confidence: 0.95, tolerableRate: 0.05, populationSize: 1000 })).toMatchObject({ supported: false, rule: 'below', relation: 'equal', upperLimit: 0.05 });
  });
});

describe('two-stage search bounds', () => {
  it('refuses with a reason where a second stage cannot help or the search would be far beyond tests of controls', () => {
    expect(() => twoStagePlan({ confidence: 0.95, tolerableRate: 0.05, expectedRate: 0 })).toThrow(/expected rate of 0% a second stage is never expected/);
    expect(() => twoStagePlan({ confidence: 0.95, tolerableRate: 0.1, expectedRate: 0.08 })).toThrow(/allows at most 20 deviations/);
    expect(() => twoStagePlan({ confidence: 0.9, tolerableRate: 0.02, expectedRate: 0.015 })).toThrow(/1,463 items/);
  });
});
