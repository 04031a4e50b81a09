import { ceilGuarded } from './expected-deviations.js';
import { checkCount, checkRate } from './validate.js';

/**
 * The tolerable number of deviations in a population of N units, M_t = ⌈TDR·N⌉ (the count the
 * hypergeometric risk of overreliance is evaluated at; common practice, no single source).
 * Computed as ⌈TDR·N − 1e-9⌉ against binary noise.
 */
export function tolerableDeviations(populationSize: number, tolerableRate: number): number {
  checkCount('populationSize', populationSize, 1);
  checkRate('tolerableRate', tolerableRate);
  return Math.min(populationSize, ceilGuarded(tolerableRate * populationSize));
}
