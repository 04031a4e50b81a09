import { devianceTerm } from './deviance-term.js';
import { stirlingError } from './stirling-error.js';

/**
 * log of the binomial density C(n, x)·pˣ·qⁿ⁻ˣ for real 0 ≤ x ≤ n, with q = 1 − p passed
 * separately so that it keeps its precision when p is close to 1.
 *
 * Method: Loader's saddle-point expansion (C. Loader, "Fast and Accurate Computation of Binomial
 * Probabilities", 2000): log f = stirlerr(n) − stirlerr(x) − stirlerr(n−x) − bd0(x, np)
 * − bd0(n−x, nq) − ½·log(2πx(n−x)/n). No factorials are formed, so there is no overflow and the
 * result keeps full relative precision for n in the millions and for tails far below 1e-300
 * (the result is a logarithm). Same scheme as dbinom_raw in R's nmath. Internal, unchecked.
 */
export function logBinomialDensity(x: number, n: number, p: number, q: number): number {
  if (p === 0) return x === 0 ? 0 : -Infinity;
  if (q === 0) return x === n ? 0 : -Infinity;
  if (x === 0) {
    if (n === 0) return 0;
    return p < 0.1 ? -devianceTerm(n, n * q) - n * p : n * Math.log(q);
  }
  if (x === n) {
    return q < 0.1 ? -devianceTerm(n, n * p) - n * q : n * Math.log(p);
  }
  if (x < 0 || x > n) return -Infinity;
  const lc =
    stirlingError(n) - stirlingError(x) - stirlingError(n - x) - devianceTerm(x, n * p) - devianceTerm(n - x, n * q);
  const lf = LN_2PI + Math.log(x) + Math.log1p(-x / n);
  return lc - 0.5 * lf;
}

const LN_2PI = 1.837877066409345483560659472811;
