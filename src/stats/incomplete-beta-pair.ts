import { logBinomialDensity } from './log-binomial-density.js';

/**
 * The regularized incomplete beta function and its complement, [I_x(a, b), 1 − I_x(a, b)], for
 * 0 ≤ x ≤ 1 and real a, b > 0. The smaller side is computed directly, the other as 1 − it, so
 * either tail keeps its relative precision.
 *
 * Method: the continued fraction for I_x(a, b) evaluated by the modified Lentz algorithm
 * (W. H. Press et al., Numerical Recipes, 3rd ed., §6.4, "betacf"), used for
 * x < (a + 1)/(a + b + 2) and otherwise through the symmetry I_x(a, b) = 1 − I_(1−x)(b, a). The
 * prefactor xᵃ(1−x)ᵇ / (a·B(a, b)) is computed as b/(a + b) times Loader's binomial density at
 * (a; a + b, x) — no log-gamma differences, so full precision for a + b in the tens of thousands.
 * Internal, unchecked.
 */
export function incompleteBetaPair(x: number, a: number, b: number): [lower: number, upper: number] {
  if (x <= 0) return [0, 1];
  if (x >= 1) return [1, 0];
  if (x < (a + 1) / (a + b + 2)) {
    const lower = Math.exp(logBinomialDensity(a, a + b, x, 1 - x)) * (b / (a + b)) * continuedFraction(x, a, b);
    return [lower, 1 - lower];
  }
  const y = 1 - x;
  const upper = Math.exp(logBinomialDensity(b, a + b, y, x)) * (a / (a + b)) * continuedFraction(y, b, a);
  return [1 - upper, upper];
}

const TINY = 1e-300;
const EPS = 1e-16;

function continuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 100_000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= EPS) break;
  }
  return h;
}
