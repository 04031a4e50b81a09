/**
 * The deviance term bd0(x, m) = x·log(x/m) + m − x, computed without cancellation when x is close
 * to m (then by the series 2x·Σ v^(2j+1)/(2j+1) with v = (x − m)/(x + m)).
 *
 * Method: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000); the same
 * function is bd0 in R's nmath library. Internal: callers pass x ≥ 0, m > 0.
 */
export function devianceTerm(x: number, m: number): number {
  if (Math.abs(x - m) < 0.1 * (x + m)) {
    let v = (x - m) / (x + m);
    let s = (x - m) * v;
    if (Math.abs(s) < Number.MIN_VALUE) return s;
    let ej = 2 * x * v;
    v *= v;
    for (let j = 1; j < 1000; j++) {
      ej *= v;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
  }
  return x * Math.log(x / m) + m - x;
}
