/**
 * The sampling distribution of the deviations in a draw of n items, for the functions that work
 * on whole plans (two-stage plans, extensions, operating characteristics). Internal, unchecked:
 * the public functions check their inputs first.
 *
 * - binomial: X ~ Binomial(n, p) (each item deviates with probability p, independently);
 * - Poisson: X ~ Poisson(n·p) (the factor approximation);
 * - hypergeometric: X ~ Hypergeometric(N, M, n), n items drawn without replacement from N units of
 *   which M deviate; after a first stage of n1 items with x deviations, the second stage is drawn
 *   from the N − n1 untested units, M − x of which deviate.
 *
 * Probabilities come from Loader's saddle-point terms (C. Loader, 2000) in log space.
 */
import { binomialLogCdf } from './binomial-log-cdf.js';
import { floorTimes } from './exact-rate.js';
import { hyperLogCdf } from './hypergeometric-log-cdf.js';
import { hyperLogPmf } from './hypergeometric-log-pmf.js';
import { logBinomialDensity } from './log-binomial-density.js';
import { logPoissonDensity } from './log-poisson-density.js';
import { poissonLogCdf } from './poisson-log-cdf.js';
import { tolerableCount } from './tolerable-count.js';
import type { Model } from './types.js';

export type Draw =
  | { kind: 'binomial'; p: number }
  | { kind: 'poisson'; p: number }
  | { kind: 'hypergeometric'; N: number; M: number };

/**
 * The draw at a rate: for the hypergeometric model the population's deviations are
 * M = ⌈rate·N⌉ ('ceil', the convention at the tolerable rate) or ⌊rate·N⌋ ('floor', at the
 * expected rate: the most deviations that do not exceed it), computed exactly.
 */
export function drawAt(model: Model, rate: number, populationSize: number | undefined, rounding: 'ceil' | 'floor'): Draw {
  if (model === 'hypergeometric') {
    const N = populationSize!;
    const M = rounding === 'ceil' ? tolerableCount(N, rate) : Math.min(N, floorTimes(N, rate));
    return { kind: 'hypergeometric', N, M };
  }
  return { kind: model, p: rate };
}

/** The units a draw can still take from (Infinity for the binomial and Poisson models). */
export function available(d: Draw): number {
  return d.kind === 'hypergeometric' ? d.N : Infinity;
}

/** log P(X = x) in a draw of n. */
export function logPmf(d: Draw, n: number, x: number): number {
  if (x < 0) return -Infinity;
  switch (d.kind) {
    case 'binomial':
      return x > n ? -Infinity : logBinomialDensity(x, n, d.p, 1 - d.p);
    case 'poisson':
      return logPoissonDensity(x, n * d.p);
    case 'hypergeometric':
      return n === 0 ? (x === 0 ? 0 : -Infinity) : hyperLogPmf(x, d.N, d.M, n);
  }
}

/**
 * P(X = x) for x = 0..upTo in a draw of n: the exact term at the lowest point of the support,
 * then the ratio P(x+1)/P(x) (binomial (n−x)p/((x+1)q); Poisson λ/(x+1); hypergeometric
 * (M−x)(n−x)/((x+1)(N−M−n+x+1))), each term from its own exact logarithm whenever the running
 * product has underflowed.
 */
export function pmfUpTo(d: Draw, n: number, upTo: number): number[] {
  const out: number[] = new Array<number>(upTo + 1).fill(0);
  let start = 0;
  let ratio: (x: number) => number;
  switch (d.kind) {
    case 'binomial': {
      const odds = d.p / (1 - d.p);
      ratio = (x) => ((n - x) / (x + 1)) * odds;
      if (d.p === 0 || d.p === 1) {
        for (let x = 0; x <= upTo; x++) out[x] = Math.exp(logPmf(d, n, x));
        return out;
      }
      break;
    }
    case 'poisson': {
      const lambda = n * d.p;
      ratio = (x) => lambda / (x + 1);
      break;
    }
    case 'hypergeometric': {
      const { N, M } = d;
      start = Math.max(0, n - (N - M));
      ratio = (x) => ((M - x) * (n - x)) / ((x + 1) * (N - M - n + x + 1));
      break;
    }
  }
  let p = 0;
  for (let x = start; x <= upTo; x++) {
    p = p > 1e-250 ? p * ratio(x - 1) : Math.exp(logPmf(d, n, x));
    out[x] = p;
  }
  return out;
}

/** P(X ≤ k) in a draw of n. */
export function cdfAt(d: Draw, n: number, k: number): number {
  if (k < 0) return 0;
  if (n === 0) return 1;
  switch (d.kind) {
    case 'binomial':
      return Math.exp(binomialLogCdf(k, n, d.p));
    case 'poisson':
      return Math.exp(poissonLogCdf(k, n * d.p));
    case 'hypergeometric':
      return Math.exp(hyperLogCdf(k, d.N, d.M, n));
  }
}

/** The draw left after n items with x deviations have been tested. */
export function after(d: Draw, n: number, x: number): Draw {
  return d.kind === 'hypergeometric' ? { kind: 'hypergeometric', N: d.N - n, M: d.M - x } : d;
}

/**
 * Visit P(X = j) in a draw of n, outwards from the mode: the exact term at the mode, then the
 * ratios P(j+1)/P(j) upwards and P(j−1)/P(j) downwards, each direction stopping once its terms
 * fall below `floor` (absolute) or the support ends. With floor = 0 every term of the support is
 * visited. Internal.
 */
export function eachPmf(d: Draw, n: number, visit: (j: number, p: number) => void, floor = 0): void {
  let lo: number;
  let hi: number;
  let mode: number;
  let up: (j: number) => number; // P(j+1)/P(j)
  let down: (j: number) => number; // P(j−1)/P(j)
  switch (d.kind) {
    case 'binomial': {
      if (d.p === 0 || d.p === 1) {
        visit(d.p === 0 ? 0 : n, 1);
        return;
      }
      const odds = d.p / (1 - d.p);
      lo = 0;
      hi = n;
      mode = Math.min(n, Math.floor((n + 1) * d.p));
      up = (j) => ((n - j) / (j + 1)) * odds;
      down = (j) => j / ((n - j + 1) * odds);
      break;
    }
    case 'poisson': {
      const lambda = n * d.p;
      if (lambda === 0) {
        visit(0, 1);
        return;
      }
      lo = 0;
      hi = Infinity;
      mode = Math.floor(lambda);
      up = (j) => lambda / (j + 1);
      down = (j) => j / lambda;
      break;
    }
    case 'hypergeometric': {
      const { N, M } = d;
      lo = Math.max(0, n - (N - M));
      hi = Math.min(n, M);
      mode = Math.min(hi, Math.max(lo, Math.floor(((n + 1) * (M + 1)) / (N + 2))));
      up = (j) => ((M - j) * (n - j)) / ((j + 1) * (N - M - n + j + 1));
      down = (j) => (j * (N - M - n + j)) / ((M - j + 1) * (n - j + 1));
      break;
    }
  }
  const p0 = Math.exp(logPmf(d, n, mode));
  visit(mode, p0);
  let p = p0;
  for (let j = mode; j < hi; j++) {
    p *= up(j);
    if (!(p > floor) || p === 0) break;
    visit(j + 1, p);
  }
  p = p0;
  for (let j = mode; j > lo; j--) {
    p *= down(j);
    if (!(p > floor) || p === 0) break;
    visit(j - 1, p);
  }
}
