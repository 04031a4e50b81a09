/**
 * Evaluation of recorded results: per attribute the sample deviation rate, the upper deviation
 * limit at the planned confidence, the achieved risk of overreliance at the tolerable rate, the
 * decision the rates alone give, and the extension that would be needed. Pure: no I/O.
 */
import { extensionRisk, extensionSize, overrelianceRisk, upperLimit, withinRisk } from '../stats/index.js';
import { NoPracticalSizeError, TolrateInputError } from '../errors.js';
import { progress, testedResults, worklist } from './worklist.js';
import type {
  Attribute,
  AttributeEvaluation,
  AttributeResult,
  Evaluation,
  ItemResult,
  Model,
  Workpaper,
} from '../workpaper/schema.js';

export interface DeviationRecord {
  key: string;
  seq: number;
  attributeId: string;
  result: Extract<AttributeResult, { result: 'deviation' }>;
}

export interface AttributeCounts {
  attributeId: string;
  /** Items tested for this attribute (voided items excluded). */
  sampleSize: number;
  deviations: number;
  deviationRecords: DeviationRecord[];
  /** Selected sample items with no result yet for this attribute. */
  missing: string[];
}

/** The tolerable rate that applies to an attribute. */
export function tolerableRateFor(wp: Workpaper, attr: Attribute): number {
  if (attr.tolerableRate !== undefined) return attr.tolerableRate;
  if (!wp.approach) throw new TolrateInputError('The workpaper has no approach yet: plan the sample size first.');
  return wp.approach.tolerableRate;
}

/** The population size the model uses, or undefined for the binomial and Poisson models. */
export function modelPopulationSize(wp: Workpaper): number | undefined {
  if (wp.approach?.model !== 'hypergeometric') return undefined;
  return wp.population?.fingerprint.rowCount;
}

/** True when the figures cannot support a statistical conclusion. */
export function isIllustrative(wp: Workpaper): boolean {
  return wp.approach?.kind === 'non-statistical' || wp.selection?.method === 'haphazard';
}

/**
 * The items that make up the tested sample: the worklist's sample items, and the spares that
 * replaced voided ones, with their results. A result recorded for any other item is not counted
 * (re-performance names it).
 */
export function testedItems(wp: Workpaper): ItemResult[] {
  return testedResults(wp);
}

export function countResults(wp: Workpaper): AttributeCounts[] {
  const attrs = wp.attributes ?? [];
  const items = testedItems(wp);
  return attrs.map((a) => {
    const deviationRecords: DeviationRecord[] = [];
    let n = 0;
    const missing: string[] = [];
    for (const it of items) {
      const r = it.attributes[a.id];
      if (!r) {
        missing.push(it.key);
        continue;
      }
      n++;
      if (r.result === 'deviation') deviationRecords.push({ key: it.key, seq: it.seq, attributeId: a.id, result: r });
    }
    return { attributeId: a.id, sampleSize: n, deviations: deviationRecords.length, deviationRecords, missing };
  });
}

/** Figures for one attribute from n and k (used by evaluation and by re-performance). */
export function attributeFigures(args: {
  attributeId: string;
  sampleSize: number;
  deviations: number;
  tolerableRate: number;
  confidence: number;
  model: Model;
  populationSize?: number;
  /** The population size when it is known, whatever the model: an extension never goes beyond the untested remainder. */
  knownPopulationSize?: number;
  illustrative: boolean;
}): AttributeEvaluation {
  const { sampleSize: n, deviations: k, tolerableRate, confidence, model, populationSize } = args;
  if (n === 0) {
    throw new TolrateInputError(`Attribute ${args.attributeId} has no tested items: record results before evaluating.`);
  }
  const common = { sampleSize: n, deviations: k, confidence, model, ...(populationSize !== undefined ? { populationSize } : {}) };
  const limit = upperLimit(common);
  const achievedRisk = overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate, model, ...(populationSize !== undefined ? { populationSize } : {}) });
  // The one comparison of the engine (stats/within-risk.ts): risk ≤ β, an exact tie counting as achieved.
  const supportedByRates = withinRisk(achievedRisk, 1 - confidence);
  const extN = populationSize ?? args.knownPopulationSize;
  let extension: number | null = 0;
  if (!supportedByRates) {
    if (k >= n) extension = null;
    else {
      try {
        extension = extensionSize({ sampleSize: n, deviations: k, tolerableRate, confidence, model, ...(extN !== undefined ? { populationSize: extN } : {}) });
      } catch (e) {
        if (e instanceof NoPracticalSizeError) extension = null;
        else throw e;
      }
    }
  }
  const out: AttributeEvaluation = {
    attributeId: args.attributeId,
    model,
    confidence,
    tolerableRate,
    sampleSize: n,
    deviations: k,
    sampleRate: k / n,
    upperLimit: limit.rate,
    achievedRisk,
    supportedByRates,
    illustrative: args.illustrative,
    extension,
  };
  if (limit.deviationsInPopulation !== undefined) out.deviationsInPopulation = limit.deviationsInPopulation;
  if (extension !== null && extension > 0) {
    // The honest figure: the exact risk of the procedure actually followed (stats/extension-risk.ts).
    const r = extensionRisk({ sampleSize: n, deviations: k, tolerableRate, confidence, model, ...(extN !== undefined ? { populationSize: extN } : {}) });
    out.extensionRisk = { procedure: r.procedureRisk, repeated: r.repeatedProcedureRisk };
  }
  return out;
}

