/**
 * Evaluation of recorded results: per attribute the sample deviation rate, the upper deviation
 * limit at the planned confidence, the achieved risk of overreliance at the tolerable rate, the
 * decision the rates alone give, and the extension that would be needed. Pure: no I/O.
 */
import { extensionSize, overrelianceRisk, upperLimit } from '../stats/index.js';
import { NoPracticalSizeError, TolrateInputError } from '../errors.js';
import type {
  Attribute,
  AttributeEvaluation,
  AttributeResult,
  Evaluation,
  ItemResult,
  Model,
  Workpaper,
} from '../workpaper/schema.js';

/** Tolerance when comparing an achieved risk with 1 − confidence (binary noise only). */
export const RISK_TOLERANCE = 1e-12;

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

/** The items that make up the tested sample: sample items plus the spares that replaced voids. */
export function testedItems(wp: Workpaper): ItemResult[] {
  return (wp.results?.items ?? []).filter((i) => !i.void);
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
  illustrative: boolean;
}): AttributeEvaluation {
  const { sampleSize: n, deviations: k, tolerableRate, confidence, model, populationSize } = args;
  if (n === 0) {
    throw new TolrateInputError(`Attribute ${args.attributeId} has no tested items: record results before evaluating.`);
  }
  const common = { sampleSize: n, deviations: k, confidence, model, ...(populationSize !== undefined ? { populationSize } : {}) };
  const limit = upperLimit(common);
  const achievedRisk = overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate, model, ...(populationSize !== undefined ? { populationSize } : {}) });
  const beta = 1 - confidence;
  const supportedByRates = achievedRisk <= beta + RISK_TOLERANCE;
  let extension: number | null = 0;
  if (!supportedByRates) {
    if (k >= n) extension = null;
    else {
      try {
        extension = extensionSize({ sampleSize: n, deviations: k, tolerableRate, confidence, model, ...(populationSize !== undefined ? { populationSize } : {}) });
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
  return out;
}

/** Evaluate every attribute of a workpaper whose results are recorded. */
export function evaluate(wp: Workpaper, now = new Date()): Evaluation {
  if (!wp.approach) throw new TolrateInputError('The workpaper has no approach: plan the test first.');
  if (!wp.results) throw new TolrateInputError('No results are recorded yet: run `tolrate record FILE` first.');
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
      illustrative,
    });
  });
  return { attributes, evaluatedAt: now.toISOString() };
}
