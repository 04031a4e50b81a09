/**
 * The deviance term D(x, M) = x·log(x/M) + M − x ≥ 0 of a count x against a mean M > 0
 * (D(0, M) = M), with full relative precision also when x is close to M.
 *
 * Source: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000), where the
 * binomial and Poisson densities are written through D. Near M the two parts of the formula
 * cancel (D ≈ (x − M)²/(2M) while each part is about |x − M|), so there it is rewritten with
 * v = (x − M)/(x + M), for which x/M = (1 + v)/(1 − v) and
 *     log((1 + v)/(1 − v)) = 2·(v + v³/3 + v⁵/5 + …),   x − M = v·(x + M),
 * which give D = (x − M)·v + 2x·Σ_{j≥1} v^{2j+1}/(2j + 1), every term of one sign and the first
 * dominant, summed until a term no longer changes the sum.
 * Cut-off: the series is used for |v| < 0.25, where it needs at most 14 terms; beyond, the
 * formula x·log1p((x − M)/M) + (M − x) is as accurate. Measured against mpmath at 50 digits
 * (300 random M from 0.1 to 10⁶ at each |v|): series about 3e-16 relative for every |v| ≤ ½;
 * the direct formula 2.7e-14 at |v| = 0.01, 2.2e-15 at 0.1, 1.1e-15 at 0.25, 6e-16 at 0.5.
 * Internal, unchecked.
 */
export function devianceTerm(x: number, m: number): number {
  if (x === 0) return m;
  const diff = x - m;
  const v = diff / (x + m);
  if (Math.abs(v) < 0.25) {
    const v2 = v * v;
    let power = 2 * x * v;
    let tail = 0;
    for (let j = 1; j < 100; j++) {
      power *= v2;
      const next = tail + power / (2 * j + 1);
      if (next === tail) break;
      tail = next;
    }
    return diff * v + tail;
  }
  const ratio = diff / m;
  if (Number.isFinite(ratio)) return x * Math.log1p(ratio) - diff;
  return x * (Math.log(x) - Math.log(m)) - diff;
}
