import { SamplingInputError } from '../errors.js';
import { hyperLogPmf } from './hypergeometric-log-pmf.js';
import { tolerableCount } from './tolerable-count.js';
import type { CombinedUpperLimitOptions, CombinedUpperLimitResult, PopulationPart } from './types.js';
import { upperLimit } from './upper-limit.js';
import { checkConfidence, checkCount, checkOptions, checkRate } from './validate.js';
import { withinRisk } from './within-risk.js';

/** The most (allocation × outcome) products the exact search may compute. */
const WORK_LIMIT = 3e7;

/**
 * The upper deviation limit of a population tested in parts, each with its own random sample
 * (locations; the interim and roll-forward parts of a period): a limit on the whole population's
 * deviations M = M_1 + … + M_P, where part i has N_i units, n_i tested, k_i found.
 *
 * Method: inversion of the exact test, with the allocation across parts as a nuisance
 * parameter maximised over. The statistic is the estimated total of deviations
 * T = Σ N_i·X_i / n_i (X_i hypergeometric, independent across parts); its observed value is
 * t = Σ N_i·k_i / n_i (compared in exact whole-number arithmetic). A candidate total m is
 * plausible when, for the worst allocation M_1 + … + M_P = m (the one that makes a result as
 * good as the one observed most likely), P(T ≤ t) > β = 1 − confidence. P(T ≤ t) falls as any
 * M_i grows, so the plausible totals form a range 0..M_U, found by bisection; the limit is M_U and
 * the rate M_U ÷ N. For one part this is exactly the hypergeometric limit of {@link upperLimit}.
 * The principle (p-values maximised over the nuisance parameter) is that of R. L. Berger and
 * D. D. Boos, JASA 89 (1994); its use for proportions of a stratified finite population is
 * J. P. Wendell and J. Schmee, JASA 91 (1996) (both from memory).
 *
 * Beside it, the simple conservative bound: the sum of the parts' own hypergeometric limits,
 * each at confidence 1 − β/P (Bonferroni), which also covers the whole population at least at
 * the stated confidence but is wider.
 *
 * The exact search enumerates every allocation of m (for P parts, about m^(P−1) of them), so it
 * is practical for two or three parts; beyond a work limit the exact figures are null and the
 * note says so (the conservative bound is always given).
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function combinedUpperLimit(options: CombinedUpperLimitOptions): CombinedUpperLimitResult {
  checkOptions(options, 'combinedUpperLimit');
  const { parts, confidence, tolerableRate } = options;
  checkConfidence(confidence);
  if (tolerableRate !== undefined) checkRate('tolerableRate', tolerableRate);
  if (!Array.isArray(parts) || parts.length === 0) {
    throw new SamplingInputError('parts', 'parts must be a non-empty list of { populationSize, sampleSize, deviations }.');
  }
  parts.forEach((p: PopulationPart, i: number) => {
    if (typeof p !== 'object' || p === null) throw new SamplingInputError(`parts[${i}]`, `parts[${i}] must be { populationSize, sampleSize, deviations }.`);
    checkCount(`parts[${i}].populationSize`, p.populationSize, 1);
    checkCount(`parts[${i}].sampleSize`, p.sampleSize, 1);
    checkCount(`parts[${i}].deviations`, p.deviations, 0);
    if (p.sampleSize > p.populationSize) {
      throw new SamplingInputError(`parts[${i}].sampleSize`, `parts[${i}].sampleSize (${p.sampleSize}) cannot exceed its populationSize (${p.populationSize}).`);
    }
    if (p.deviations > p.sampleSize) {
      throw new SamplingInputError(`parts[${i}].deviations`, `parts[${i}].deviations (${p.deviations}) cannot exceed its sampleSize (${p.sampleSize}).`);
    }
  });
  const beta = 1 - confidence;
  const N = parts.reduce((s, p) => s + p.populationSize, 0);
  const n = parts.reduce((s, p) => s + p.sampleSize, 0);
  const k = parts.reduce((s, p) => s + p.deviations, 0);
  const P = parts.length;
  const partConfidence = 1 - beta / P;
  const partLimits = parts.map((p) => upperLimit({ sampleSize: p.sampleSize, deviations: p.deviations, confidence: partConfidence, populationSize: p.populationSize }).deviationsInPopulation!);
  const consM = Math.min(N, partLimits.reduce((s, v) => s + v, 0));
  const result: CombinedUpperLimitResult = {
    confidence,
    populationSize: N,
    sampleSize: n,
    deviations: k,
    deviationsInPopulation: null,
    rate: null,
    worstAllocation: null,
    conservative: { deviationsInPopulation: consM, rate: consM / N, partLimits, partConfidence },
  };

  const search = exactSearch(parts, beta, consM);
  if (search === undefined) {
    result.note =
      `The exact combined limit needs too many allocations of the deviations across ${P} parts to enumerate; ` +
      'the conservative bound is given alone.';
  } else {
    result.deviationsInPopulation = search.limit;
    result.rate = search.limit / N;
    result.worstAllocation = search.allocation;
  }
  if (tolerableRate !== undefined) {
    result.tolerableRate = tolerableRate;
    const Mt = tolerableCount(N, tolerableRate);
    result.supported = (result.deviationsInPopulation ?? consM) < Mt;
    result.achievedRisk = search === undefined ? null : search.riskAt(Mt);
    result.conservativeRisk = conservativeRisk(parts, Mt);
  }
  return result;
}

/**
 * The smallest β' at which the Bonferroni bound (the sum of the parts' hypergeometric limits at
 * confidence 1 − β'/P) falls below mt, by bisection on β' (the bound falls as β' grows); 1 when
 * even β' = 1 leaves it at mt or above.
 */
