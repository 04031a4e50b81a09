import { ceilTimes, floorDivide } from './exact-rate.js';
import { hyperLogPmf } from './hypergeometric-log-pmf.js';
import { logBinomialDensity } from './log-binomial-density.js';
import { withinRisk } from './within-risk.js';

/** The model behind a risk function, for the fast path of {@link smallestSampleSize}. Internal. */
export type WalkModel = { kind: 'binomial'; p: number } | { kind: 'hypergeometric'; N: number; M: number };

/** Runs of equal k_e beyond which the fast path is used (below it the plain run scan is quick). */
const FAST_PATH_RUNS = 2000;
/** Berry–Esseen constant for sums of independent, not identically distributed summands (I. Shevtsova, 2010). */
const BERRY_ESSEEN = 0.56;

/**
 * The smallest n in 1..cap with risk(n, k_e(n)) ≤ β, where k_e(n) = ⌈n·EDR⌉ (exact, from the
 * rate's decimal digits); undefined if none.
 *
 * Method (exact search, not an approximation): the risk is not monotone in n because k_e jumps,
 * but within a run of sizes sharing the same k_e it falls as n grows (one more item can only add
 * deviations). Run k holds the sizes ⌊(k−1)/EDR⌋ + 1 … ⌊k/EDR⌋; a run passes iff its last size
 * passes, and the first passing run is searched by bisection for its first passing size. This
 * returns exactly what testing n = 1, 2, 3, … in turn would return. `stopAt` ends the search
 * when k_e reaches a count that can never pass (the tolerable deviations in a finite population).
 *
 * When there are more than 2,000 runs (sizes in the hundreds of thousands or millions, for a
 * population of 10⁸ or 10⁹ with the expected rate close to the tolerable rate), and `walk` names
 * the binomial or hypergeometric model, two exact devices replace the run-by-run evaluation:
 *
 * 1. Blocks of runs k1..k2 are skipped when a certified lower bound on risk(b_{k2}, k1) is above
 *    β: every run in the block has at most b_{k2} items and at least k1 deviations allowed, so
 *    its risk is at least risk(b_{k2}, k1) (the risk falls with n and rises with k). The lower
 *    bound is Φ((k − μ)/σ) − 0.56/σ: the Berry–Esseen inequality for a sum of independent
 *    Bernoulli variables with the constant 0.5600 of I. Shevtsova (2010), which applies to the
 *    hypergeometric count too, since it is distributed as such a sum (its generating polynomial
 *    has only real roots; V. A. Vatutin and V. G. Mikhailov, 1982). Block lengths double while
 *    the bound holds and halve when it does not.
 * 2. Where the bound no longer certifies, the remaining runs are walked item by item with the
 *    exact recurrences P_{n+1}(X ≤ k) = P_n(X ≤ k) − P_n(X = k)·p_next (p_next = TDR, or
 *    (M−k)/(N−n) without replacement) and P(X = k+1)/P(X = k), re-anchored on the exact risk
 *    every 256 runs; any run the walk finds within 1e-6 (relative) of β is decided by the exact
 *    risk itself. So the answer is still that of the plain scan. Internal.
 */
export function smallestSampleSize(
  risk: (n: number, k: number) => number,
  expectedRate: number,
  beta: number,
  cap: number,
  stopAt = Infinity,
  walk?: WalkModel,
): { sampleSize: number; expectedDeviations: number; achievedRisk: number } | undefined {
  if (cap < 1) return undefined;
  const found = (lo: number, hi: number, k: number) => {
    while (lo < hi) {
      const mid = Math.floor((lo + hi) / 2);
      if (withinRisk(risk(mid, k), beta)) hi = mid;
      else lo = mid + 1;
    }
    return { sampleSize: lo, expectedDeviations: k, achievedRisk: risk(lo, k) };
  };
  if (expectedRate === 0) {
    if (stopAt <= 0) return undefined;
    return withinRisk(risk(cap, 0), beta) ? found(1, cap, 0) : undefined;
  }
  const first = (k: number): number => floorDivide(k - 1, expectedRate) + 1;
  const last = (k: number): number => Math.min(cap, floorDivide(k, expectedRate));
  const lastRun = Math.min(ceilTimes(cap, expectedRate), stopAt - 1);
  if (lastRun < 1) return undefined;
  let k = 1;
  if (walk !== undefined && lastRun > FAST_PATH_RUNS) {
    const bound = lowerBound(walk);
    let s = 1;
    while (k <= lastRun) {
      const k2 = Math.min(lastRun, k + s - 1);
      if (bound(last(k2), k) > beta * (1 + 1e-9)) {
        k = k2 + 1;
        s *= 2;
        continue;
      }
      if (s > 1) {
        s = Math.max(1, s >> 1);
        continue;
      }
      const b = last(k);
      if (b > 20_000) return walkRuns(walk, risk, k, lastRun, first, last, beta, found);
      if (withinRisk(risk(b, k), beta)) return found(first(k), b, k);
      k++;
      s = 2;
    }
    return undefined;
  }
  for (; k <= lastRun; k++) {
    const b = last(k);
    if (withinRisk(risk(b, k), beta)) return found(first(k), b, k);
  }
  return undefined;
}

