import { devianceTerm } from './deviance-term.js';
import { stirlingError } from './stirling-error.js';

/**
 * log of the Poisson density λˣ·e^(−λ)/Γ(x + 1) for real x ≥ 0 and λ ≥ 0.
 *
 * Source: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000): with
 * Γ(x + 1) = √(2πx)·(x/e)^x·e^{δ(x)} ({@link stirlingError}) the density is
 *     p(x; λ) = exp(−δ(x) − D(x, λ)) / √(2πx),
 * D the deviance term ({@link devianceTerm}); at x = 0 it is e^(−λ). Also the prefactor
 * xᵃ·e^(−x)/Γ(a + 1) of the incomplete gamma function. Internal, unchecked.
 */
export function logPoissonDensity(x: number, lambda: number): number {
  if (x < 0 || !Number.isFinite(lambda)) return -Infinity;
  if (x === 0) return -lambda;
  if (lambda === 0) return -Infinity;
  return -stirlingError(x) - devianceTerm(x, lambda) - 0.5 * (LN_2PI + Math.log(x));
}

const LN_2PI = 1.837877066409345483560659472811;