function conservativeRisk(parts: readonly PopulationPart[], mt: number): number {
  const P = parts.length;
  const bound = (b: number) => parts.reduce((s, p) => s + upperLimit({ sampleSize: p.sampleSize, deviations: p.deviations, confidence: 1 - b / P, populationSize: p.populationSize }).deviationsInPopulation!, 0);
  const tiny = 1e-12;
  if (bound(tiny) < mt) return tiny;
  if (bound(1 - tiny) >= mt) return 1;
  let lo = tiny;
  let hi = 1 - tiny;
  for (let i = 0; i < 50 && hi - lo > 1e-10; i++) {
    const mid = (lo + hi) / 2;
    if (bound(mid) < mt) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** The exact limit, or undefined when the enumeration would exceed the work limit. */
function exactSearch(parts: readonly PopulationPart[], beta: number, upper: number): { limit: number; allocation: number[] | null; riskAt: (m: number) => number } | undefined {
  const P = parts.length;
  // Exact weights: N_i·x·(L/n_i) with L the least common multiple of the n_i.
  let L = 1n;
  for (const p of parts) L = lcm(L, BigInt(p.sampleSize));
  const w = parts.map((p) => (BigInt(p.populationSize) * L) / BigInt(p.sampleSize));
  const t = parts.reduce((s, p, i) => s + w[i]! * BigInt(p.deviations), 0n);
  // Every outcome (x_1, …, x_P) with Σ w_i·x_i ≤ t.
  const outcomes: number[][] = [];
  const walk = (i: number, left: bigint, acc: number[]): void => {
    if (outcomes.length > 1e5) return;
    if (i === P) {
      outcomes.push([...acc]);
      return;
    }
    const top = Math.min(parts[i]!.sampleSize, Number(left / w[i]!));
    for (let x = 0; x <= top; x++) {
      acc.push(x);
      walk(i + 1, left - w[i]! * BigInt(x), acc);
      acc.pop();
    }
  };
  walk(0, t, []);
  if (outcomes.length > 1e5) return undefined;
  const xMax = parts.map((_, i) => Math.max(...outcomes.map((o) => o[i]!)));
  const Nn = parts.map((p) => p.populationSize);
  // Work estimate at the largest candidate: allocations × outcomes.
  let allocations = 1;
  for (let i = 0; i < P - 1; i++) allocations *= Math.min(Nn[i]!, upper) + 1;
  if (allocations * outcomes.length * (Math.log2(upper + 2) + 2) > WORK_LIMIT) return undefined;
  const pmf = (i: number, x: number, M: number): number => Math.exp(hyperLogPmf(x, Nn[i]!, M, parts[i]!.sampleSize));
  // p(m) = max over allocations of P(T ≤ t); returns the maximising allocation too.
  const worst = (m: number): { value: number; allocation: number[] } => {
    let best = -1;
    let bestAlloc: number[] = [];
    const tables: Array<Map<number, number[]>> = parts.map(() => new Map());
    const column = (i: number, M: number): number[] => {
      let col = tables[i]!.get(M);
      if (!col) {
        col = [];
        for (let x = 0; x <= xMax[i]!; x++) col.push(pmf(i, x, M));
        tables[i]!.set(M, col);
      }
      return col;
    };
    const alloc: number[] = [];
    const rec = (i: number, left: number): void => {
      if (i === P - 1) {
        if (left > Nn[i]!) return;
        alloc.push(left);
        const cols = alloc.map((M, j) => column(j, M));
        let s = 0;
        for (const o of outcomes) {
          let prod = 1;
          for (let j = 0; j < P && prod > 0; j++) prod *= cols[j]![o[j]!]!;
          s += prod;
        }
        if (s > best) {
          best = s;
          bestAlloc = [...alloc];
        }
        alloc.pop();
        return;
      }
      // The later parts can hold at most the sum of their sizes.
      let restCap = 0;
      for (let j = i + 1; j < P; j++) restCap += Nn[j]!;
      for (let M = Math.max(0, left - restCap); M <= Math.min(Nn[i]!, left); M++) {
        alloc.push(M);
        rec(i + 1, left - M);
        alloc.pop();
      }
    };
    rec(0, m);
    return { value: best, allocation: bestAlloc };
  };
  const plausible = (m: number): boolean => !withinRisk(worst(m).value, beta);
  const lowest = parts.reduce((s, p) => s + p.deviations, 0); // P(T ≤ t) = 1 there: no sample shows more than M_i
  const highest = parts.reduce((s, p) => s + p.populationSize - (p.sampleSize - p.deviations), 0);
  // Start at the conservative bound (usually above the exact limit), then bisect; if it is still
  // plausible, double the step upwards first.
  // The risk of overreliance at a total m: the worst allocation's P(T ≤ t); 1 at or below the
  // deviations seen, 0 beyond what the untested units can hold.
  const riskAt = (m: number): number => (m <= lowest ? 1 : m > highest ? 0 : Math.min(1, worst(m).value));
  let lo = lowest;
  let hi = Math.min(Math.max(upper, lowest + 1), highest);
  let step = Math.max(1, hi - lo);
  while (plausible(hi)) {
    lo = hi;
    if (hi === highest) return { limit: highest, allocation: null, riskAt };
    step *= 2;
    hi = Math.min(highest, hi + step);
  }
  while (hi - lo > 1) {
    const mid = lo + Math.floor((hi - lo) / 2);
    if (plausible(mid)) lo = mid;
    else hi = mid;
  }
  return { limit: lo, allocation: worst(lo + 1).allocation, riskAt };
}

function lcm(a: bigint, b: bigint): bigint {
  const g = (x: bigint, y: bigint): bigint => (y === 0n ? x : g(y, x % y));
  return (a / g(a, b)) * b;
}
