/**
 * One way to show figures everywhere (terminal, memo, re-performance report).
 * Percentages to one decimal place. Upper deviation limits and risks of overreliance are rounded
 * UP so that a memo never understates them; sample deviation rates and planning rates are
 * rounded to nearest. Exact values are shown separately where needed (memo appendix, --json).
 */

const EPS = 1e-12;

/** A fraction as a percentage to `dp` places, rounded to nearest: 0.02564 -> "2.6%". */
export function pct(fraction: number, dp = 1): string {
  return `${(fraction * 100).toFixed(dp)}%`;
}

/** A fraction as a percentage rounded up at `dp` places: 0.08162 -> "8.2%", 0.0601 -> "6.1%". */
export function pctUp(fraction: number, dp = 1): string {
  const f = 10 ** dp;
  // Subtract a hair so that values that are exact at this precision (0.05 -> 5.0%) stay put.
  const v = Math.ceil(fraction * 100 * f - EPS * f * 100) / f;
  return `${Math.min(100, Math.max(0, v)).toFixed(dp)}%`;
}

/** A planning rate as the user typed it: 6 -> "6%", 0.5 -> "0.5%", 2.25 -> "2.25%". */
export function pctPlain(fraction: number): string {
  return `${Number((fraction * 100).toPrecision(10))}%`;
}

/** An exact value for appendices: 0.081624... -> "8.1624%". */
export function pctExact(fraction: number, dp = 4): string {
  return `${(fraction * 100).toFixed(dp)}%`;
}

/** Integer with thousands separators: 12650 -> "12,650". */
export function int(n: number): string {
  return n.toLocaleString('en-US');
}

/**
 * An upper deviation limit, rounded up, compared with the tolerable rate. Rounded up to 0.1% a
 * limit just below the tolerable rate would read as equal to it (5.93% -> "6.0%" against 6%);
 * then more places are shown until it reads below (5.94%), so the figure is never understated
 * and never looks like the opposite decision.
 */
export function pctLimit(limit: number, tolerable?: number): string {
  if (tolerable === undefined || limit >= tolerable) return pctUp(limit);
  for (let dp = 1; dp <= 4; dp++) {
    const t = pctUp(limit, dp);
    if (Number.parseFloat(t) < tolerable * 100 - 1e-9) return t;
  }
  return pctUp(limit, 4);
}
