import { after, cdfAt, pmfUpTo, type Draw } from './plan-draw.js';
import { isTwoStage } from './plan-check.js';
import type { SingleStagePlan, TwoStagePlan } from './types.js';

/**
 * The chance that a plan's results support reliance, and its expected number of items, for one
 * draw (a true deviation rate, or a count of deviations in a known population). Internal.
 *
 * Method: exact enumeration of the first stage. Single stage: P(X ≤ c). Two stages:
 * P(X1 ≤ c1) + Σ_{x=c1+1}^{r1−1} P(X1 = x)·P(X2 ≤ c2 − x | x), where X2 is the second stage's
 * count drawn from what the first stage left (the N − n1 untested units with M − x deviations
 * for the hypergeometric model; independent items otherwise). Average sample number:
 * n1 + n2·P(c1 < X1 < r1).
 */
export function planProbability(plan: SingleStagePlan | TwoStagePlan, d: Draw): { accept: number; asn: number; second: number } {
  if (!isTwoStage(plan)) {
    return { accept: cdfAt(d, plan.sampleSize, plan.acceptanceNumber), asn: plan.sampleSize, second: 0 };
  }
  const { firstSampleSize: n1, firstAcceptanceNumber: c1, firstRejectionNumber: r1, secondSampleSize: n2, secondAcceptanceNumber: c2 } = plan;
  const f1 = pmfUpTo(d, n1, r1 - 1);
  let accept = cdfAt(d, n1, c1);
  let second = 0;
  for (let x = c1 + 1; x <= r1 - 1; x++) {
    const px = f1[x]!;
    if (px === 0) continue;
    second += px;
    accept += px * cdfAt(after(d, n1, x), n2, c2 - x);
  }
  return { accept: Math.min(1, accept), asn: n1 + n2 * second, second };
}
