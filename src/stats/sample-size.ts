import { NoPracticalSizeError } from '../errors.js';
import { MAX_SAMPLE_SIZE } from './constants.js';
import { ceilGuarded } from './expected-deviations.js';
import { tolerableCount } from './tolerable-count.js';
import { acceptanceNumberOf } from './acceptance-number.js';
import { cdfAt, drawAt } from './plan-draw.js';
import { resolveModel } from './resolve-model.js';
import { sizeRemark } from './size-remark.js';
import { riskFunction } from './risk-function.js';
import { smallestSampleSize } from './smallest-sample-size.js';
import type { Model, SampleSizeOptions, SampleSizeResult } from './types.js';
import {
  asPercent,
  checkConfidence,
  checkExpectedBelowTolerable,
  checkOptions,
  checkRate,
} from './validate.js';

/**
 * The statistical sample size for a test of controls: the smallest n whose risk of overreliance
 * at k_e = ⌈n·EDR⌉ deviations is at most β = 1 − confidence (README, "How the figures are computed"; the convention of the
 * AICPA Audit Sampling guide's attribute sampling tables).
 *
 * Method: exact search over n ({@link smallestSampleSize}) with the model's CDF — binomial
 * P(X ≤ k_e | n, TDR); hypergeometric P(X ≤ k_e | N, ⌈TDR·N⌉, n), searched up to N; Poisson
 * P(Y ≤ k_e | n·TDR). Binomial and Poisson sizes are searched up to {@link MAX_SAMPLE_SIZE}
 * (and N when known). When N is known the textbook finite population correction
 * n' = ⌈n / (1 + n/N)⌉ of the binomial size is reported beside the result, never in its place.
 * The result also gives the plan's acceptance number (the most deviations that still support
 * reliance at n, ≥ k_e), its risk of underreliance at the expected rate
 * ({@link underrelianceRisk}) and, above 200 items, a remark on the size ({@link sizeRemark}).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 * @throws NoPracticalSizeError when no size within the cap achieves the planned risk.
 */
export function sampleSize(options: SampleSizeOptions): SampleSizeResult {
  checkOptions(options, 'sampleSize');
  const { confidence, tolerableRate, expectedRate, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  checkRate('expectedRate', expectedRate, true);
  checkExpectedBelowTolerable(expectedRate, tolerableRate);
  const model = resolveModel(options.model, populationSize);
  const found = searchSize(model, confidence, tolerableRate, expectedRate, populationSize);
  if (!found) throw new NoPracticalSizeError(noSizeMessage(model, confidence, tolerableRate, expectedRate, populationSize));
  const result: SampleSizeResult = {
    sampleSize: found.sampleSize,
    expectedDeviations: found.expectedDeviations,
    model,
    achievedRisk: found.achievedRisk,
    confidence,
    tolerableRate,
    expectedRate,
    acceptanceNumber: found.expectedDeviations,
    underrelianceRisk: 0,
  };
  const risk = riskFunction(model, tolerableRate, populationSize);
  result.acceptanceNumber = acceptanceNumberOf(risk, found.sampleSize, 1 - confidence) ?? found.expectedDeviations;
  result.underrelianceRisk = Math.max(
    0,
    1 - cdfAt(drawAt(model, expectedRate, populationSize, 'floor'), found.sampleSize, result.acceptanceNumber),
  );
  const remark = sizeRemark(found.sampleSize);
  if (remark) result.sizeRemark = remark;
  if (populationSize !== undefined) {
    result.populationSize = populationSize;
    const binomial =
      model === 'binomial'
        ? found
        : searchSize('binomial', confidence, tolerableRate, expectedRate, undefined);
    if (binomial) {
      const n = binomial.sampleSize;
      result.finitePopulationCorrection = {
        binomialSampleSize: n,
        correctedSampleSize: ceilGuarded(n / (1 + n / populationSize)),
      };
    }
  }
  return result;
}

/** The search with the model's cap; undefined when nothing within it works. Internal. */
export function searchSize(
  model: Model,
  confidence: number,
  tolerableRate: number,
  expectedRate: number,
  populationSize: number | undefined,
): { sampleSize: number; expectedDeviations: number; achievedRisk: number } | undefined {
  const beta = 1 - confidence;
  const risk = riskFunction(model, tolerableRate, populationSize);
  if (model === 'hypergeometric') {
    const N = populationSize!;
    const tolerable = tolerableCount(N, tolerableRate);
    return smallestSampleSize(risk, expectedRate, beta, N, tolerable, { kind: 'hypergeometric', N, M: tolerable });
  }
  const cap = populationSize === undefined ? MAX_SAMPLE_SIZE : Math.min(MAX_SAMPLE_SIZE, populationSize);
  return smallestSampleSize(risk, expectedRate, beta, cap, Infinity, model === 'binomial' ? { kind: 'binomial', p: tolerableRate } : undefined);
}

function noSizeMessage(
  model: Model,
  confidence: number,
  tolerableRate: number,
  expectedRate: number,
  populationSize: number | undefined,
): string {
  const plan = `${asPercent(confidence)} confidence, tolerable rate ${asPercent(tolerableRate)}, expected rate ${asPercent(expectedRate)}`;
  const where =
    model === 'hypergeometric'
      ? `even testing all ${populationSize} units of the population`
      : populationSize !== undefined && populationSize < MAX_SAMPLE_SIZE
        ? `within the population of ${populationSize} units`
        : `within ${MAX_SAMPLE_SIZE.toLocaleString('en-US')} items`;
  return (
    `No practical sample size (${model} model) achieves ${plan} ${where}. ` +
    'The expected rate is too close to the tolerable rate: lower the confidence, raise the tolerable rate, ' +
    'or plan to rely less on the control.'
  );
}
