/**
 * Value of the continued fraction 1 + c₁/(1 + c₂/(1 + c₃/(1 + …))), all partial denominators 1.
 *
 * Method: the modified Lentz algorithm (W. J. Lentz, "Generating Bessel functions in Mie
 * scattering calculations using continued fractions", Applied Optics 15 (1976); modified by
 * I. J. Thompson and A. R. Barnett, "Coulomb and Bessel functions of complex arguments and order",
 * J. Comput. Phys. 64 (1986)). The value is built as a product of ratios of successive
 * convergents, f_m = f_{m−1}·(A_m/A_{m−1})·(B_{m−1}/B_m), carrying the two ratios
 * ratioA = A_m/A_{m−1} = 1 + c_m/ratioA and ratioB = B_{m−1}/B_m = 1/(1 + c_m·ratioB); a ratio that
 * comes out exactly 0 is replaced by a tiny number (the "modification"), which lets the product
 * step over a vanishing convergent. It stops when the factor ratioA·ratioB is 1 to within one
 * rounding unit, or after maxSteps (returning the last convergent).
 *
 * Both incomplete functions of the engine are written in this shape ({@link incompleteBeta},
 * {@link incompleteGamma}). Internal, unchecked.
 */
export function unitContinuedFraction(coefficient: (m: number) => number, maxSteps = 100_000): number {
  let value = 1;
  let ratioA = 1;
  let ratioB = 0;
  for (let m = 1; m <= maxSteps; m++) {
    const c = coefficient(m);
    ratioB = 1 + c * ratioB;
    ratioB = ratioB === 0 ? 1 / TINY : 1 / ratioB;
    ratioA = 1 + c / ratioA;
    if (ratioA === 0) ratioA = TINY;
    const step = ratioA * ratioB;
    value *= step;
    if (Math.abs(step - 1) <= Number.EPSILON) break;
  }
  return value;
}

/** Stand-in for a ratio that comes out 0 (Thompson and Barnett's choice: near the smallest normal double). */
const TINY = 1e-300;
