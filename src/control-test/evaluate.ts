/**
 * Evaluation of recorded results: per attribute the sample deviation rate, the upper deviation
 * limit at the planned confidence, the achieved risk of overreliance at the tolerable rate, the
 * decision the rates alone give, and the extension that would be needed. Pure: no I/O.
 */
import { combinedUpperLimit, extensionRisk, extensionSize, overrelianceRisk, upperLimit, withinRisk } from '../stats/index.js';
import { PART_LABELS, partView, type Part } from './parts.js';
import { NoPracticalSizeError, TolrateInputError } from '../errors.js';
import { progress, testedResults, testedWork, worklist } from './worklist.js';
import { stageDecision, twoStageOf, twoStageRisk } from './plan.js';
import type {
  Attribute,
  AttributeEvaluation,
  AttributeResult,
  Evaluation,
  PartEvaluation,
  ItemResult,
  Model,
  Workpaper,
} from '../workpaper/schema.js';

export interface DeviationRecord {
  key: string;
  seq: number;
  attributeId: string;
  result: Extract<AttributeResult, { result: 'deviation' }>;
  /** In a test done in parts: the part the item belongs to. */
  part?: Part;
}

export interface AttributeCounts {
  attributeId: string;
  /** Items tested for this attribute (voided items excluded). */
  sampleSize: number;
  deviations: number;
  deviationRecords: DeviationRecord[];
  /** Selected sample items with no result yet for this attribute. */
  missing: string[];
  /** Two-stage plan: the items tested and the deviations of each stage (the second only when it was tested for this attribute). */
  stages?: { firstSampleSize: number; firstDeviations: number; secondSampleSize?: number; secondDeviations?: number };
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

/** True when the figures cannot support a statistical conclusion (non-statistical, or any part selected haphazardly). */
export function isIllustrative(wp: Workpaper): boolean {
  return wp.approach?.kind === 'non-statistical' || wp.selection?.method === 'haphazard' || wp.rollForward?.selection?.method === 'haphazard';
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
  const items = testedWork(wp);
  const twoStage = twoStageOf(wp) !== undefined;
  const needed = twoStage ? (worklist(wp).stages?.secondNeeded ?? []) : [];
  return attrs.map((a) => {
    const deviationRecords: DeviationRecord[] = [];
    let n = 0;
    const missing: string[] = [];
    const by = { 1: { n: 0, k: 0 }, 2: { n: 0, k: 0 } };
    // Needed at the second stage: reached even if every second-stage item was void with no spare left.
    let second = needed.includes(a.id);
    for (const { work, result: it } of items) {
      // At the second stage an item is tested only for the attributes that need it.
      if (!work.attributes.includes(a.id)) continue;
      if (work.stage === 2) second = true;
      const r = it.attributes[a.id];
      if (!r) {
        missing.push(it.key);
        continue;
      }
      n++;
      const st = by[work.stage ?? 1];
      st.n++;
      if (r.result === 'deviation') {
        st.k++;
        deviationRecords.push({ key: it.key, seq: it.seq, attributeId: a.id, result: r });
      }
    }
    const out: AttributeCounts = { attributeId: a.id, sampleSize: n, deviations: deviationRecords.length, deviationRecords, missing };
    if (twoStage) {
      out.stages = { firstSampleSize: by[1].n, firstDeviations: by[1].k, ...(second ? { secondSampleSize: by[2].n, secondDeviations: by[2].k } : {}) };
    }
    return out;
  });
}

/**
 * The deviations of every attribute over the whole test: for a test in parts, each part's
 * (marked with its part), interim first. Used by the qualitative review, which looks at every
 * deviation found in the period.
 */
export function deviationRecordsByAttribute(wp: Workpaper): Map<string, DeviationRecord[]> {
  const out = new Map<string, DeviationRecord[]>();
  const parts: Part[] = wp.rollForward ? ['interim', 'roll-forward'] : ['interim'];
  for (const p of parts) {
    const view = wp.rollForward ? partView(wp, p) : wp;
    if (!view.selection) continue;
    for (const c of countResults(view)) {
      const list = out.get(c.attributeId) ?? [];
      list.push(...c.deviationRecords.map((d) => (wp.rollForward ? { ...d, part: p } : d)));
      out.set(c.attributeId, list);
    }
  }
  return out;
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

/**
 * The decision of the plan adopted, in place of the single-stage rule. Two stages: k1 ≤ c1
 * accepts, k1 ≥ r1 rejects, otherwise k1 + k2 ≤ c2 accepts (plan.ts: stageDecision); the risk of
 * overreliance shown is the plan's exact one over both stages, the sample rate and the upper limit
 * are those of the items tested, and no extension is offered after a rejection (the plan already
 * had its second look). Both risks: the plan chose n and its acceptance number c at the lowest
 * tolerable rate; with the planned n, k ≤ c is the exact risk rule at that rate, so each attribute
 * is judged by the exact risk rule at its own tolerable rate (an attribute with a higher tolerable
 * rate than the one planned at may rely with more than c deviations; a sample left short by voids
 * is judged at the items tested, which is stricter than c).
 */
function byPlan(wp: Workpaper, f: AttributeEvaluation, c: AttributeCounts): AttributeEvaluation {
  const two = twoStageOf(wp);
  if (two && c.stages) {
    const st = c.stages;
    const decision = stageDecision(two, st.firstDeviations, st.secondSampleSize !== undefined ? st.secondDeviations : undefined);
    if (decision === 'second-stage-needed') {
      throw new TolrateInputError(`Attribute ${f.attributeId} needs the second stage of the plan, and it has no results yet: record them before evaluating.`, 'RESULTS_INCOMPLETE');
    }
    const accepted = decision === 'accepted-at-first' || decision === 'accepted-at-second';
    const { extensionRisk: _dropped, ...rest } = f;
    return {
      ...rest,
      achievedRisk: twoStageRisk(wp, two, f.tolerableRate),
      supportedByRates: accepted,
      extension: accepted ? 0 : null,
      stage: {
        reached: st.secondSampleSize !== undefined ? 2 : 1,
        firstSampleSize: st.firstSampleSize,
        firstDeviations: st.firstDeviations,
        ...(st.secondSampleSize !== undefined ? { secondSampleSize: st.secondSampleSize, secondDeviations: st.secondDeviations ?? 0 } : {}),
        decision,
      },
    };
  }
  return f;
}

/** Evaluate every attribute of a workpaper whose results are recorded (both parts of a test done in parts). */
export function evaluate(wp: Workpaper, now = new Date()): Evaluation {
  if (wp.rollForward) return { attributes: evaluateInParts(wp), evaluatedAt: now.toISOString() };
  return { attributes: evaluateOne(wp), evaluatedAt: now.toISOString() };
}

/** The evaluation of one test (or one part's view of it), each attribute from its own results. */
function evaluateOne(wp: Workpaper, part?: Part): AttributeEvaluation[] {
  const which = part === 'roll-forward' ? `${PART_LABELS[part]} part: ` : '';
  if (!wp.approach) throw new TolrateInputError('The workpaper has no approach: plan the test first.');
  if (!wp.results) {
    throw new TolrateInputError(
      part === 'roll-forward' ? 'No roll-forward results are recorded yet: run `tolrate record FILE --part roll-forward` first.' : 'No results are recorded yet: run `tolrate record FILE` first.',
      'RESULTS_INCOMPLETE',
    );
  }
  const next = worklist(wp).next;
  if (next) {
    const p = progress(wp);
    throw new TolrateInputError(`${which}Some items have no result yet (${p.total - p.recorded} of ${p.total}, from ${next.item.key}); record them before evaluating.`, 'RESULTS_INCOMPLETE');
  }
  const counts = countResults(wp);
  const incomplete = counts.filter((c) => c.missing.length > 0);
  if (incomplete.length > 0) {
    const lines = incomplete.map((c) => `${c.attributeId}: no result for ${c.missing.slice(0, 8).join(', ')}${c.missing.length > 8 ? ` and ${c.missing.length - 8} more` : ''}`);
    throw new TolrateInputError(`${which}Some tested items have no result yet; record them before evaluating:`, 'RESULTS_INCOMPLETE', lines);
  }
  const illustrative = isIllustrative(wp);
  const populationSize = modelPopulationSize(wp);
  return (wp.attributes ?? []).map((a, i) => {
    const c = counts[i]!;
    const figures = attributeFigures({
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
    return illustrative ? figures : byPlan(wp, figures, c);
  });
}

/**
 * A test done in parts: each part evaluated on its own (its n, k, sample rate and its own limit
 * under the test's model), and the whole period from the exact upper limit over both parts
 * (stats/combined-upper-limit.ts: the exact test inverted over the parts, the allocation of the
 * deviations across them taken at its worst), with the conservative Bonferroni bound beside it.
 * The attribute's own figures are then the whole period's: n and k added, the combined limit,
 * the combined risk of overreliance, and the decision the combined limit gives against the
 * tolerable rate. When the exact search is too large, the decision uses the conservative bound
 * and the note says so. No extension is computed for a test in parts (which part to extend is
 * the practitioner's call).
 */
function evaluateInParts(wp: Workpaper): AttributeEvaluation[] {
  const rf = wp.rollForward!;
  if (!rf.selection || !rf.population || rf.sampleSize === undefined) {
    throw new TolrateInputError('The roll-forward part is not planned yet: run `tolrate rollforward FILE` to plan it.', 'RESULTS_INCOMPLETE');
  }
  const views = { interim: partView(wp, 'interim'), 'roll-forward': partView(wp, 'roll-forward') };
  const interim = evaluateOne(views.interim, 'interim');
  const later = evaluateOne(views['roll-forward'], 'roll-forward');
  const illustrative = isIllustrative(wp);
  return interim.map((a, i) => {
    const b = later[i]!;
    const sizes = { interim: views.interim.population!.fingerprint.rowCount, 'roll-forward': views['roll-forward'].population!.fingerprint.rowCount };
    const part = (p: Part, ev: AttributeEvaluation): PartEvaluation => ({
      part: p,
      populationSize: sizes[p],
      sampleSize: ev.sampleSize,
      deviations: ev.deviations,
      sampleRate: ev.sampleRate,
      upperLimit: ev.upperLimit,
      ...(ev.deviationsInPopulation !== undefined ? { deviationsInPopulation: ev.deviationsInPopulation } : {}),
    });
    const c = combinedUpperLimit({
      parts: [
        { populationSize: sizes.interim, sampleSize: a.sampleSize, deviations: a.deviations },
        { populationSize: sizes['roll-forward'], sampleSize: b.sampleSize, deviations: b.deviations },
      ],
      confidence: a.confidence,
      tolerableRate: a.tolerableRate,
    });
    const exact = c.deviationsInPopulation !== null && c.rate !== null;
    const n = a.sampleSize + b.sampleSize;
    const k = a.deviations + b.deviations;
    const out: AttributeEvaluation = {
      attributeId: a.attributeId,
      model: a.model,
      confidence: a.confidence,
      tolerableRate: a.tolerableRate,
      sampleSize: n,
      deviations: k,
      sampleRate: k / n,
      upperLimit: exact ? c.rate! : c.conservative.rate,
      deviationsInPopulation: exact ? c.deviationsInPopulation! : c.conservative.deviationsInPopulation,
      achievedRisk: exact && c.achievedRisk != null ? c.achievedRisk : c.conservativeRisk!,
      supportedByRates: c.supported!,
      illustrative,
      extension: null,
      parts: [part('interim', a), part('roll-forward', b)],
      combined: {
        deviationsInPopulation: c.deviationsInPopulation,
        rate: c.rate,
        conservativeDeviations: c.conservative.deviationsInPopulation,
        conservativeRate: c.conservative.rate,
        supported: c.supported!,
        ...(c.note ? { note: `${c.note} The whole-period decision uses the conservative bound.` } : {}),
      },
    };
    return out;
  });
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
    if (f.stage || r.stage) {
      const st = (x: AttributeEvaluation) => (x.stage ? `stage ${x.stage.reached} reached, ${x.stage.firstDeviations} deviation(s) in ${x.stage.firstSampleSize} at the first stage${x.stage.secondSampleSize !== undefined ? `, ${x.stage.secondDeviations} in ${x.stage.secondSampleSize} at the second` : ''}, ${x.stage.decision}` : 'no stage recorded');
      if (st(r) !== st(f)) diffs.push(`${id}: recorded ${st(r)}; re-derived ${st(f)}`);
    }
    if ((r.deviationsInPopulation ?? null) !== (f.deviationsInPopulation ?? null)) {
      diffs.push(`${id}: recorded upper limit count ${r.deviationsInPopulation ?? '(none)'}, recomputed ${f.deviationsInPopulation ?? '(none)'}`);
    }
    diffs.push(...partDifferences(id, r, f, show, close));
  }
  for (const r of recorded.attributes) {
    if (!fresh.attributes.some((f) => f.attributeId === r.attributeId)) diffs.push(`${r.attributeId}: evaluated, but the test has no such attribute`);
  }
  return diffs;
}

/** A test in parts: each part's figures and the whole-period limit, recorded against recomputed, each named. */
function partDifferences(
  id: string,
  r: AttributeEvaluation,
  f: AttributeEvaluation,
  show: { pct: (x: number) => string; exact: (x: number) => string },
  close: (a: number, b: number) => boolean,
): string[] {
  const diffs: string[] = [];
  if (!f.parts && !r.parts) return diffs;
  if (!r.parts || !r.combined) return [`${id}: the figures of the interim and roll-forward parts are not recorded`];
  if (!f.parts || !f.combined) return [`${id}: recorded as a test in parts, but the workpaper has no roll-forward part`];
  for (const fp of f.parts) {
    const rp = r.parts.find((x) => x.part === fp.part);
    const w = `${id}, ${fp.part} part`;
    if (!rp) {
      diffs.push(`${w}: not recorded`);
      continue;
    }
    if (rp.populationSize !== fp.populationSize) diffs.push(`${w}: recorded population ${rp.populationSize}, the population gives ${fp.populationSize}`);
    if (rp.sampleSize !== fp.sampleSize) diffs.push(`${w}: recorded n = ${rp.sampleSize}, the results give ${fp.sampleSize}`);
    if (rp.deviations !== fp.deviations) diffs.push(`${w}: recorded ${rp.deviations} deviation(s), the results give ${fp.deviations}`);
    if (!close(rp.sampleRate, fp.sampleRate)) diffs.push(`${w}: recorded sample deviation rate ${show.exact(rp.sampleRate)}, recomputed ${show.exact(fp.sampleRate)}`);
    if (!close(rp.upperLimit, fp.upperLimit)) diffs.push(`${w}: recorded upper deviation limit ${show.exact(rp.upperLimit)}, recomputed ${show.exact(fp.upperLimit)}`);
  }
  const rc = r.combined;
  const fc = f.combined;
  if ((rc.deviationsInPopulation ?? null) !== (fc.deviationsInPopulation ?? null)) {
    diffs.push(`${id}, whole period: recorded combined limit ${rc.deviationsInPopulation ?? '(none)'} deviation(s), recomputed ${fc.deviationsInPopulation ?? '(none)'}`);
  }
  if (rc.conservativeDeviations !== fc.conservativeDeviations) diffs.push(`${id}, whole period: recorded conservative bound ${rc.conservativeDeviations} deviation(s), recomputed ${fc.conservativeDeviations}`);
  if (rc.supported !== fc.supported) diffs.push(`${id}, whole period: recorded that the combined limit ${rc.supported ? 'supports' : 'does not support'} reliance; recomputed: it ${fc.supported ? 'does' : 'does not'}`);
  return diffs;
}
