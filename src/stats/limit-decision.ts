import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import { tolerableCount } from './tolerable-count.js';
import type { LimitDecisionOptions, LimitDecisionResult } from './types.js';
import { upperLimit } from './upper-limit.js';
import { checkOptions, checkRate } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The decision for an attribute together with the words that fit it, for any display that
 * compares the upper deviation limit with the tolerable rate (the memo's chart, the calculators).
 * The decision is the risk of overreliance against β ({@link decision}), never a comparison of
 * rounded rates.
 *
 * For the hypergeometric model the limit is a count ratio M* ÷ N, the largest number of deviations
 * still plausible; the results support reliance exactly when M* is below the tolerable count
 * ⌈TDR·N⌉, so the rule is "below the tolerable rate" and a limit equal to it does not support
 * reliance (88 items, 1 deviation, N = 1,000, 95%: M* = 50 = ⌈5% × 1,000⌉). For the binomial and
 * Poisson models the limit is continuous and the rule is "does not exceed the tolerable rate".
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function limitDecision(options: LimitDecisionOptions): LimitDecisionResult {
  checkOptions(options, 'limitDecision');
  const { sampleSize: n, deviations: k, confidence, tolerableRate, populationSize } = options;
  checkRate('tolerableRate', tolerableRate);
  const limit = upperLimit(options);
  const model = resolveModel(options.model, populationSize);
  const beta = 1 - confidence;
  const achievedRisk = riskFunction(model, tolerableRate, populationSize)(n, k);
  const supported = withinRisk(achievedRisk, beta);
  let relation: LimitDecisionResult['relation'];
  if (model === 'hypergeometric') {
    const Mt = tolerableCount(populationSize!, tolerableRate);
    const M = limit.deviationsInPopulation!;
    relation = M < Mt ? 'below' : M === Mt ? 'equal' : 'above';
  } else {
    relation = limit.rate < tolerableRate ? 'below' : limit.rate === tolerableRate ? 'equal' : 'above';
  }
  return {
    supported,
    achievedRisk,
    allowableRisk: beta,
    upperLimit: limit.rate,
    rule: model === 'hypergeometric' ? 'below' : 'not above',
    relation,
  };
}
