import { SamplingInputError } from '../errors.js';
import { cdfAt, drawAt } from './plan-draw.js';
import { resolveModel } from './resolve-model.js';
import type { UnderrelianceRiskOptions } from './types.js';
import { checkCount, checkOptions, checkRate, checkSampleCounts } from './validate.js';

/**
 * The risk of underreliance of a single-stage plan: the chance that the results do not support
 * reliance (more than c deviations in n) when the control works at the expected rate.
 *
 * Method: 1 − P(X ≤ c) at the expected rate — binomial P(X ≤ c | n, EDR); hypergeometric
 * P(X ≤ c | N, ⌊EDR·N⌋, n) (the most deviations that do not exceed the expected rate; common
 * practice, no single source); Poisson P(Y ≤ c | n·EDR) — from Loader's terms (C. Loader, 2000).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function underrelianceRisk(options: UnderrelianceRiskOptions): number {
  checkOptions(options, 'underrelianceRisk');
  const { sampleSize: n, acceptanceNumber: c, expectedRate, populationSize } = options;
  checkRate('expectedRate', expectedRate, true);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, 0, populationSize);
  checkCount('acceptanceNumber', c, 0);
  if (c > n) throw new SamplingInputError('acceptanceNumber', `acceptanceNumber (${c}) cannot exceed sampleSize (${n}).`);
  return Math.max(0, 1 - cdfAt(drawAt(model, expectedRate, populationSize, 'floor'), n, c));
}
