import { NoPracticalSizeError } from '../errors.js';
import { MAX_SAMPLE_SIZE } from './constants.js';
import { ceilGuarded } from './expected-deviations.js';
import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import type { ExtensionSizeOptions } from './types.js';
import { asPercent, checkConfidence, checkOptions, checkRate, checkSampleCounts } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The extension of a sample: after k deviations in n items, the fewest additional items m ≥ 0
 * such that, if none of them deviates, the risk of overreliance at n + m items and k deviations
 * is at most β = 1 − confidence (README, "How the figures are computed"). 0 when the results already support the reliance.
 *
 * Method: the risk at a fixed k falls as the sample grows, so the smallest total is found by
 * bisection on n + m, up to N for the hypergeometric model and up to {@link MAX_SAMPLE_SIZE}
 * (or N when known) otherwise.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 * @throws NoPracticalSizeError when no extension within the cap is enough.
 */
export function extensionSize(options: ExtensionSizeOptions): number {
  checkOptions(options, 'extensionSize');
  const { sampleSize: n, deviations: k, tolerableRate, confidence, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, k, populationSize);
  const beta = 1 - confidence;
  const risk = riskFunction(model, tolerableRate, populationSize);
  if (withinRisk(risk(n, k), beta)) return 0;
  const cap =
    model === 'hypergeometric'
      ? populationSize!
      : populationSize === undefined
        ? MAX_SAMPLE_SIZE
        : Math.min(MAX_SAMPLE_SIZE, populationSize);
  if (cap <= n || !withinRisk(risk(cap, k), beta)) {
    let why: string;
    if (model === 'hypergeometric' && k >= Math.min(populationSize!, ceilGuarded(tolerableRate * populationSize!))) {
      why = `${k} deviations already reach the tolerable number of deviations in the population (${Math.min(populationSize!, ceilGuarded(tolerableRate * populationSize!))} of ${populationSize})`;
    } else if (model === 'hypergeometric') {
      why = `even testing all ${populationSize} units would not be enough`;
    } else {
      why = `the sample would have to grow beyond ${cap.toLocaleString('en-US')} items`;
    }
    throw new NoPracticalSizeError(
      `No practical extension: after ${k} deviation${k === 1 ? '' : 's'} in ${n} items, supporting a tolerable rate of ` +
        `${asPercent(tolerableRate)} at ${asPercent(confidence)} confidence (${model} model) is not practical: ${why}. ` +
        'Consider testing a compensating control or reducing the planned reliance.',
    );
  }
  let lo = n + 1;
  let hi = cap;
  while (lo < hi) {
    const mid = Math.floor((lo + hi) / 2);
    if (withinRisk(risk(mid, k), beta)) hi = mid;
    else lo = mid + 1;
  }
  return lo - n;
}
