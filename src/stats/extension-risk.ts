import { acceptanceNumberOf } from './acceptance-number.js';
import { extensionOf, extensionSetup, extensionSize } from './extension-size.js';
import { after, cdfAt, drawAt, eachPmf, logPmf, type Draw } from './plan-draw.js';
import type { ExtensionRiskOptions, ExtensionRiskResult } from './types.js';
import { withinRisk } from './within-risk.js';
import { NoPracticalSizeError } from '../errors.js';

/** Stop summing a distribution once its remaining mass is below this. */
const TAIL = 1e-16;
/**
 * Paths whose probability falls below this are dropped, and so are the terms of each extension's
 * distribution below 1e-17 (and below this divided by the path's probability); what is dropped
 * stays far below 1e-12 in total.
 */
const PRUNE = 1e-22;

/**
 * The honest figures of a sample extension. After k deviations in n items the single-stage
 * figure m ({@link extensionSize}) says how many more items, none deviating, would bring the
 * risk of overreliance at n + m items and k deviations within β. But the extension was decided
 * after the first look, so the risk of what is actually done is that of a two-stage procedure:
 *
 * - procedureRisk: "test n; with at most c deviations rely (c = the acceptance number of n);
 *   with x > c extend by m(x) and rely only if none of the m(x) deviates" (no extension when
 *   none is practical, or x = n), at the tolerable rate:
 *   P(X ≤ c) + Σ_{x>c} P(X = x)·P(no deviation in m(x) | x).
 * - repeatedProcedureRisk: the same, but after an extension that finds deviations, extend again
 *   by the single-stage figure for the new totals, until the results support reliance or no
 *   extension is practical: R(n, k) = 1 if risk(n, k) ≤ β; 0 if no extension; else
 *   P(0 in m) + Σ_{j≥1} P(j in m)·R(n + m, k + j).
 *
 * Both are exact sums over the outcomes (binomial; hypergeometric with M = ⌈TDR·N⌉ and each
 * extension drawn from the untested remainder; Poisson), each distribution summed until its
 * remaining mass is below 1e-16. Extensions never exceed the untested remainder of a known
 * population. Both risks are at least the planned β whenever the first look can fail.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function extensionRisk(options: ExtensionRiskOptions): ExtensionRiskResult {
  const { n, k, tolerableRate, populationSize, model, beta, risk, cap } = extensionSetup(options, 'extensionRisk');
  const c = acceptanceNumberOf(risk, n, beta);
  const d = drawAt(model, tolerableRate, populationSize, 'ceil');
  const result: ExtensionRiskResult = {
    sampleSize: n,
    deviations: k,
    model,
    plannedRisk: beta,
    acceptanceNumber: c,
    extensionSize: null,
    totalSize: null,
    singleStageFigure: null,
    procedureRisk: procedureRisk(d, risk, n, beta, cap, c),
    repeatedProcedureRisk: repeatedRisk(d, risk, n, beta, cap),
  };
  try {
    const m = extensionSize(options);
    result.extensionSize = m;
    result.totalSize = n + m;
    result.singleStageFigure = risk(n + m, k);
  } catch (e) {
    if (!(e instanceof NoPracticalSizeError)) throw e;
    result.note = e.message;
  }
  return result;
}

function procedureRisk(d: Draw, risk: (n: number, k: number) => number, n: number, beta: number, cap: number, c: number | null): number {
  const c0 = c ?? -1;
  let total = cdfAt(d, n, c0);
  let mass = total;
  for (let x = c0 + 1; x <= n && 1 - mass > TAIL; x++) {
    const px = Math.exp(logPmf(d, n, x));
    mass += px;
    if (px === 0) continue;
    const m = extensionOf(risk, n, x, beta, cap);
    if (m === null) continue;
    total += px * Math.exp(logPmf(after(d, n, x), m, 0));
  }
  return Math.min(1, total);
}

function repeatedRisk(d: Draw, risk: (n: number, k: number) => number, n0: number, beta: number, cap: number): number {
  // t*(k): the smallest total with risk(t, k) ≤ β (null beyond the cap). An extension after k
  // deviations always brings the total to t*(k), whatever was tested before.
  const targets = new Map<number, number | null>();
  const target = (k: number): number | null => {
    let t = targets.get(k);
    if (t !== undefined) return t;
    const m = extensionOf(risk, k + 1, k, beta, cap);
    t = m === null ? null : withinRisk(risk(k + 1, k), beta) ? firstPassing(risk, k, beta) : k + 1 + m;
    targets.set(k, t);
    return t;
  };
  let accepted = 0;
  // levels.get(L)[k' − L − 1]: mass of the paths whose total is t*(L), with k' > L deviations, not yet relied on.
  const levels = new Map<number, number[]>();

  // One extension from "total tested, k deviations" (k already known not to support reliance).
  const extend = (total: number, k: number, mass: number): void => {
    if (k >= total) return;
    const t = target(k);
    if (t === null || t <= total) return;
    const rest = after(d, total, k);
    const m = t - total;
    let row = levels.get(k);
    if (!row) levels.set(k, (row = []));
    const into = row;
    eachPmf(
      rest,
      m,
      (j, pj) => {
        const w = mass * pj;
        if (j === 0) accepted += w;
        else if (w >= PRUNE) {
          while (into.length < j) into.push(0);
          into[j - 1]! += w;
        }
      },
      Math.min(1e-17, PRUNE / mass),
    );
  };
  let seen = 0;
  let maxLevel = -1;
  for (let x = 0; x <= n0 && 1 - seen > TAIL; x++) {
    const px = Math.exp(logPmf(d, n0, x));
    seen += px;
    if (px === 0) continue;
    if (withinRisk(risk(n0, x), beta)) accepted += px;
    else extend(n0, x, px);
  }
  for (let level = 0; levels.size > 0; level++) {
    const row = levels.get(level);
    if (!row) {
      maxLevel = Math.max(...levels.keys());
      if (level > maxLevel) break;
      continue;
    }
    levels.delete(level);
    const total = target(level)!;
    for (let i = 0; i < row.length; i++) if (row[i]! > 0) extend(total, level + 1 + i, row[i]!);
  }
  return Math.min(1, accepted);
}

/** The smallest n ≥ 1 with risk(n, k) ≤ β, known to be at most k + 1. */
function firstPassing(risk: (n: number, k: number) => number, k: number, beta: number): number {
  let n = Math.max(1, k);
  while (n > 1 && withinRisk(risk(n - 1, k), beta)) n--;
  return n;
}
