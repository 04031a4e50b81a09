import { unitContinuedFraction } from './continued-fraction.js';
import { logBinomialDensity } from './log-binomial-density.js';

/**
 * The regularised incomplete beta function and its complement, [I_x(a, b), 1 − I_x(a, b)], each
 * with its own relative precision. Internal, unchecked (0 ≤ x ≤ 1, a > 0, b > 0).
 *
 * Method (NIST Digital Library of Mathematical Functions, §8.17):
 * - the continued fraction of DLMF 8.17.22,
 *     I_x(a, b) = x^a (1 − x)^b / (a·B(a, b)) · 1/(1 + d₁/(1 + d₂/(1 + …))),
 *     d_{2m} = m(b − m)x / ((a + 2m − 1)(a + 2m)),
 *     d_{2m+1} = −(a + m)(a + b + m)x / ((a + 2m)(a + 2m + 1)),
 *   evaluated by the modified Lentz algorithm ({@link unitContinuedFraction});
 * - it converges fast for x below about (a + 1)/(a + b + 2); above that the other tail is
 *   computed from the symmetry I_x(a, b) = 1 − I_{1−x}(b, a) (DLMF 8.17.4), so the tail that
 *   is summed is always the smaller one and keeps full relative precision;
 * - the prefactor is written as a binomial density: with B(a, b) = Γ(a)Γ(b)/Γ(a + b),
 *     x^a (1 − x)^b / (a·B(a, b)) = b/(a + b) · Γ(a + b + 1)/(Γ(a + 1)Γ(b + 1)) · x^a (1 − x)^b
 *                                 = b/(a + b) · f(a; a + b, x),
 *   f the binomial density at real arguments, evaluated in log space by Loader's expansion
 *   ({@link logBinomialDensity}), so there is no overflow and no cancellation of log-gammas.
 * For whole a and b, I_p(k + 1, n − k) = P(X ≥ k + 1) for X ~ Binomial(n, p) (DLMF 8.17.5).
 */
export function incompleteBeta(x: number, a: number, b: number): [lower: number, upper: number] {
  if (x <= 0) return [0, 1];
  if (x >= 1) return [1, 0];
  if (x * (a + b + 2) < a + 1) {
    const lower = smallTail(x, 1 - x, a, b);
    return [lower, 1 - lower];
  }
  const upper = smallTail(1 - x, x, b, a);
  return [1 - upper, upper];
}

/** I_x(a, b) by DLMF 8.17.22, for x below about the mean; y = 1 − x passed exactly. */
function smallTail(x: number, y: number, a: number, b: number): number {
  const prefactor = (b / (a + b)) * Math.exp(logBinomialDensity(a, a + b, x, y));
  if (prefactor === 0) return 0;
  const d = (j: number): number => {
    const m = j >> 1;
    if ((j & 1) === 0) return (m * (b - m) * x) / ((a + 2 * m - 1) * (a + 2 * m));
    return (-(a + m) * (a + b + m) * x) / ((a + 2 * m) * (a + 2 * m + 1));
  };
  return prefactor / unitContinuedFraction(d);
}
