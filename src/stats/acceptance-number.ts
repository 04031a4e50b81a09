import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import type { AcceptanceNumberOptions } from './types.js';
import { checkConfidence, checkOptions, checkRate, checkSampleCounts } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The acceptance number of a sample of n: the most deviations c with which the results still
 * support reliance, i.e. the largest c with risk of overreliance(n, c) ≤ β = 1 − confidence (the
 * evaluation's decision rule, so k ≤ c exactly when the evaluation supports reliance). null when
 * even no deviation would (n too small for the confidence and tolerable rate).
 *
 * Method: the risk rises with c, so c is found by bisection on 0..n−1 with the model's exact CDF.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function acceptanceNumber(options: AcceptanceNumberOptions): number | null {
  checkOptions(options, 'acceptanceNumber');
  const { sampleSize: n, tolerableRate, confidence, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, 0, populationSize);
  return acceptanceNumberOf(riskFunction(model, tolerableRate, populationSize), n, 1 - confidence);
}

/** Unchecked form. Internal. */
export function acceptanceNumberOf(risk: (n: number, k: number) => number, n: number, beta: number): number | null {
  if (!withinRisk(risk(n, 0), beta)) return null;
  let lo = 0;
  let hi = n;
  while (hi - lo > 1) {
    const mid = lo + Math.floor((hi - lo) / 2);
    if (withinRisk(risk(n, mid), beta)) lo = mid;
    else hi = mid;
  }
  return lo;
}
