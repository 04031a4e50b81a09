import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import type { OverrelianceRiskOptions } from './types.js';
import { checkOptions, checkRate, checkSampleCounts } from './validate.js';

/**
 * The achieved risk of overreliance: the probability of finding k or fewer deviations in a
 * sample of n if the population deviation rate were the tolerable rate (README, "How the figures are computed").
 *
 * Method: the model's CDF at k — binomial P(X ≤ k | n, TDR); hypergeometric
 * P(X ≤ k | N, ⌈TDR·N⌉, n); Poisson P(Y ≤ k | n·TDR) — each summed in log space from Loader's
 * saddle-point terms (C. Loader, 2000).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function overrelianceRisk(options: OverrelianceRiskOptions): number {
  checkOptions(options, 'overrelianceRisk');
  const { sampleSize: n, deviations: k, tolerableRate, populationSize } = options;
  checkRate('tolerableRate', tolerableRate);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, k, populationSize);
  return riskFunction(model, tolerableRate, populationSize)(n, k);
}
