import { binomialLogCdf } from './binomial-log-cdf.js';
import { tolerableCount } from './tolerable-count.js';
import { hyperLogCdf } from './hypergeometric-log-cdf.js';
import { poissonLogCdf } from './poisson-log-cdf.js';
import type { Model } from './types.js';

/**
 * The risk of overreliance as a function of the sample size n and the deviations k, for a fixed
 * tolerable rate and model (README, "How the figures are computed"): binomial P(X ≤ k | n, TDR); hypergeometric
 * P(X ≤ k | N, M_t = ⌈TDR·N⌉, n); Poisson P(Y ≤ k | λ = n·TDR). Internal: the public functions
 * check their inputs first and then call it many times.
 */
export function riskFunction(
  model: Model,
  tolerableRate: number,
  populationSize: number | undefined,
): (n: number, k: number) => number {
  switch (model) {
    case 'binomial':
      return (n, k) => Math.exp(binomialLogCdf(k, n, tolerableRate));
    case 'poisson':
      return (n, k) => Math.exp(poissonLogCdf(k, n * tolerableRate));
    case 'hypergeometric': {
      const N = populationSize!;
      const M = tolerableCount(N, tolerableRate);
      return (n, k) => Math.exp(hyperLogCdf(k, N, M, n));
    }
  }
}
