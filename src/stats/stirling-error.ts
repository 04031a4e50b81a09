/**
 * Stirling's error δ(n) = log Γ(n + 1) − [(n + ½)·log n − n + ½·log(2π)], the amount by which
 * Stirling's formula misses log n!, for real n > 0 (δ(0) = +∞).
 *
 * Source: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000), which
 * writes the binomial density through δ so that no factorial is formed. Evaluation, in three
 * ranges whose cut-offs follow from the error bounds below and are checked against arbitrary
 * precision in tests/reference/special-functions.test.ts:
 * - n ≥ 13: the Stirling series δ(n) ~ Σ_k B_{2k} / (2k(2k − 1)·n^{2k−1}) (NIST DLMF 5.11.1 with
 *   the Bernoulli numbers of DLMF 24.2), with coefficients 1/12, −1/360, 1/1260, −1/1680, 1/1188,
 *   −691/360360, 1/156, −3617/122400. The error of a truncated series is below its first
 *   omitted term; relative to δ(n) ≈ 1/(12n) that term is below 1e-17 with 8 terms from n ≥ 13,
 *   5 terms from n ≥ 35, 4 from n ≥ 80 and 3 from n ≥ 300, so fewer terms are summed as n grows.
 * - n < 13 whole or half-whole: a table of δ(n) at n = ½, 1, 1½, …, 12½, computed with mpmath
 *   1.3.0 at 50 significant digits from the definition above and rounded once.
 * - other n < 13: the recursion δ(n) = δ(n + 1) + (n + ½)·log(1 + 1/n) − 1 (from
 *   Γ(n + 2) = (n + 1)·Γ(n + 1)), applied upward until the argument reaches 13; each step adds
 *   about one rounding unit of absolute error (measured: below 2e-15 absolute).
 */
export function stirlingError(n: number): number {
  if (n >= 13) return series(n);
  if (n <= 0) return n === 0 ? Infinity : Number.NaN;
  const twice = 2 * n;
  if (Number.isInteger(twice)) return HALF_STEPS[twice - 1]!;
  let shift = 0;
  let m = n;
  while (m < 13) {
    shift += (m + 0.5) * Math.log1p(1 / m) - 1;
    m += 1;
  }
  return series(m) + shift;
}

function series(n: number): number {
  const r = 1 / (n * n);
  if (n >= 300) return (C1 - r * (C2 - r * C3)) / n;
  if (n >= 80) return (C1 - r * (C2 - r * (C3 - r * C4))) / n;
  if (n >= 35) return (C1 - r * (C2 - r * (C3 - r * (C4 - r * C5)))) / n;
  return (C1 - r * (C2 - r * (C3 - r * (C4 - r * (C5 - r * (C6 - r * (C7 - r * C8))))))) / n;
}

// |B_{2k}| / (2k(2k − 1)) for k = 1 … 8; the signs alternate (written into the Horner forms above).
const C1 = 1 / 12;
const C2 = 1 / 360;
const C3 = 1 / 1260;
const C4 = 1 / 1680;
const C5 = 1 / 1188;
const C6 = 691 / 360360;
const C7 = 1 / 156;
const C8 = 3617 / 122400;

/** δ(n) for n = ½, 1, 1½, …, 12½ (mpmath 1.3.0, 50 digits, rounded once). */
const HALF_STEPS: readonly number[] = [
  0.15342640972002736, 0.08106146679532726, 0.05481412105191765, 0.0413406959554093, 0.03316287351993629,
  0.02767792568499834, 0.023746163656297496, 0.020790672103765093, 0.018488450532673187, 0.016644691189821193,
  0.015134973221917378, 0.013876128823070748, 0.012810465242920227, 0.01189670994589177, 0.011104559758206917,
  0.010411265261972096, 0.009799416126158804, 0.009255462182712733, 0.008768700134139386, 0.00833056343336287,
  0.00793411456431402, 0.007573675487951841, 0.007244554301320383, 0.00694284010720953, 0.006665247032707682,
];
