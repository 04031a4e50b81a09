import { checkPlan } from './plan-check.js';
import { drawAt } from './plan-draw.js';
import { planProbability } from './plan-probability.js';
import { resolveModel } from './resolve-model.js';
import type { OperatingCharacteristicOptions, OperatingCharacteristicPoint } from './types.js';
import { checkOptions, checkProbability } from './validate.js';
import { SamplingInputError } from '../errors.js';

/** 0%, 0.5%, …, 20%. */
const DEFAULT_OC_RATES: readonly number[] = Array.from({ length: 41 }, (_, i) => i / 200);

/**
 * The operating characteristic of a plan: for each true deviation rate, the chance that the
 * results support reliance, and the expected number of items tested. Its value at the tolerable
 * rate is the risk of overreliance; one minus its value at the expected rate is the risk of
 * underreliance. Data for a table or a chart (the caller draws it).
 *
 * Method: {@link planProbability} at each rate (hypergeometric: M = ⌈rate·N⌉ deviations, the
 * convention of the tolerable count).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function operatingCharacteristic(options: OperatingCharacteristicOptions): OperatingCharacteristicPoint[] {
  checkOptions(options, 'operatingCharacteristic');
  const { plan, populationSize } = options;
  const model = resolveModel(options.model, populationSize);
  checkPlan(plan, populationSize);
  const rates = options.rates ?? DEFAULT_OC_RATES;
  if (!Array.isArray(rates) || rates.length === 0) {
    throw new SamplingInputError('rates', 'rates must be a non-empty list of fractions from 0 to 1.');
  }
  rates.forEach((r, i) => checkProbability(`rates[${i}]`, r));
  return rates.map((rate) => {
    const d = drawAt(model, rate, populationSize, 'ceil');
    const { accept, asn } = planProbability(plan, d);
    const point: OperatingCharacteristicPoint = { rate, acceptanceProbability: accept, averageSampleNumber: asn };
    if (d.kind === 'hypergeometric') point.deviationsInPopulation = d.M;
    return point;
  });
}
