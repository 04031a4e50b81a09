import { incompleteGamma } from './incomplete-gamma.js';
import { logPoissonDensity } from './log-poisson-density.js';
import { normalQuantile } from './normal-quantile.js';
import { checkPositive, checkProbability } from './validate.js';

/**
 * The quantile of the gamma distribution with shape a and scale 1: the x with P(a, x) = prob.
 *
 * Method: Newton's method on the regularized incomplete gamma function
 * ({@link incompleteGamma}) safeguarded by bisection on an expanding bracket, from the
 * Wilson–Hilferty start x ≈ a·(1 − 1/(9a) + z/(3√a))³ (E. B. Wilson and M. M. Hilferty, PNAS 17
 * (1931)); iterated to about the last bit. Above ½ the upper tail Q is matched against 1 − prob.
 * The Poisson ("factor") upper limit is GammaInv(c; k + 1)/n; for k = 0 at 95% the factor is
 * −ln 0.05 ≈ 3.00 (common practice, no single source).
 */
export function gammaInv(prob: number, a: number): number {
  checkProbability('prob', prob);
  checkPositive('a', a);
  if (prob === 0) return 0;
  if (prob === 1) return Infinity;
  const useUpper = prob > 0.5;
  const target = useUpper ? 1 - prob : prob;
  const g = (x: number): number => {
    const [lower, upper] = incompleteGamma(x, a);
    return useUpper ? target - upper : lower - target;
  };
  // density x^(a−1) e^(−x) / Γ(a) = (a/x) · xᵃ e^(−x) / Γ(a + 1)
  const density = (x: number): number => (a / x) * Math.exp(logPoissonDensity(a, x));

  const z = normalQuantile(prob);
  const w = 1 - 1 / (9 * a) + z / (3 * Math.sqrt(a));
  let x = a * w * w * w;
  if (!(x > 0) || !Number.isFinite(x)) x = a;
  let lo = 0;
  let hi = Infinity;
  for (let iter = 0; iter < 2000; iter++) {
    const gx = g(x);
    if (gx === 0) return x;
    if (gx < 0) lo = x;
    else hi = x;
    let next = x - gx / density(x);
    if (!(next > lo && next < hi)) next = hi === Infinity ? Math.max(2 * x, x + 1) : 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 1e-15 * x || next === lo || next === hi) return next;
    x = next;
  }
  return x;
}
