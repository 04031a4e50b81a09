import { devianceTerm } from './deviance-term.js';
import { stirlingError } from './stirling-error.js';

/**
 * log of the binomial density C(n, x)·pˣ·qⁿ⁻ˣ for real 0 ≤ x ≤ n, with q = 1 − p passed
 * separately so that it keeps its precision when p is close to 1.
 *
 * Source: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000). Writing
 * each factorial as m! = √(2πm)·(m/e)^m·e^{δ(m)} (δ is Stirling's error, {@link stirlingError})
 * and collecting the powers gives, for 0 < x < n,
 *     b(x; n, p) = √(n / (2π·x·(n − x))) · exp(δ(n) − δ(x) − δ(n − x) − D(x, np) − D(n − x, nq)),
 * with D the deviance term ({@link devianceTerm}); the −np + x and −nq + (n − x) inside the two
 * deviances cancel because np + nq = n. No factorial is formed, so there is no overflow and the
 * result keeps full relative precision for n in the millions and for tails far below 1e-300 (the
 * result is a logarithm). At the ends the density is qⁿ or pⁿ, taken as n·log1p(−p) (or
 * n·log1p(−q)) from whichever of p and q is the smaller, so that neither loses digits.
 * Internal, unchecked.
 */
export function logBinomialDensity(x: number, n: number, p: number, q: number): number {
  if (x < 0 || x > n) return -Infinity;
  if (x === 0) return p === 0 ? 0 : n * (p < q ? Math.log1p(-p) : Math.log(q));
  if (x === n) return q === 0 ? 0 : n * (q < p ? Math.log1p(-q) : Math.log(p));
  if (p === 0 || q === 0) return -Infinity;
  const exponent =
    stirlingError(n) - stirlingError(x) - stirlingError(n - x) - devianceTerm(x, n * p) - devianceTerm(n - x, n * q);
  return exponent - 0.5 * (LN_2PI + Math.log(x) + Math.log1p(-x / n));
}

const LN_2PI = 1.837877066409345483560659472811;
