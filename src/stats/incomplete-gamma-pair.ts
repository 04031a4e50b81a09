import { logPoissonDensity } from './log-poisson-density.js';

/**
 * The regularized incomplete gamma functions [P(a, x), Q(a, x) = 1 − P(a, x)] for x ≥ 0 and real
 * a > 0; the smaller side is computed directly.
 *
 * Method: the series P = xᵃe⁻ˣ/Γ(a+1) · Σ xʲ/((a+1)…(a+j)) for x < a + 1, else the continued
 * fraction for Q by the modified Lentz algorithm (Numerical Recipes, 3rd ed., §6.2, "gser" and
 * "gcf"). The prefactor xᵃe⁻ˣ/Γ(a+1) is Loader's Poisson density at (a; x), so no log-gamma
 * differences are formed. For whole a, Q(k + 1, λ) = P(X ≤ k) for X ~ Poisson(λ). Internal.
 */
export function incompleteGammaPair(x: number, a: number): [lower: number, upper: number] {
  if (x <= 0) return [0, 1];
  if (!Number.isFinite(x)) return [1, 0];
  const prefactor = Math.exp(logPoissonDensity(a, x)); // xᵃ e⁻ˣ / Γ(a + 1)
  if (x < a + 1) {
    let sum = 1;
    let term = 1;
    for (let j = 1; j < 1_000_000; j++) {
      term *= x / (a + j);
      sum += term;
      if (term <= 1e-17 * sum) break;
    }
    const lower = prefactor * sum;
    return [lower, 1 - lower];
  }
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1_000_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= 1e-16) break;
  }
  const upper = a * prefactor * h; // xᵃ e⁻ˣ / Γ(a) · CF
  return [1 - upper, upper];
}

const TINY = 1e-300;
