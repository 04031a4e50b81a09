import { ceilTimes } from './exact-rate.js';
import { checkCount, checkRate } from './validate.js';

/**
 * The tolerable number of deviations in a population of N units, M_t = ⌈TDR·N⌉ (the count the
 * hypergeometric risk of overreliance is evaluated at; common practice, no single source).
 * Computed exactly from the rate as typed ({@link ceilTimes}: the rate's decimal digits times N
 * in whole-number arithmetic), so ⌈884,590,000 × 0.07⌉ is 61,921,300 and not one more. The rate
 * may be given as a decimal string ("0.07") to state its digits outright.
 */
export function tolerableDeviations(populationSize: number, tolerableRate: number | string): number {
  checkCount('populationSize', populationSize, 1);
  const rate = typeof tolerableRate === 'string' ? Number(tolerableRate) : tolerableRate;
  checkRate('tolerableRate', rate);
  return Math.min(populationSize, ceilTimes(populationSize, tolerableRate));
}
