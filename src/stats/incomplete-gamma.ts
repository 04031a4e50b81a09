import { unitContinuedFraction } from './continued-fraction.js';
import { logPoissonDensity } from './log-poisson-density.js';

/**
 * The regularised incomplete gamma functions [P(a, x), Q(a, x)] (lower and upper, P + Q = 1),
 * each with its own relative precision. Internal, unchecked (x ≥ 0, a > 0).
 *
 * Method (NIST Digital Library of Mathematical Functions, chapter 8), with the common prefactor
 * t = x^a e^{−x} / Γ(a + 1), the Poisson density at a with mean x ({@link logPoissonDensity},
 * Loader's expansion, so it neither overflows nor loses digits for large a):
 * - for x < a + 1, the power series of DLMF 8.7.1 with P(a, x) = x^a γ*(a, x) (DLMF 8.2.7):
 *     P(a, x) = x^a e^{−x} Σ_{k≥0} x^k / Γ(a + k + 1) = t · Σ_{k≥0} x^k / ((a + 1)(a + 2)…(a + k)),
 *   whose terms fall once k > x − a; summed until a term no longer changes the sum;
 * - otherwise the continued fraction of DLMF 8.9.2,
 *     x^{−a} e^{x} Γ(a, x) = x^{−1}/(1 + (1 − a)x^{−1}/(1 + x^{−1}/(1 + (2 − a)x^{−1}/(1 + 2x^{−1}/(1 + …))))),
 *   so that Q(a, x) = Γ(a, x)/Γ(a) = t · a / (x · F) with F = 1 + c₁/(1 + c₂/(1 + …)),
 *   c_{2j−1} = (j − a)/x and c_{2j} = j/x, evaluated by the modified Lentz algorithm
 *   ({@link unitContinuedFraction}).
 * Either way the tail that is computed is the smaller one (P below the mean, Q above it); the
 * other is its complement.
 */
export function incompleteGamma(x: number, a: number): [lower: number, upper: number] {
  if (x <= 0) return [0, 1];
  if (x === Infinity) return [1, 0];
  const t = Math.exp(logPoissonDensity(a, x));
  if (x < a + 1) {
    const lower = t === 0 ? 0 : t * powerSeries(x, a);
    return [lower, 1 - lower];
  }
  if (t === 0) return [1, 0];
  const c = (m: number): number => (m & 1 ? ((m + 1) / 2 - a) / x : m / 2 / x);
  const upper = (t * a) / (x * unitContinuedFraction(c));
  return [1 - upper, upper];
}

/** Σ_{k≥0} x^k / ((a + 1)…(a + k)) (DLMF 8.7.1 divided by its first term). */
function powerSeries(x: number, a: number): number {
  let sum = 1;
  let term = 1;
  for (let k = 1; k < 100_000; k++) {
    term *= x / (a + k);
    const next = sum + term;
    if (next === sum) break;
    sum = next;
  }
  return sum;
}
