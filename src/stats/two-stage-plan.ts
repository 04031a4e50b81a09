import { NoPracticalSizeError } from '../errors.js';
import { acceptanceNumberOf } from './acceptance-number.js';
import { MAX_SAMPLE_SIZE } from './constants.js';
import { after, drawAt, pmfUpTo, type Draw } from './plan-draw.js';
import { planRisksOf } from './plan-risks.js';
import { resolveModel } from './resolve-model.js';
import { riskFunction } from './risk-function.js';
import { searchSize } from './sample-size.js';
import { sizeRemark } from './size-remark.js';
import type { TwoStagePlan, TwoStagePlanOptions, TwoStagePlanResult } from './types.js';
import { asPercent, checkConfidence, checkExpectedBelowTolerable, checkOptions, checkRate } from './validate.js';
import { withinRisk } from './within-risk.js';

/** Two-stage plans are searched only when the single-stage size is at most this (the search grows with it). */
const MAX_TWO_STAGE_BASE = 1000;
/** … and its acceptance number at most this (the search grows with its cube). */
const MAX_TWO_STAGE_ACCEPTANCE = 20;

/**
 * The planned two-stage plan (n1, c1, r1, n2, c2) with the smallest average sample number at the
 * expected rate whose risk of overreliance at the tolerable rate, computed exactly over both
 * stages, is at most β = 1 − confidence, and whose risk of underreliance at the expected rate is
 * at most the allowed one (by default that of the single-stage plan of {@link sampleSize}, so the
 * two-stage plan is no worse on either risk and tests fewer items on average).
 *
 * Method: exact search. For every first stage n1 below the single-stage size, acceptance number
 * c1 ≤ c (the single-stage acceptance number), second acceptance number c1 < c2 ≤ c + 2 and
 * rejection number c1 + 2 ≤ r1 ≤ c2 + 1, the risk of overreliance falls and the risk of
 * underreliance and the average sample number rise as n2 grows; so the smallest n2 with risk of
 * overreliance ≤ β is found by bisection, and the plan is kept only if its risk of underreliance
 * is within the bound. First stages are tried in increasing n1 and the search stops once n1
 * reaches the best average sample number found; a first stage is only tried from the smallest
 * size that could support reliance with c1 deviations on its own (below it, the first stage alone
 * would exceed β), and the second stage from the smallest total that could with c2. Each risk is {@link planProbability}: binomial,
 * or hypergeometric with the second stage drawn from the N − n1 untested units. Ties are broken
 * by the smaller largest sample, then the smaller first stage.
 *
 * The search runs when the single-stage size is at most 1,000 items with at most 20 deviations
 * allowed (far beyond tests of controls already; above 200 the size carries a remark) and the
 * expected rate is above 0.
 *
 * Double sampling plans of this kind are classical in acceptance sampling (H. F. Dodge and
 * H. G. Romig, Sampling Inspection Tables, 1944; from memory); the search here is exhaustive
 * within the bounds stated, not a table look-up.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 * @throws NoPracticalSizeError when no single-stage size exists to compare with, or no two-stage
 *   plan within the bounds is better than it.
 */
