import { logGamma } from './log-gamma.js';

/**
 * Stirling's error term: log(n!) − [ (n + ½)·log(n) − n + log √(2π) ], for real n > 0.
 *
 * Method: C. Loader, "Fast and Accurate Computation of Binomial Probabilities" (2000) — the
 * values at the half-integers up to 15 are tabulated (computed here to 22 digits with arbitrary
 * precision arithmetic), other small n use log Γ, and larger n the asymptotic series
 * 1/(12n) − 1/(360n³) + 1/(1260n⁵) − 1/(1680n⁷) + 1/(1188n⁹), truncated as n grows. The same
 * scheme is used by R's nmath library (stirlerr). Internal: callers pass n > 0.
 */
export function stirlingError(n: number): number {
  if (n <= 15) {
    const nn = n + n;
    if (nn === Math.floor(nn)) return HALVES[nn]!;
    return logGamma(n + 1) - (n + 0.5) * Math.log(n) + n - LN_SQRT_2PI;
  }
  const nn = n * n;
  if (n > 500) return (S0 - S1 / nn) / n;
  if (n > 80) return (S0 - (S1 - S2 / nn) / nn) / n;
  if (n > 35) return (S0 - (S1 - (S2 - S3 / nn) / nn) / nn) / n;
  return (S0 - (S1 - (S2 - (S3 - S4 / nn) / nn) / nn) / nn) / n;
}

const LN_SQRT_2PI = 0.918938533204672741780329736406;
const S0 = 1 / 12;
const S1 = 1 / 360;
const S2 = 1 / 1260;
const S3 = 1 / 1680;
const S4 = 1 / 1188;

/** stirlingError(i / 2) for i = 0..30 (index 0 is a placeholder; n = 0 is never asked). */
const HALVES: readonly number[] = [
  0,
  0.1534264097200273452914, // n = 0.5
  0.08106146679532725821967, // n = 1
  0.05481412105191765389614, // n = 1.5
  0.04134069595540929409382, // n = 2
  0.03316287351993628748511, // n = 2.5
  0.02767792568499833914879, // n = 3
  0.02374616365629749597133, // n = 3.5
  0.02079067210376509311152, // n = 4
  0.01848845053267318523078, // n = 4.5
  0.01664469118982119216319, // n = 5
  0.01513497322191737887351, // n = 5.5
  0.01387612882307074799875, // n = 6
  0.01281046524292022692425, // n = 6.5
  0.01189670994589177009506, // n = 7
  0.01110455975820691732663, // n = 7.5
  0.01041126526197209649748, // n = 8
  0.00979941612615880329839, // n = 8.5
  0.009255462182712732917729, // n = 9
  0.008768700134139385462955, // n = 9.5
  0.008330563433362871256469, // n = 10
  0.00793411456431402054725, // n = 10.5
  0.007573675487951840794972, // n = 11
  0.007244554301320383179546, // n = 11.5
  0.006942840107209529865664, // n = 12
  0.006665247032707682442356, // n = 12.5
  0.00640899418800420706844, // n = 13
  0.006171712263039457647535, // n = 13.5
  0.005951370112758847735624, // n = 14
  0.005746216513010115682026, // n = 14.5
  0.005554733551962801371039, // n = 15
];
