import { incompleteBeta } from './incomplete-beta.js';
import { logBinomialDensity } from './log-binomial-density.js';
import { normalQuantile } from './normal-quantile.js';
import { checkPositive, checkProbability } from './validate.js';

/**
 * The quantile of the beta distribution: the x with I_x(a, b) = prob.
 *
 * Method: Newton's method on the regularized incomplete beta function ({@link incompleteBeta})
 * safeguarded by bisection on a bracket that always contains the root, from a normal-approximation
 * start; iterated until the step is below 1e-15 relative (about the last bit). For prob above ½
 * the complement 1 − I is matched against 1 − prob, so an upper tail such as 0.05 is solved with
 * its own relative precision. The one-sided Clopper–Pearson upper limit is BetaInv(c; k + 1, n − k)
 * (C. J. Clopper and E. S. Pearson, Biometrika 26 (1934)).
 */
export function betaInv(prob: number, a: number, b: number): number {
  checkProbability('prob', prob);
  checkPositive('a', a);
  checkPositive('b', b);
  if (prob === 0) return 0;
  if (prob === 1) return 1;
  const useUpper = prob > 0.5;
  const target = useUpper ? 1 - prob : prob;
  // g(x) increases with x and is 0 at the root.
  const g = (x: number): number => {
    const [lower, upper] = incompleteBeta(x, a, b);
    return useUpper ? target - upper : lower - target;
  };
  const density = (x: number): number =>
    (Math.exp(logBinomialDensity(a, a + b, x, 1 - x)) * ((a * b) / (a + b))) / (x * (1 - x));

  let lo = 0;
  let hi = 1;
  const mean = a / (a + b);
  const sd = Math.sqrt((a * b) / ((a + b) * (a + b) * (a + b + 1)));
  let x = mean + normalQuantile(prob) * sd;
  if (!(x > 0 && x < 1)) x = mean;
  for (let iter = 0; iter < 2000; iter++) {
    const gx = g(x);
    if (gx === 0) return x;
    if (gx < 0) lo = x;
    else hi = x;
    let next = x - gx / density(x);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 1e-15 * x || next === lo || next === hi) return next;
    x = next;
  }
  return x;
}
