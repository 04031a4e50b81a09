/**
 * Simulation: the declared risk of overreliance of a planned two-stage plan is not exceeded, and
 * the extension procedure's computed risk is what really happens (well above the planned 5%).
 * Seeded (mulberry32, a 32-bit generator of T. Ettinger, public domain; fixed seeds), 200,000
 * runs each, so a binomial proportion near 5% has a standard error of about 0.05 percentage points;
 * each check allows 4 standard errors. The expected values come from the engine and, for the
 * same plans, from the exact rational table tests/reference/plan-risks.json.
 */
import { describe, expect, it } from 'vitest';
import { extensionRisk, extensionSize, twoStagePlan, type TwoStagePlan } from '../../src/stats/index.js';

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const RUNS = 200_000;
const se = (p: number): number => Math.sqrt((p * (1 - p)) / RUNS);

/** Deviations in n draws: independent (binomial) or without replacement from a pool. */
function drawer(rand: () => number, rate: number, N?: number, M?: number) {
  let left = N ?? 0;
  let bad = M ?? 0;
  return {
    reset(): void {
      left = N ?? 0;
      bad = M ?? 0;
    },
    draw(n: number): number {
      let x = 0;
      for (let i = 0; i < n; i++) {
        if (N === undefined) {
          if (rand() < rate) x++;
        } else {
          if (rand() * left < bad) {
            x++;
            bad--;
          }
          left--;
        }
      }
      return x;
    },
  };
}

function simulatePlan(plan: TwoStagePlan, rand: () => number, rate: number, N?: number, M?: number): number {
  const d = drawer(rand, rate, N, M);
  let accepted = 0;
  for (let r = 0; r < RUNS; r++) {
    d.reset();
    const x1 = d.draw(plan.firstSampleSize);
    if (x1 <= plan.firstAcceptanceNumber) accepted++;
    else if (x1 < plan.firstRejectionNumber && x1 + d.draw(plan.secondSampleSize) <= plan.secondAcceptanceNumber) accepted++;
  }
  return accepted / RUNS;
}

describe('simulation of two-stage plans at the tolerable rate', () => {
  it('binomial 95% / 6% / 1%: the simulated risk of overreliance is within the declared 5% and matches the exact risk', () => {
    const r = twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 });
    const sim = simulatePlan(r.plan, mulberry32(20260112), 0.06);
    expect(sim).toBeLessThanOrEqual(0.05 + 4 * se(0.05));
    expect(Math.abs(sim - r.overrelianceRisk)).toBeLessThan(4 * se(r.overrelianceRisk));
  });

  it('hypergeometric N = 1,500, 95% / 6% / 1%, second stage from the untested remainder: within the declared 5%', () => {
    const r = twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, populationSize: 1500 });
    const sim = simulatePlan(r.plan, mulberry32(7), 0.06, 1500, 90); // ⌈6% × 1,500⌉ = 90
    expect(sim).toBeLessThanOrEqual(0.05 + 4 * se(0.05));
    expect(Math.abs(sim - r.overrelianceRisk)).toBeLessThan(4 * se(r.overrelianceRisk));
  });

  it('the extension procedure ("test 78, extend by the single-stage figure, rely if none deviates") really runs at about 7.9%, not 5%', () => {
    const rand = mulberry32(42);
    const d = drawer(rand, 0.06);
    const ext = new Map<number, number | null>();
    const m = (x: number): number | null => {
      if (!ext.has(x)) {
        try {
          ext.set(x, extensionSize({ sampleSize: 78, deviations: x, tolerableRate: 0.06, confidence: 0.95 }));
        } catch {
          ext.set(x, null);
        }
      }
      return ext.get(x)!;
    };
    let accepted = 0;
    for (let r = 0; r < RUNS; r++) {
      const x = d.draw(78);
      if (x <= 1) accepted++;
      else {
        const more = m(x);
        if (more !== null && d.draw(more) === 0) accepted++;
      }
    }
    const sim = accepted / RUNS;
    const exact = extensionRisk({ sampleSize: 78, deviations: 2, tolerableRate: 0.06, confidence: 0.95 }).procedureRisk;
    expect(Math.abs(sim - exact)).toBeLessThan(4 * se(exact));
    expect(sim).toBeGreaterThan(0.05 + 4 * se(0.05));
  });
});
