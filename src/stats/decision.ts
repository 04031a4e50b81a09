import type { DecisionOptions, DecisionResult } from './types.js';
import { checkConfidence, checkOptions, checkProbability } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * The statistical decision for an attribute: the results support the planned reliance iff the
 * achieved risk of overreliance is at most β = 1 − confidence (README, "How the figures are computed"), compared with the
 * relative tolerance 1e-12 ({@link withinRisk}) so that an exact tie counts as achieved.
 * Equivalently the upper deviation limit does not exceed the tolerable rate. Qualitative findings
 * (an intentional deviation, for one) can still override it; that judgement is the practitioner's.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function decision(options: DecisionOptions): DecisionResult {
  checkOptions(options, 'decision');
  const { achievedRisk, confidence } = options;
  checkProbability('achievedRisk', achievedRisk);
  checkConfidence(confidence);
  const allowableRisk = 1 - confidence;
  return { supported: withinRisk(achievedRisk, allowableRisk), achievedRisk, allowableRisk };
}