/** Evaluate every attribute of a workpaper whose results are recorded. */
export function evaluate(wp: Workpaper, now = new Date()): Evaluation {
  if (!wp.approach) throw new TolrateInputError('The workpaper has no approach: plan the test first.');
  if (!wp.results) throw new TolrateInputError('No results are recorded yet: run `tolrate record FILE` first.');
  const next = worklist(wp).next;
  if (next) {
    const p = progress(wp);
    throw new TolrateInputError(`Some items have no result yet (${p.total - p.recorded} of ${p.total}, from ${next.item.key}); record them before evaluating.`, 'RESULTS_INCOMPLETE');
  }
  const counts = countResults(wp);
  const incomplete = counts.filter((c) => c.missing.length > 0);
  if (incomplete.length > 0) {
    const lines = incomplete.map((c) => `${c.attributeId}: no result for ${c.missing.slice(0, 8).join(', ')}${c.missing.length > 8 ? ` and ${c.missing.length - 8} more` : ''}`);
    throw new TolrateInputError('Some tested items have no result yet; record them before evaluating:', 'RESULTS_INCOMPLETE', lines);
  }
  const illustrative = isIllustrative(wp);
  const populationSize = modelPopulationSize(wp);
  const attributes = (wp.attributes ?? []).map((a, i) => {
    const c = counts[i]!;
    return attributeFigures({
      attributeId: a.id,
      sampleSize: c.sampleSize,
      deviations: c.deviations,
      tolerableRate: tolerableRateFor(wp, a),
      confidence: wp.approach!.confidence,
      model: wp.approach!.model,
      ...(populationSize !== undefined ? { populationSize } : {}),
      ...(wp.population?.fingerprint.rowCount !== undefined ? { knownPopulationSize: wp.population.fingerprint.rowCount } : {}),
      illustrative,
    });
  });
  return { attributes, evaluatedAt: now.toISOString() };
}

/** The figures of a recorded evaluation that differ from a fresh one, each named (empty when they agree). */
export function evaluationDifferences(recorded: Evaluation, fresh: Evaluation, show: { pct: (x: number) => string; exact: (x: number) => string }): string[] {
  const diffs: string[] = [];
  const close = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
  for (const f of fresh.attributes) {
    const r = recorded.attributes.find((x) => x.attributeId === f.attributeId);
    const id = f.attributeId;
    if (!r) {
      diffs.push(`${id}: no recorded evaluation`);
      continue;
    }
    if (r.sampleSize !== f.sampleSize) diffs.push(`${id}: recorded n = ${r.sampleSize}, the results give ${f.sampleSize}`);
    if (r.deviations !== f.deviations) diffs.push(`${id}: recorded ${r.deviations} deviation(s), the results give ${f.deviations}`);
    if (r.model !== f.model) diffs.push(`${id}: recorded model ${r.model}, the approach gives ${f.model}`);
    if (!close(r.tolerableRate, f.tolerableRate)) diffs.push(`${id}: recorded tolerable rate ${show.pct(r.tolerableRate)}, the plan gives ${show.pct(f.tolerableRate)}`);
    if (!close(r.confidence, f.confidence)) diffs.push(`${id}: recorded confidence ${show.pct(r.confidence)}, the plan gives ${show.pct(f.confidence)}`);
    if (!close(r.sampleRate, f.sampleRate)) diffs.push(`${id}: recorded sample deviation rate ${show.exact(r.sampleRate)}, recomputed ${show.exact(f.sampleRate)}`);
    if (!close(r.upperLimit, f.upperLimit)) diffs.push(`${id}: recorded upper deviation limit ${show.exact(r.upperLimit)}, recomputed ${show.exact(f.upperLimit)}`);
    if (!close(r.achievedRisk, f.achievedRisk)) diffs.push(`${id}: recorded risk of overreliance ${show.exact(r.achievedRisk)}, recomputed ${show.exact(f.achievedRisk)}`);
    if (r.supportedByRates !== f.supportedByRates) diffs.push(`${id}: recorded that the rates ${r.supportedByRates ? 'support' : 'do not support'} reliance; recomputed: they ${f.supportedByRates ? 'do' : 'do not'}`);
    if (r.extension !== f.extension) diffs.push(`${id}: recorded extension ${r.extension ?? 'not practical'}, recomputed ${f.extension ?? 'not practical'}`);
    if (r.extensionRisk && f.extensionRisk && (!close(r.extensionRisk.procedure, f.extensionRisk.procedure) || !close(r.extensionRisk.repeated, f.extensionRisk.repeated))) {
      diffs.push(`${id}: recorded risk of the extension ${show.exact(r.extensionRisk.procedure)}, recomputed ${show.exact(f.extensionRisk.procedure)}`);
    }
    if (!r.extensionRisk && f.extensionRisk) diffs.push(`${id}: the risk of extending the sample (${show.exact(f.extensionRisk.procedure)}) is not recorded`);
    if (r.illustrative !== f.illustrative) diffs.push(`${id}: recorded as ${r.illustrative ? '' : 'not '}illustrative, recomputed ${f.illustrative ? '' : 'not '}illustrative`);
    if ((r.deviationsInPopulation ?? null) !== (f.deviationsInPopulation ?? null)) {
      diffs.push(`${id}: recorded upper limit count ${r.deviationsInPopulation ?? '(none)'}, recomputed ${f.deviationsInPopulation ?? '(none)'}`);
    }
  }
  for (const r of recorded.attributes) {
    if (!fresh.attributes.some((f) => f.attributeId === r.attributeId)) diffs.push(`${r.attributeId}: evaluated, but the test has no such attribute`);
  }
  return diffs;
}
