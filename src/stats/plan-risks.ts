import { checkPlan, isTwoStage } from './plan-check.js';
import { drawAt } from './plan-draw.js';
import { planProbability } from './plan-probability.js';
import { resolveModel } from './resolve-model.js';
import type { Model, PlanRisks, PlanRisksOptions, SingleStagePlan, TwoStagePlan } from './types.js';
import { checkExpectedBelowTolerable, checkOptions, checkRate } from './validate.js';

/**
 * The exact risks of a single- or two-stage plan: the risk of overreliance (the chance the
 * results support reliance at the tolerable rate), the risk of underreliance (the chance they do
 * not at the expected rate), and the average sample number at both rates.
 *
 * Method: {@link planProbability} — exact enumeration of the first stage, each second stage drawn
 * from what the first left (binomial; hypergeometric with M = ⌈TDR·N⌉ at the tolerable rate and
 * ⌊EDR·N⌋ at the expected rate, the second stage from the N − n1 untested units; Poisson).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function planRisks(options: PlanRisksOptions): PlanRisks {
  checkOptions(options, 'planRisks');
  const { plan, tolerableRate, expectedRate, populationSize } = options;
  checkRate('tolerableRate', tolerableRate);
  checkRate('expectedRate', expectedRate, true);
  checkExpectedBelowTolerable(expectedRate, tolerableRate);
  const model = resolveModel(options.model, populationSize);
  checkPlan(plan, populationSize);
  return planRisksOf(plan, model, tolerableRate, expectedRate, populationSize);
}

/** Unchecked form. Internal. */
export function planRisksOf(
  plan: SingleStagePlan | TwoStagePlan,
  model: Model,
  tolerableRate: number,
  expectedRate: number,
  populationSize: number | undefined,
): PlanRisks {
  const atT = planProbability(plan, drawAt(model, tolerableRate, populationSize, 'ceil'));
  const atE = planProbability(plan, drawAt(model, expectedRate, populationSize, 'floor'));
  return {
    overrelianceRisk: atT.accept,
    underrelianceRisk: Math.max(0, 1 - atE.accept),
    averageSampleNumber: atE.asn,
    averageSampleNumberAtTolerable: atT.asn,
    maximumSampleSize: isTwoStage(plan) ? plan.firstSampleSize + plan.secondSampleSize : plan.sampleSize,
    secondStageProbability: atE.second,
  };
}
