import { NoPracticalSizeError } from '../errors.js';
import { MAX_SAMPLE_SIZE } from './constants.js';
import { cdfAt, drawAt } from './plan-draw.js';
import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import { sizeRemark } from './size-remark.js';
import type { BothRisksPlanOptions, BothRisksPlanResult } from './types.js';
import { asPercent, checkConfidence, checkExpectedBelowTolerable, checkOptions, checkRate } from './validate.js';
import { withinRisk } from './within-risk.js';

/**
 * Planning for both risks: the smallest sample size n, with its acceptance number c, whose risk
 * of overreliance P(X ≤ c) at the tolerable rate is at most β = 1 − confidence and whose risk of
 * underreliance P(X > c) at the expected rate is at most the allowed α.
 *
 * Method: exact scan over n. For each n the best c is the largest one with risk of overreliance
 * ≤ β (a larger c only lowers the risk of underreliance), and it never falls as n grows, so it is
 * carried from one n to the next; the first n whose risk of underreliance at that c is ≤ α is the
 * answer. Binomial P(X ≤ c | n, p); hypergeometric with ⌈TDR·N⌉ and ⌊EDR·N⌋ deviations; Poisson.
 * Sizes are searched up to {@link MAX_SAMPLE_SIZE} (and N when known). This is the classical
 * two-point design of a single sampling plan (e.g. the producer's and consumer's risks of
 * acceptance sampling; common practice, no single source).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 * @throws NoPracticalSizeError when no size within the cap meets both risks.
 */
export function planForBothRisks(options: BothRisksPlanOptions): BothRisksPlanResult {
  checkOptions(options, 'planForBothRisks');
  const { confidence, tolerableRate, expectedRate, underrelianceRisk: alpha, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  checkRate('expectedRate', expectedRate, true);
  checkExpectedBelowTolerable(expectedRate, tolerableRate);
  checkRate('underrelianceRisk', alpha);
  const model = resolveModel(options.model, populationSize);
  const beta = 1 - confidence;
  const risk = riskFunction(model, tolerableRate, populationSize);
  const dE = drawAt(model, expectedRate, populationSize, 'floor');
  const cap = Math.min(MAX_SAMPLE_SIZE, populationSize ?? MAX_SAMPLE_SIZE);
  let c = -1;
  for (let n = 1; n <= cap; n++) {
    while (c + 1 < n && withinRisk(risk(n, c + 1), beta)) c++;
    if (c < 0) continue;
    const under = Math.max(0, 1 - cdfAt(dE, n, c));
    if (under <= alpha * (1 + 1e-12)) {
      const result: BothRisksPlanResult = {
        sampleSize: n,
        acceptanceNumber: c,
        overrelianceRisk: risk(n, c),
        underrelianceRisk: under,
        model,
        confidence,
        tolerableRate,
        expectedRate,
        allowedUnderrelianceRisk: alpha,
      };
      if (populationSize !== undefined) result.populationSize = populationSize;
      const remark = sizeRemark(n);
      if (remark) result.sizeRemark = remark;
      return result;
    }
  }
  throw new NoPracticalSizeError(
    `No practical sample size (${model} model) keeps the risk of overreliance within ${asPercent(beta)} at the tolerable rate ` +
      `${asPercent(tolerableRate)} and the risk of underreliance within ${asPercent(alpha)} at the expected rate ${asPercent(expectedRate)} ` +
      `within ${cap.toLocaleString('en-US')} items. Allow a higher risk of underreliance, lower the confidence, or raise the tolerable rate.`,
  );
}
