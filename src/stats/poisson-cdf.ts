import { poissonLogCdf } from './poisson-log-cdf.js';

/** P(X ≤ k) for X ~ Poisson(λ): exp of {@link poissonLogCdf}. */
export function poissonCdf(k: number, lambda: number): number {
  return Math.exp(poissonLogCdf(k, lambda));
}
