/**
 * Natural logarithm of the gamma function, log Γ(x), for real x > 0.
 *
 * Method: the Lanczos approximation with g = 7 and nine coefficients (C. Lanczos, "A Precise
 * Approximation of the Gamma Function", SIAM J. Numer. Anal. B 1 (1964); coefficients as
 * tabulated by P. Godfrey), relative error about 1e-15. Values below ½ use
 * log Γ(x) = log Γ(x + 1) − log x. The engine uses it only where its arguments are small
 * (Stirling's error for non-half-integers up to 15, beta functions of small parameters); large
 * arguments go through {@link stirlingError}, which keeps full relative precision.
 */
export function logGamma(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return Number.NaN;
  if (x < 0.5) return logGamma(x + 1) - Math.log(x);
  const z = x - 1;
  let a = C[0]!;
  const t = z + G + 0.5;
  for (let i = 1; i < C.length; i++) a += C[i]! / (z + i);
  return LN_SQRT_2PI + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

const G = 7;
const LN_SQRT_2PI = 0.918938533204672741780329736406;
const C: readonly number[] = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];
