import { SamplingInputError } from '../errors.js';
import { MODELS, type Model } from './types.js';
import { checkCount } from './validate.js';

/**
 * Choose and check the probability model. Method: common practice, no single source — the
 * hypergeometric model is exact for sampling without replacement from a known finite population,
 * so it is the default when the population size is given; otherwise the binomial model (an
 * unknown or very large population). The Poisson model is the older "factor" approximation.
 *
 * Checks the population size (a whole number ≥ 1) when given, and that the hypergeometric model
 * has one.
 */
export function resolveModel(model: unknown, populationSize: unknown): Model {
  if (populationSize !== undefined) checkCount('populationSize', populationSize, 1);
  if (model === undefined) return populationSize === undefined ? 'binomial' : 'hypergeometric';
  if (typeof model !== 'string' || !(MODELS as readonly string[]).includes(model)) {
    throw new SamplingInputError(
      'model',
      `model ${typeof model === 'string' ? `"${model}"` : String(model)} is not known; use one of ${MODELS.join(', ')}.`,
    );
  }
  if (model === 'hypergeometric' && populationSize === undefined) {
    throw new SamplingInputError(
      'populationSize',
      'the hypergeometric model needs populationSize (the number of sampling units in the population).',
    );
  }
  return model as Model;
}
