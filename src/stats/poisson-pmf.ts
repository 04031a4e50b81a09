import { poissonLogPmf } from './poisson-log-pmf.js';

/** P(X = k) for X ~ Poisson(λ): exp of {@link poissonLogPmf} (Loader's method). */
export function poissonPmf(k: number, lambda: number): number {
  return Math.exp(poissonLogPmf(k, lambda));
}