/**
 * A lower bound on Φ(z): the approximation 7.1.26 of M. Abramowitz and I. A. Stegun, Handbook of
 * Mathematical Functions (1964), whose error in erf is at most 1.5e-7, less 1e-7 (the error
 * carried into Φ = (1 + erf(z/√2))/2 is at most 0.75e-7). Only used to skip runs that fail by far.
 */
function normalCdfLow(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
  const erfc = poly * Math.exp(-x * x);
  const phi = z < 0 ? 0.5 * erfc : 1 - 0.5 * erfc;
  return phi - 1e-7;
}

/** Φ((k − μ)/σ) − 0.56/σ, less the error of Φ: a lower bound on P(X ≤ k) (Berry–Esseen). */
function lowerBound(walk: WalkModel): (n: number, k: number) => number {
  return (n, k) => {
    let mean: number;
    let variance: number;
    if (walk.kind === 'binomial') {
      mean = n * walk.p;
      variance = n * walk.p * (1 - walk.p);
    } else {
      const { N, M } = walk;
      const f = M / N;
      mean = n * f;
      variance = N > 1 ? (n * f * (1 - f) * (N - n)) / (N - 1) : 0;
    }
    if (!(variance > 0)) return 0;
    const sd = Math.sqrt(variance);
    const z = (k - mean) / sd;
    return normalCdfLow(z) - BERRY_ESSEEN / sd;
  };
}

function logPmf(walk: WalkModel, n: number, k: number): number {
  if (walk.kind === 'binomial') return k > n ? -Infinity : logBinomialDensity(k, n, walk.p, 1 - walk.p);
  return hyperLogPmf(k, walk.N, walk.M, n);
}

/** Step 2 of {@link smallestSampleSize}: the exact walk over runs from k0. */
function walkRuns(
  walk: WalkModel,
  risk: (n: number, k: number) => number,
  k0: number,
  lastRun: number,
  first: (k: number) => number,
  last: (k: number) => number,
  beta: number,
  found: (lo: number, hi: number, k: number) => { sampleSize: number; expectedDeviations: number; achievedRisk: number },
): { sampleSize: number; expectedDeviations: number; achievedRisk: number } | undefined {
  const hyper = walk.kind === 'hypergeometric';
  const p = walk.kind === 'binomial' ? walk.p : 0;
  const N = hyper ? walk.N : 0;
  const M = hyper ? walk.M : 0;
  let n = last(k0);
  let cdf = risk(n, k0);
  let pmf = Math.exp(logPmf(walk, n, k0));
  let sinceAnchor = 0;
  for (let k = k0; k <= lastRun; k++) {
    const b = last(k);
    // Move along n to b at fixed k.
    while (n < b) {
      const next = hyper ? (M - k) / (N - n) : p;
      cdf -= pmf * next;
      pmf *= hyper ? ((n + 1) * (N - M - n + k)) / ((n + 1 - k) * (N - n)) : ((n + 1) * (1 - p)) / (n + 1 - k);
      n++;
    }
    if (++sinceAnchor >= 256 || !(pmf > 1e-280) || !(cdf > 0)) {
      cdf = risk(n, k);
      pmf = Math.exp(logPmf(walk, n, k));
      sinceAnchor = 0;
    }
    if (cdf <= beta * (1 + 1e-6)) {
      const exact = risk(n, k);
      if (withinRisk(exact, beta)) return found(first(k), b, k);
      cdf = exact;
      pmf = Math.exp(logPmf(walk, n, k));
      sinceAnchor = 0;
    }
    // Allow one more deviation at the same n.
    if (k + 1 > n) {
      pmf = 0;
    } else {
      pmf *= hyper ? ((M - k) * (n - k)) / ((k + 1) * (N - M - n + k + 1)) : ((n - k) * p) / ((k + 1) * (1 - p));
    }
    cdf += pmf;
    if (!(pmf > 1e-280)) {
      cdf = risk(n, k + 1);
      pmf = Math.exp(logPmf(walk, n, k + 1));
      sinceAnchor = 0;
    }
  }
  return undefined;
}