export function twoStagePlan(options: TwoStagePlanOptions): TwoStagePlanResult {
  checkOptions(options, 'twoStagePlan');
  const { confidence, tolerableRate, expectedRate, populationSize } = options;
  checkConfidence(confidence);
  checkRate('tolerableRate', tolerableRate);
  checkRate('expectedRate', expectedRate, true);
  checkExpectedBelowTolerable(expectedRate, tolerableRate);
  const model = resolveModel(options.model, populationSize);
  if (options.underrelianceRisk !== undefined) checkRate('underrelianceRisk', options.underrelianceRisk);
  const beta = 1 - confidence;
  const single = searchSize(model, confidence, tolerableRate, expectedRate, populationSize);
  const context = `${asPercent(confidence)} confidence, tolerable rate ${asPercent(tolerableRate)}, expected rate ${asPercent(expectedRate)} (${model} model)`;
  if (!single) throw new NoPracticalSizeError(`No practical single-stage size for ${context}, so no two-stage plan is searched.`);
  const ns = single.sampleSize;
  const cs = acceptanceNumberOf(riskFunction(model, tolerableRate, populationSize), ns, beta)!;
  if (expectedRate === 0) {
    throw new NoPracticalSizeError(
      `With an expected rate of 0% a second stage is never expected to be needed, so a two-stage plan cannot test fewer items on ` +
        `average than the single-stage sample of ${ns}; use that sample (${context}).`,
    );
  }
  if (ns > MAX_TWO_STAGE_BASE || cs > MAX_TWO_STAGE_ACCEPTANCE) {
    throw new NoPracticalSizeError(
      `The single-stage sample for ${context} is ${ns.toLocaleString('en-US')} items, far beyond tests of controls; two-stage plans ` +
        `are searched only where one stage needs at most ${MAX_TWO_STAGE_BASE.toLocaleString('en-US')} items and allows at most ` +
        `${MAX_TWO_STAGE_ACCEPTANCE} deviations (here ${cs}). Consider a lower ` +
        'confidence, a higher tolerable rate or relying less on the control.',
    );
  }
  const singleRisks = planRisksOf({ sampleSize: ns, acceptanceNumber: cs }, model, tolerableRate, expectedRate, populationSize);
  const alpha = options.underrelianceRisk ?? singleRisks.underrelianceRisk;
  const dT = drawAt(model, tolerableRate, populationSize, 'ceil');
  const dE = drawAt(model, expectedRate, populationSize, 'floor');
  const totalCap = populationSize === undefined ? MAX_SAMPLE_SIZE : model === 'hypergeometric' ? populationSize : Math.min(MAX_SAMPLE_SIZE, populationSize);

  const cMax = cs + 2;
  // nMin[c]: the smallest n with risk(n, c) ≤ β. A plan that can accept with c deviations in
  // n items overall needs at least that many, so the first stage needs n1 ≥ nMin[c1] and the
  // two stages n1 + n2 ≥ nMin[c2] (the risk over both stages is at least either stage's part).
  const risk = riskFunction(model, tolerableRate, populationSize);
  const nMin: number[] = [];
  for (let c = 0; c <= cMax; c++) {
    let lo = Math.max(1, c + 1);
    let hi = totalCap;
    if (!withinRisk(risk(hi, c), beta)) {
      nMin.push(Infinity);
      continue;
    }
    while (lo < hi) {
      const mid = Math.floor((lo + hi) / 2);
      if (withinRisk(risk(mid, c), beta)) hi = mid;
      else lo = mid + 1;
    }
    nMin.push(lo);
  }
  let best: { plan: TwoStagePlan; asn: number; max: number } | undefined;
  let examined = 0;
  const cacheT: number[][][] = [];
  const cacheE: number[][][] = [];
  for (let n1 = Math.min(nMin[0]!, ns); n1 < ns && n1 < totalCap; n1++) {
    if (best && n1 >= best.asn) break;
    const fT = pmfUpTo(dT, n1, cMax + 1);
    const fE = pmfUpTo(dE, n1, cMax + 1);
    const firstT = cumulative(fT);
    const firstE = cumulative(fE);
    // P(X2 ≤ j), j = 0..cMax, for a second stage of n2 after x deviations in the first: one
    // vector per (x, n2), shared by every (c1, r1, c2) (for the binomial and Poisson models it
    // does not depend on x or n1, so those vectors are kept across first stages too).
    const second = (d: Draw, cache: number[][][], x: number, n2: number): number[] => {
      const row = (cache[d.kind === 'hypergeometric' ? x : 0] ??= []);
      let v = row[n2];
      if (!v) {
        v = cumulative(pmfUpTo(after(d, n1, x), n2, cMax));
        row[n2] = v;
      }
      return v;
    };
    if (dT.kind === 'hypergeometric') {
      cacheT.length = 0;
      cacheE.length = 0;
    }
    for (let c1 = 0; c1 <= Math.min(cs, n1 - 1); c1++) {
      if (n1 < nMin[c1]!) break;
      for (let c2 = c1 + 1; c2 <= cMax; c2++) {
        if (!Number.isFinite(nMin[c2]!)) break;
        // A larger r1 only adds second-stage chances to accept, so its smallest n2 is no smaller.
        let floorN2 = 1;
        for (let r1 = c1 + 2; r1 <= Math.min(c2 + 1, n1 + 1); r1++) {
          let cont = 0;
          for (let x = c1 + 1; x < r1; x++) cont += fE[x]!;
          if (cont === 0) continue;
          // The ASN grows with n2; skip when even n2 = 1 cannot beat the best.
          if (best && n1 + cont >= best.asn) continue;
          const accept = (d: Draw, f: number[], first: number[], n2: number): number => {
            const cache = d === dT ? cacheT : cacheE;
            let a = first[c1]!;
            for (let x = c1 + 1; x < r1; x++) if (f[x]! > 0) a += f[x]! * Math.min(1, second(d, cache, x, n2)[c2 - x]!);
            return Math.min(1, a);
          };
          const cap2 = totalCap - n1;
          if (cap2 < 1) continue;
          let lo = Math.max(1, nMin[c2]! - n1, floorN2);
          if (lo > cap2 || (best && n1 + lo * cont >= best.asn)) continue;
          examined++;
          if (!withinRisk(accept(dT, fT, firstT, cap2), beta)) continue;
          let hi = cap2;
          // Only n2 below (best ASN − n1) / P(continue) can improve; bisect within that.
          if (best) hi = Math.min(hi, Math.max(1, Math.ceil((best.asn - n1) / cont)));
          if (!withinRisk(accept(dT, fT, firstT, hi), beta)) continue;
          while (lo < hi) {
            const mid = Math.floor((lo + hi) / 2);
            examined++;
            if (withinRisk(accept(dT, fT, firstT, mid), beta)) hi = mid;
            else lo = mid + 1;
          }
          const n2 = lo;
          floorN2 = n2;
          if (1 - accept(dE, fE, firstE, n2) > alpha * (1 + 1e-12)) continue;
          const asn = n1 + n2 * cont;
          const max = n1 + n2;
          if (!best || asn < best.asn - 1e-12 || (Math.abs(asn - best.asn) <= 1e-12 && max < best.max)) {
            best = {
              plan: { firstSampleSize: n1, firstAcceptanceNumber: c1, firstRejectionNumber: r1, secondSampleSize: n2, secondAcceptanceNumber: c2 },
              asn,
              max,
            };
          }
        }
      }
    }
  }
  if (!best || best.asn >= ns) {
    throw new NoPracticalSizeError(
      `No two-stage plan for ${context} tests fewer items on average than the single-stage sample of ${ns} ` +
        `while keeping the risk of underreliance within ${asPercent(Number(alpha.toPrecision(4)))}.`,
    );
  }
  const risks = planRisksOf(best.plan, model, tolerableRate, expectedRate, populationSize);
  const result: TwoStagePlanResult = {
    plan: best.plan,
    ...risks,
    model,
    confidence,
    tolerableRate,
    expectedRate,
    allowedUnderrelianceRisk: alpha,
    singleStage: { sampleSize: ns, acceptanceNumber: cs, underrelianceRisk: singleRisks.underrelianceRisk, overrelianceRisk: singleRisks.overrelianceRisk },
    plansExamined: examined,
  };
  if (populationSize !== undefined) result.populationSize = populationSize;
  const remark = sizeRemark(risks.maximumSampleSize);
  if (remark) result.sizeRemark = remark;
  return result;
}

function cumulative(f: number[]): number[] {
  const out: number[] = [];
  let s = 0;
  for (const v of f) out.push((s += v));
  return out;
}
