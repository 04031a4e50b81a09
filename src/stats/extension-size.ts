import { NoPracticalSizeError } from '../errors.js';
import { MAX_SAMPLE_SIZE } from './constants.js';
import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import { tolerableCount } from './tolerable-count.js';
import type { ExtensionSizeOptions, Model } from './types.js';
import { asPercent, checkConfidence, checkOptions, checkRate, checkSampleCounts } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The single-stage extension figure: after k deviations in n items, the fewest additional items
 * m ≥ 0 such that, if none of them deviates, the risk of overreliance at n + m items and k
 * deviations is at most β = 1 − confidence (README, "How the figures are computed"). 0 when the
 * results already support the reliance.
 *
 * This figure treats the extended sample as one sample planned in advance. It was not: the
 * extension depends on the first look, and the exact risk of the procedure actually followed is
 * higher ({@link extensionRisk} computes it). Show it only as a labelled figure beside that risk.
 *
 * Method: the risk at a fixed k falls as the sample grows, so the smallest total is found by
 * bisection on n + m. The total never exceeds the population when its size is known (whatever
 * the model: the extension is at most the untested remainder N − n), and {@link MAX_SAMPLE_SIZE}
 * otherwise. No extension is offered when every tested item deviated (k = n).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 * @throws NoPracticalSizeError when no extension within the cap is enough, or k = n.
 */
/**
 * The checked inputs of an extension (its size, and its risk in extension-risk.ts): the model, β,
 * the risk function at the tolerable rate and the largest total an extension may reach.
 */
export function extensionSetup(options: ExtensionSizeOptions, fn: string) {
  checkOptions(options, fn);
  const { sampleSize: n, deviations: k, tolerableRate, confidence, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  const model = resolveModel(options.model, populationSize);
  checkSampleCounts(n, k, populationSize);
  return {
    n,
    k,
    tolerableRate,
    confidence,
    populationSize,
    model,
    beta: 1 - confidence,
    risk: riskFunction(model, tolerableRate, populationSize),
    cap: extensionCap(model, populationSize),
  };
}

export function extensionSize(options: ExtensionSizeOptions): number {
  const { n, k, tolerableRate, confidence, populationSize, model, beta, risk, cap } = extensionSetup(options, 'extensionSize');
  const m = extensionOf(risk, n, k, beta, cap);
  if (m !== null) return m;
  let why: string;
  const tolerable = populationSize === undefined ? undefined : tolerableCount(populationSize, tolerableRate);
  if (k === n) {
    why = `every item tested deviated; an extension cannot show that the control operates (test a compensating control or do not rely on it)`;
  } else if (model === 'hypergeometric' && k >= tolerable!) {
    why = `${k} deviations already reach the tolerable number of deviations in the population (${tolerable} of ${populationSize})`;
  } else if (populationSize !== undefined && cap === populationSize) {
    why = `even testing all ${populationSize.toLocaleString('en-US')} units (${(populationSize - n).toLocaleString('en-US')} untested) would not be enough`;
  } else {
    why = `the sample would have to grow beyond ${cap.toLocaleString('en-US')} items`;
  }
  throw new NoPracticalSizeError(
    `No practical extension: after ${k} deviation${k === 1 ? '' : 's'} in ${n} items, supporting a tolerable rate of ` +
      `${asPercent(tolerableRate)} at ${asPercent(confidence)} confidence (${model} model) is not practical: ${why}. ` +
      'Consider testing a compensating control or reducing the planned reliance.',
  );
}

/** The largest total an extension may reach: N when known (any model), else MAX_SAMPLE_SIZE. Internal. */
export function extensionCap(model: Model, populationSize: number | undefined): number {
  if (populationSize === undefined) return MAX_SAMPLE_SIZE;
  return model === 'hypergeometric' ? populationSize : Math.min(MAX_SAMPLE_SIZE, populationSize);
}

/** The extension m (0 when already supported), or null when none within the cap (or k = n). Internal. */
export function extensionOf(risk: (n: number, k: number) => number, n: number, k: number, beta: number, cap: number): number | null {
  if (withinRisk(risk(n, k), beta)) return 0;
  if (k >= n || cap <= n || !withinRisk(risk(cap, k), beta)) return null;
  let lo = n + 1;
  let hi = cap;
  while (lo < hi) {
    const mid = Math.floor((lo + hi) / 2);
    if (withinRisk(risk(mid, k), beta)) hi = mid;
    else lo = mid + 1;
  }
  return lo - n;
}
