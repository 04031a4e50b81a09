/**
 * Two-stage risks, risks of underreliance, operating characteristic points, the risk of the
 * extension procedure actually followed, planning for both risks, the combined limit over parts,
 * the two-stage plan search and the tolerable count, each against tests/reference/plan-risks.json:
 * values computed from their definitions in exact rational arithmetic (Python's fractions module
 * and math.comb; the two-stage search by brute force in double precision, as the script says) by
 * scripts/reference-plan-risks.py, which names the tool and version in the file ("tool"). The
 * JSON file is committed, so CI needs no Python. Tolerances: 1e-11 relative for probabilities
 * (the engine sums Loader's saddle-point terms in double precision); counts and sizes exactly.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  combinedUpperLimit,
  extensionRisk,
  extensionSize,
  operatingCharacteristic,
  planForBothRisks,
  planRisks,
  tolerableDeviations,
  twoStagePlan,
  underrelianceRisk,
  type Model,
  type SingleStagePlan,
  type TwoStagePlan,
} from '../../src/stats/index.js';

interface RefPlan { n?: number; c?: number; n1?: number; c1?: number; r1?: number; n2?: number; c2?: number }
const ref = JSON.parse(readFileSync(new URL('./plan-risks.json', import.meta.url), 'utf8'));
const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(b), 1e-300));
const plan = (p: RefPlan): SingleStagePlan | TwoStagePlan =>
  p.n !== undefined
    ? { sampleSize: p.n, acceptanceNumber: p.c! }
    : { firstSampleSize: p.n1!, firstAcceptanceNumber: p.c1!, firstRejectionNumber: p.r1!, secondSampleSize: p.n2!, secondAcceptanceNumber: p.c2! };
const pop = (N: number | null): { populationSize?: number } => (N === null ? {} : { populationSize: N });

describe('reference table (exact rationals, scripts/reference-plan-risks.py)', () => {
  it('names its tool and version', () => {
    expect(ref.tool).toMatch(/^Python 3\.\d+\.\d+, fractions/);
  });

  it(`two-stage and single-stage plan risks and average sample numbers (${ref.plans.length} plans), relative 1e-11`, () => {
    for (const c of ref.plans) {
      const r = planRisks({ plan: plan(c.plan), tolerableRate: c.tolerableRate, expectedRate: c.expectedRate, model: c.model as Model, ...pop(c.populationSize) });
      const where = JSON.stringify(c.plan);
      expect(rel(r.overrelianceRisk, c.overrelianceRisk), where).toBeLessThan(1e-11);
      expect(rel(r.underrelianceRisk, c.underrelianceRisk), where).toBeLessThan(1e-11);
      expect(rel(r.averageSampleNumber, c.averageSampleNumber), where).toBeLessThan(1e-11);
      expect(rel(r.averageSampleNumberAtTolerable, c.averageSampleNumberAtTolerable), where).toBeLessThan(1e-11);
    }
  });

  it(`operating characteristic points (${ref.oc.length}), relative 1e-11`, () => {
    for (const c of ref.oc) {
      const [pt] = operatingCharacteristic({ plan: plan(c.plan), rates: [c.rate], model: c.model as Model, ...pop(c.populationSize) });
      expect(rel(pt!.acceptanceProbability, c.acceptanceProbability), `${JSON.stringify(c.plan)} at ${c.rate}`).toBeLessThan(1e-11);
      expect(rel(pt!.averageSampleNumber, c.averageSampleNumber)).toBeLessThan(1e-11);
    }
  });

  it(`risks of underreliance of single-stage plans (${ref.underreliance.length}), relative 1e-11`, () => {
    for (const c of ref.underreliance) {
      const r = underrelianceRisk({ sampleSize: c.sampleSize, acceptanceNumber: c.acceptanceNumber, expectedRate: c.expectedRate, model: c.model as Model, ...pop(c.populationSize) });
      expect(rel(r, c.underrelianceRisk), JSON.stringify(c)).toBeLessThan(1e-11);
    }
  });

  it('planning for both risks: the same smallest n and acceptance number', () => {
    for (const c of ref.bothRisks) {
      const r = planForBothRisks({ confidence: c.confidence, tolerableRate: c.tolerableRate, expectedRate: c.expectedRate, underrelianceRisk: c.underrelianceRisk });
      expect([r.sampleSize, r.acceptanceNumber], JSON.stringify(c)).toEqual([c.sampleSize, c.acceptanceNumber]);
      expect(rel(r.overrelianceRisk, c.overrelianceRiskAchieved)).toBeLessThan(1e-11);
      expect(rel(r.underrelianceRisk, c.underrelianceRiskAchieved)).toBeLessThan(1e-11);
    }
  });

  it('the extension procedure actually followed: single-stage figures exactly, procedure risks to 1e-11', () => {
    const once = ref.extension.filter((c: { procedureRisk?: number }) => c.procedureRisk !== undefined);
    expect(once.length).toBeGreaterThanOrEqual(4);
    for (const c of once) {
      const common = { tolerableRate: c.tolerableRate, confidence: c.confidence, model: c.model as Model, ...pop(c.populationSize) };
      for (const [x, m] of Object.entries(c.extensionSizes as Record<string, number>)) {
        expect(extensionSize({ ...common, sampleSize: c.sampleSize, deviations: Number(x) }), `${c.sampleSize}/${x}`).toBe(m);
      }
      const r = extensionRisk({ ...common, sampleSize: c.sampleSize, deviations: c.acceptanceNumber + 1 });
      expect(r.acceptanceNumber).toBe(c.acceptanceNumber);
      expect(rel(r.procedureRisk, c.procedureRisk), JSON.stringify(c)).toBeLessThan(1e-11);
      expect(r.procedureRisk).toBeGreaterThan(1 - c.confidence); // the honest risk is above the planned one
    }
  });

  it('the repeated extension procedure (every path followed in a small population), relative 1e-11', () => {
    const repeated = ref.extension.filter((c: { repeatedProcedureRisk?: number }) => c.repeatedProcedureRisk !== undefined);
    expect(repeated.length).toBeGreaterThanOrEqual(2);
    for (const c of repeated) {
      const r = extensionRisk({ sampleSize: c.sampleSize, deviations: 0, tolerableRate: c.tolerableRate, confidence: c.confidence, model: 'hypergeometric', populationSize: c.populationSize });
      expect(rel(r.repeatedProcedureRisk, c.repeatedProcedureRisk), JSON.stringify(c)).toBeLessThan(1e-11);
    }
  });

  it('combined upper limit over parts: the same count as brute force over every allocation', () => {
    for (const c of ref.combined) {
      const r = combinedUpperLimit({ parts: c.parts, confidence: c.confidence });
      expect(r.deviationsInPopulation, JSON.stringify(c.parts)).toBe(c.deviationsInPopulation);
      expect(r.rate).toBe(c.rate);
      expect(r.conservative.deviationsInPopulation).toBeGreaterThanOrEqual(r.deviationsInPopulation!);
    }
  });

  it('the two-stage search finds the plan a brute force over the documented search space finds (double precision in the script)', () => {
    expect(ref.twoStage.length).toBeGreaterThanOrEqual(4);
    for (const c of ref.twoStage) {
      const r = twoStagePlan({ confidence: c.confidence, tolerableRate: c.tolerableRate, expectedRate: c.expectedRate, ...pop(c.populationSize) });
      expect(r.singleStage).toMatchObject({ sampleSize: c.singleStageSize, acceptanceNumber: c.singleStageAcceptanceNumber });
      expect(r.plan, JSON.stringify(c)).toEqual(plan(c.plan));
      expect(rel(r.averageSampleNumber, c.averageSampleNumber)).toBeLessThan(1e-11);
    }
  });

  it('tolerable counts ⌈TDR × N⌉ from the decimal as typed, exactly (number and string forms)', () => {
    for (const c of ref.tolerableDeviations) {
      expect(tolerableDeviations(c.populationSize, Number(c.tolerableRate)), `${c.populationSize} × ${c.tolerableRate}`).toBe(c.count);
      expect(tolerableDeviations(c.populationSize, c.tolerableRate)).toBe(c.count);
    }
  });
});
