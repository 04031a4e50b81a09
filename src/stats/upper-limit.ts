import { betaInv } from './beta-inv.js';
import { gammaInv } from './gamma-inv.js';
import { hyperLogCdf } from './hypergeometric-log-cdf.js';
import { resolveModel } from './resolve-model.js';
import type { UpperLimitOptions, UpperLimitResult } from './types.js';
import { checkConfidence, checkOptions, checkSampleCounts } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The upper deviation limit at the given confidence after k deviations in a sample of n
 * (convention: README, "How the figures are computed").
 *
 * Method:
 * - binomial: the one-sided Clopper–Pearson limit p_U with P(X ≤ k | n, p_U) = 1 − c, i.e.
 *   p_U = BetaInv(c; k + 1, n − k) (C. J. Clopper and E. S. Pearson, Biometrika 26 (1934));
 *   1 when k = n. The published upper limit tables (AICPA Audit Sampling guide) are these
 *   values rounded up to 0.1%.
 * - hypergeometric: M* = the largest M with P(X ≤ k | N, M, n) > 1 − c, found by bisection on M
 *   (the CDF falls as M rises); the limit is M* ÷ N and `deviationsInPopulation` is M*.
 * - Poisson (the factor method): GammaInv(c; k + 1)/n, at most 1.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function upperLimit(options: UpperLimitOptions): UpperLimitResult {
  checkOptions(options, 'upperLimit');
  const { sampleSize: n, deviations: k, confidence, populationSize } = options;
  checkConfidence(confidence);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, k, populationSize);
  const result: UpperLimitResult = { rate: 0, model, sampleSize: n, deviations: k, confidence };
  if (populationSize !== undefined) result.populationSize = populationSize;
  if (model === 'binomial') {
    result.rate = k === n ? 1 : betaInv(confidence, k + 1, n - k);
  } else if (model === 'poisson') {
    result.rate = Math.min(1, gammaInv(confidence, k + 1) / n);
  } else {
    const N = populationSize!;
    const beta = 1 - confidence;
    const plausible = (M: number): boolean => !withinRisk(Math.exp(hyperLogCdf(k, N, M, n)), beta);
    // M = k is always plausible (the sample cannot show fewer); M above N − (n − k) is impossible.
    let lo = k;
    let hi = N - (n - k);
    if (plausible(hi)) {
      lo = hi;
    } else {
      while (hi - lo > 1) {
        const mid = lo + Math.floor((hi - lo) / 2);
        if (plausible(mid)) lo = mid;
        else hi = mid;
      }
    }
    result.deviationsInPopulation = lo;
    result.rate = lo / N;
  }
  return result;
}
