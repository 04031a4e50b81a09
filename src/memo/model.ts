/**
 * Everything the memo shows, read from the workpaper alone and formatted once: the placeholder
 * values, and the rows of every table. No computation of figures happens here; the evaluation
 * recorded in the workpaper is shown as recorded (re-performance is `tolrate reperform`).
 * Percentages use src/util/format.ts: rates to one decimal place, upper limits and risks rounded up,
 * exact values (4 decimal places of a percent) for the appendix.
 */
import { describePeriods } from '../population/index.js';
import { basename } from 'node:path';
import { int, pct, pctExact, pctLimit, pctPlain, pctUp } from '../util/format.js';
import type {
  Attribute,
  AttributeEvaluation,
  Evaluation,
  FollowUp,
  SelectedItem,
  Workpaper,
} from '../workpaper/schema.js';
import type { MemoTemplate } from './template.js';
import { countResults, evidenceSupports, PART_LABELS, partView, ratesSupport, testedResults, testState, worklist, type Part } from '../control-test/index.js';
import { stateHash } from '../workpaper/log.js';
import { tolerableDeviations } from '../stats/index.js';
import { spreadView, type SpreadPart, type SpreadView } from './spread.js';

export type Outcome = 'supported' | 'not-supported' | 'draft';

export interface AttributeView {
  attribute: Attribute;
  tolerableRate: number | undefined;
  /** Counted from the recorded results (voided items excluded). */
  tested: number;
  deviations: number;
  evaluation?: AttributeEvaluation;
  conclusion?: { supportsReliance: boolean; reasoning: string };
  decision: string;
  /**
   * Concluded as supporting reliance although the recorded evaluation does not: the rates (or, for
   * an illustrative evaluation, any deviation) or an intentional or systemic deviation say otherwise.
   */
  againstEvidence: boolean;
  /** The placeholders of the per-attribute paragraphs. */
  values: Record<string, string | undefined>;
}

export interface DeviationView {
  key: string;
  seq: number;
  attributeId: string;
  found: string;
  cause: string;
  intentional: string;
  pattern: string;
  intentionalCode: string;
  patternCode: string;
  /** The item's date and amount from the population (its date and amount columns), when known. */
  date: string;
  amount: string;
  /** A test done in parts: the part of the item. */
  part?: Part;
}

export interface ItemView {
  seq: number;
  key: string;
  row: number;
  role: string;
  /** One per attribute, in attribute order. */
  results: string[];
  note: string;
  /** Who tested it, when, the evidence inspected and the tester's note ('' when not recorded). */
  testedBy: string;
  testedOn: string;
  evidence: string;
  itemNote: string;
  /** The item was tested (not void, not an unused spare). */
  tested: boolean;
}

export interface SpareView {
  spareKey: string;
  replacesKey: string;
  reason: string;
}

export interface MemoModel {
  wp: Workpaper;
  /** Not a final memo: something is open or does not agree (see notFinal). Marked DRAFT on every page. */
  draft: boolean;
  /** Every reason the memo is not final (steps open, no sign-off, the file changed outside tolrate, figures that do not follow from the results). */
  notFinal: string[];
  /** The test is evaluated and concluded (its conclusion sections are filled). */
  concluded: boolean;
  /** The evaluation shown: the recorded one, or the one the recorded results give when they differ. */
  evaluation: Evaluation | undefined;
  outcome: Outcome;
  nonStatistical: boolean;
  haphazard: boolean;
  /** Figures shown but not a basis for a statistical conclusion. */
  illustrative: boolean;
  values: Record<string, string | undefined>;
  attributes: AttributeView[];
  deviations: DeviationView[];
  items: ItemView[];
  spares: SpareView[];
  followUps: Array<FollowUp & { kindLabel: string }>;
  /** Names of the figures not yet available, for the command's summary. */
  missing: string[];
  /**
   * A test done in parts: the roll-forward part, as the memo of its own view would show it (its
   * items, spares, values), beside the main model, which is the interim part and the whole period.
   */
  rollForward?: MemoModel;
  /** Said in the appendix when characters XML forbids were removed (see cleanForMemo). */
  cleanedNote?: string;
  /** How the sample spreads over the period; undefined when the population's tally by month was not recorded (older files). */
  spread: SpreadView | undefined;
}

/** Thousands separators for a decimal string, without going through a float: "-1234567.5" -> "-1,234,567.5". */
export function formatAmount(d: string | undefined): string | undefined {
  if (d === undefined) return undefined;
  const m = /^(-?)(\d+)(\.\d+)?$/.exec(d.trim());
  if (!m) return d;
  return `${m[1]}${m[2]!.replace(/\B(?=(\d{3})+(?!\d))/g, ',')}${m[3] ?? ''}`;
}

function signed(n: number): string {
  return n > 0 ? `+${int(n)}` : int(n);
}

function signedAmount(d: string | undefined): string | undefined {
  if (d === undefined) return undefined;
  const t = d.trim();
  const f = formatAmount(t);
  return /^-/.test(t) || /^0+(\.0+)?$/.test(t) ? f : `+${f}`;
}

/** 'random-v1: generator ... order' -> { id: 'random-v1', description: 'generator ... order' }. */
export function algorithmParts(algorithm: string): { id: string; description: string | undefined } {
  const i = algorithm.indexOf(':');
  if (i < 0) return { id: algorithm.trim(), description: undefined };
  const description = algorithm.slice(i + 1).trim();
  return { id: algorithm.slice(0, i).trim(), description: description || undefined };
}

function dateTime(iso: string): string {
  return iso.replace('T', ' ').replace(/:\d\d(\.\d+)?Z$/, ' UTC');
}

export interface ModelOptions {
  workpaperPath?: string;
  /** Further reasons the memo is not final (e.g. it is written on request from a file changed outside tolrate). */
  extraNotFinal?: string[];
  now?: Date;
  toolVersion?: string;
}

export function buildModel(wp: Workpaper, t: MemoTemplate, opts: ModelOptions = {}): MemoModel {
  const L = t.memo.labels;
  const e = wp.engagement;
  const c = wp.control;
  const p = wp.population;
  const a = wp.approach;
  const s = wp.selection;
  const attrs = wp.attributes ?? [];
  const nonStatistical = a?.kind === 'non-statistical';
  const haphazard = s?.method === 'haphazard';
  const illustrative = nonStatistical || haphazard;
  const state = testState(wp);
  const notFinal = [...state.notFinal, ...(opts.extraNotFinal ?? [])];
  const draft = notFinal.length > 0;
  // The memo never shows figures the recorded results do not give: when the recorded evaluation
  // differs from them, the figures shown are the ones the results give (and the memo is a draft).
  const evaluation = state.evaluation.length > 0 && state.fresh ? state.fresh : wp.evaluation;
  const concluded = evaluation !== undefined && wp.conclusion !== undefined;
  const outcome: Outcome = !concluded ? 'draft' : wp.conclusion!.control.supportsReliance ? 'supported' : 'not-supported';
  const missing: string[] = [];
  for (const [k, v] of [
    ['engagement', e], ['control', c], ['attributes', wp.attributes], ['population', p], ['approach', a],
    ['selection', s], ['results', wp.results], ['evaluation', wp.evaluation], ['conclusion', wp.conclusion],
  ] as const) {
    if (v === undefined) missing.push(k);
  }

  const yesNo = (b: boolean) => (b ? L.yes : L.no);
  const populationSize = a?.model === 'hypergeometric' ? p?.fingerprint.rowCount : undefined;
  const confidence = a?.confidence;
  const risk = confidence !== undefined ? pct(1 - confidence) : undefined;

  // Population source in words.
  let populationSource: string | undefined;
  if (p) {
    const src = p.source;
    if (src.kind === 'ranges') populationSource = `${src.ranges}${src.exclusions.length ? ` (excluding ${src.exclusions.join(', ')})` : ''}`;
    else if (src.kind === 'periods') populationSource = describePeriods(src);
    else populationSource = `${src.path}${src.kind === 'xlsx' && src.sheet ? `, sheet ${src.sheet}` : ''}`;
  }

  // The planning entry that governs the adopted size.
  const plan = a?.kind === 'statistical' ? a.plan : undefined;
  const two = plan?.kind === 'two-stage' ? plan : undefined;
  const both = plan?.kind === 'both-risks' ? plan : undefined;
  // The tolerable rate a planned plan is computed at: the lowest that applies to an attribute.
  const planRates = (wp.attributes ?? []).map((x) => ({ id: x.id, rate: x.tolerableRate ?? a?.tolerableRate ?? 1 }));
  const planLowest = planRates.length ? planRates.reduce((lo, x) => (x.rate < lo.rate ? x : lo)) : undefined;
  const planTolerableRate = plan && a && planLowest
    ? planLowest.rate < a.tolerableRate ? `${pct(planLowest.rate)} (${planLowest.id}'s own, the lowest that applies to an attribute, so the plan serves every attribute)` : pct(a.tolerableRate)
    : undefined;
  const sizes = a?.sizes ?? [];
  const planned = sizes.find((x) => x.sampleSize === a?.sampleSize) ?? [...sizes].sort((x, y) => y.sampleSize - x.sampleSize)[0];

  // Results, counted from the record (voided items are not tested).
  const resultItems = wp.results?.items ?? [];
  const tested = testedResults(wp);
  const counts = countResults(wp);
  const bySeq = new Map(resultItems.map((i) => [i.seq, i]));

  const selByKey = new Map((s?.items ?? []).map((x) => [x.key, x]));
  const srcCols = p && (p.source.kind === 'csv' || p.source.kind === 'xlsx') ? p.source : undefined;
  const valueOf = (key: string, column: string | undefined): string => (column ? (selByKey.get(key)?.values[column] ?? '') : '');
  const deviations: DeviationView[] = [];
  for (const attr of attrs) {
    for (const it of tested) {
      const r = it.attributes[attr.id];
      if (r?.result === 'deviation') {
        deviations.push({
          key: it.key,
          seq: it.seq,
          attributeId: attr.id,
          found: r.found,
          cause: `${L.causes[r.cause]}${r.causeDetail ? `: ${r.causeDetail}` : ''}`,
          intentional: L.intent[r.intentional],
          pattern: L.patterns[r.pattern],
          intentionalCode: r.intentional,
          patternCode: r.pattern,
          date: valueOf(it.key, srcCols?.dateColumn),
          amount: formatAmount(valueOf(it.key, srcCols?.amountColumn)) ?? '',
        });
      }
    }
  }
  deviations.sort((x, y) => x.seq - y.seq || x.attributeId.localeCompare(y.attributeId, 'en', { numeric: true }));
  // A test in parts: the roll-forward part's own model (from its view), and its deviations after the interim ones.
  const rfModel = wp.rollForward ? buildModel(partView(wp, 'roll-forward'), t, opts) : undefined;
  if (rfModel) {
    for (const d of deviations) d.part = 'interim';
    deviations.push(...rfModel.deviations.map((d) => ({ ...d, part: 'roll-forward' as const })));
  }

  const spares: SpareView[] = [];
  for (const it of resultItems) {
    if (it.void) {
      const replacement = it.void.replacedBy ?? resultItems.find((x) => x.replaces === it.key)?.key;
      spares.push({ spareKey: replacement ?? L.none, replacesKey: it.key, reason: it.void.reason });
    }
  }

  /** Does the recorded evaluation, with the recorded causes, leave reliance unsupported? */
  const evidenceAgainst = (attrId: string, ev: AttributeEvaluation | undefined): boolean => {
    if (!ev) return false;
    const devs = deviations.filter((d) => d.attributeId === attrId).map((d) => ({ intentional: d.intentionalCode, pattern: d.patternCode }));
    return !evidenceSupports(ev, devs);
  };

  const decisionFor = (attrId: string, ev: AttributeEvaluation | undefined, con: { supportsReliance: boolean } | undefined): string => {
    if (con) {
      if (con.supportsReliance) return evidenceAgainst(attrId, ev) ? L.decisionAgainstEvidence : L.decisionSupported;
      return ev && !ev.illustrative && ev.supportedByRates ? L.decisionOverridden : L.decisionNotSupported;
    }
    if (ev) return ratesSupport(ev) ? L.decisionSupported : L.decisionNotSupported;
    return L.notYetEvaluated;
  };

  const attributes: AttributeView[] = attrs.map((attr) => {
    const tdr = attr.tolerableRate ?? a?.tolerableRate;
    const ev = evaluation?.attributes.find((x) => x.attributeId === attr.id);
    const con = wp.conclusion?.attributes.find((x) => x.attributeId === attr.id);
    const count = counts.find((x) => x.attributeId === attr.id);
    const n = count?.sampleSize ?? 0;
    const k = count?.deviations ?? 0;
    const decision = decisionFor(attr.id, ev, con);
    const view: AttributeView = {
      attribute: attr,
      tolerableRate: tdr,
      tested: n,
      deviations: k,
      decision,
      againstEvidence: con?.supportsReliance === true && evidenceAgainst(attr.id, ev),
      values: {
        attributeId: attr.id,
        attributeDescription: attr.description,
        attributeTolerableRate: tdr !== undefined ? pct(tdr) : undefined,
        n: int(ev?.sampleSize ?? n),
        deviations: int(ev?.deviations ?? k),
        sampleRate: ev ? pct(ev.sampleRate) : n > 0 ? pct(k / n) : undefined,
        upperLimit: ev ? pctLimit(ev.upperLimit, ev.tolerableRate) : undefined,
        achievedRisk: ev ? pctUp(ev.achievedRisk) : undefined,
        decision,
        extension: ev?.extension != null ? int(ev.extension) : undefined,
        extensionRisk: ev?.extensionRisk ? pctUp(ev.extensionRisk.procedure) : undefined,
        extensionRepeatedRisk: ev?.extensionRisk ? pctUp(ev.extensionRisk.repeated) : undefined,
      },
    };
    if (ev) view.evaluation = ev;
    if (con) view.conclusion = { supportsReliance: con.supportsReliance, reasoning: con.reasoning };
    return view;
  });

  const items: ItemView[] = [];
  const selItems: SelectedItem[] = [...(s?.items ?? [])].sort((x, y) => x.seq - y.seq);
  // Two-stage plan: each item's stage (a spare takes the stage of the item it replaces), and the
  // stage-2 items left untested because the first stage decided.
  const onList = worklist(wp);
  const stageOf = new Map(onList.items.filter((x) => x.stage).map((x) => [x.item.key, x.stage!]));
  const notNeeded = new Set(onList.stages?.firstComplete ? onList.stages.secondItems.filter((x) => !stageOf.has(x.key)).map((x) => x.key) : []);
  for (const si of selItems) {
    const r = bySeq.get(si.seq);
    let note = '';
    const stage = si.stage ?? stageOf.get(si.key);
    let role = stage ? `${L.roles[si.role]}, ${L.stage.toLowerCase()} ${stage}` : L.roles[si.role];
    let results: string[];
    if (r?.void) {
      results = attrs.map(() => L.resultVoid);
      note = `${r.void.reason}${r.void.replacedBy ? `; ${L.replacedBy} ${r.void.replacedBy}` : ''}`;
    } else if (r) {
      results = attrs.map((attr) => {
        const x = r.attributes[attr.id];
        return x === undefined ? L.resultMissing : x.result === 'conforms' ? L.resultConforms : L.resultDeviation;
      });
      if (r.replaces) note = `${L.replacing} ${r.replaces}`;
      // At the second stage an item is tested only for the attributes that need it.
      const w = onList.items.find((x) => x.item.key === si.key);
      if (w?.stage === 2 && w.attributes.length < attrs.length) note = [note, `${L.secondStage}: ${w.attributes.join(', ')}`].filter(Boolean).join('; ');
    } else {
      results = attrs.map(() => L.resultMissing);
      if (si.role === 'spare' && wp.results) role = L.spareUnused;
      if (notNeeded.has(si.key)) note = L.stageNotNeeded;
    }
    const evidence = (r?.evidence ?? []).map((x) => (x.sha256 ? `${x.ref} (${L.sha256} ${x.sha256.slice(0, 12)}…)` : x.ref)).join('; ');
    items.push({
      seq: si.seq, key: si.key, row: si.row, role, results, note,
      testedBy: r?.testedBy ?? '', testedOn: r?.testedOn ?? '', evidence, itemNote: r?.note ?? '',
      tested: r !== undefined && !r.void && Object.keys(r.attributes).length > 0,
    });
  }

  const notSupported = (wp.conclusion?.attributes ?? []).filter((x) => !x.supportsReliance).map((x) => x.attributeId);
  const last = wp.log[wp.log.length - 1];
  const now = opts.now ?? new Date();
  const workpaperFile = opts.workpaperPath ? basename(opts.workpaperPath) : undefined;
  const sev = wp.conclusion?.severity;

  const values: Record<string, string | undefined> = {
    entity: e?.entity,
    period: e ? `${e.periodStart} – ${e.periodEnd}` : undefined,
    periodStart: e?.periodStart,
    periodEnd: e?.periodEnd,
    reference: e?.reference,
    preparer: e?.preparer,
    reviewer: e?.reviewer,
    preparerDate: wp.signoffs?.preparer?.date ?? L.notSigned,
    reviewerDate: wp.signoffs?.reviewer?.date ?? L.notSigned,
    controlId: c?.id,
    controlDescription: c?.description,
    controlObjective: c?.objective,
    controlOwner: c?.owner,
    controlFrequency: c ? L.frequencies[c.frequency] : undefined,
    controlNature: c ? L.natures[c.nature] : undefined,
    keyControl: c ? yesNo(c.key) : undefined,
    attributeCount: wp.attributes ? int(attrs.length) : undefined,
    attributeIds: wp.attributes ? attrs.map((x) => x.id).join(', ') : undefined,
    populationDescription: p?.description,
    samplingUnit: p?.samplingUnit,
    populationSource,
    populationCount: p ? int(p.fingerprint.rowCount) : undefined,
    populationTotal: formatAmount(p?.fingerprint.amountTotal),
    ledgerCount: p?.tieOut.ledgerCount !== undefined ? int(p.tieOut.ledgerCount) : undefined,
    ledgerTotal: formatAmount(p?.tieOut.ledgerTotal),
    countDifference: p?.tieOut.countDifference !== undefined ? signed(p.tieOut.countDifference) : undefined,
    totalDifference: signedAmount(p?.tieOut.totalDifference),
    tieOutExplanation: p?.tieOut.explanation,
    ledgerSource: p?.tieOut.ledgerSource,
    validationAcceptedReason: p?.validation.acceptedReason,
    sha256: p?.fingerprint.sha256,
    firstKey: p?.fingerprint.firstKey,
    lastKey: p?.fingerprint.lastKey,
    populationSize: populationSize !== undefined ? int(populationSize) : undefined,
    populationDeviations: populationSize !== undefined && a ? int(tolerableDeviations(populationSize, a.tolerableRate)) : undefined,
    approachKind: a ? L.approaches[a.kind] : undefined,
    confidence: confidence !== undefined ? pctPlain(confidence) : undefined,
    risk,
    tolerableRate: a ? pct(a.tolerableRate) : undefined,
    expectedRate: a ? pct(a.expectedRate) : undefined,
    model: a ? L.models[a.model] : undefined,
    sampleSize: a ? int(a.sampleSize) : s ? int(s.sampleSize) : undefined,
    spares: s ? int(s.spares) : undefined,
    rationale: a?.rationale,
    plannedSize: planned ? int(planned.sampleSize) : undefined,
    plannedTolerableRate: planned ? pct(planned.tolerableRate) : undefined,
    plannedExpectedDeviations: planned ? int(planned.expectedDeviations) : undefined,
    plannedRisk: planned ? pctUp(planned.achievedRisk) : undefined,
    fpcBinomialSize: a?.finitePopulationCorrection ? int(a.finitePopulationCorrection.binomialSampleSize) : undefined,
    fpcCorrectedSize: a?.finitePopulationCorrection ? int(a.finitePopulationCorrection.correctedSampleSize) : undefined,
    planKind: a?.kind === 'statistical' ? L.planKinds[a.plan?.kind ?? 'single'] : undefined,
    planFirstSize: two ? int(two.firstSampleSize) : undefined,
    planFirstAcceptance: two ? int(two.firstAcceptanceNumber) : undefined,
    planFirstRejection: two ? int(two.firstRejectionNumber) : undefined,
    planSecondSize: two ? int(two.secondSampleSize) : undefined,
    planSecondAcceptance: two ? int(two.secondAcceptanceNumber) : undefined,
    planMaxSize: two ? int(two.firstSampleSize + two.secondSampleSize) : undefined,
    planSize: both ? int(both.sampleSize) : undefined,
    planTolerableRate,
    planAcceptance: both ? int(both.acceptanceNumber) : undefined,
    planOverrelianceRisk: plan ? pctUp(plan.overrelianceRisk) : undefined,
    planUnderrelianceRisk: plan ? pctUp(plan.underrelianceRisk) : undefined,
    planAllowedUnderrelianceRisk: plan ? pctUp(plan.allowedUnderrelianceRisk) : undefined,
    planExpectedItems: two ? two.averageSampleNumber.toFixed(1) : undefined,
    planSecondStageChance: two ? pctUp(two.secondStageProbability) : undefined,
    policyName: a?.policy?.name,
    policyFrequency: a?.policy ? L.frequencies[a.policy.frequency] : undefined,
    policyReliance: a?.policy?.reliance,
    policySize: a?.policy ? int(a.policy.size) : undefined,
    policyAssumptions: a?.policy?.assumptions,
    selectionMethod: s ? L.methods[s.method] : undefined,
    algorithm: s ? algorithmParts(s.algorithm).id : undefined,
    algorithmDescription: s ? algorithmParts(s.algorithm).description : undefined,
    seed: s?.seed,
    interval: s?.interval !== undefined ? String(Number(s.interval.toPrecision(10))) : undefined,
    haphazardBy: s?.haphazard?.selectedBy,
    haphazardHow: s?.haphazard?.how,
    selectedAt: s ? dateTime(s.selectedAt) : undefined,
    itemsSelected: s ? int(s.items.length) : undefined,
    sparesUsed: int(spares.filter((x) => x.spareKey !== L.none).length),
    testedItems: wp.results ? int(tested.length) : undefined,
    totalDeviations: wp.results ? int(deviations.length) : undefined,
    attributesNotSupported: notSupported.length ? notSupported.join(', ') : undefined,
    attributesAgainstEvidence: attributes.some((x) => x.againstEvidence) ? attributes.filter((x) => x.againstEvidence).map((x) => x.attribute.id).join(', ') : undefined,
    controlConclusion: wp.conclusion?.control.text,
    severity: sev ? L.severities[sev.classification] : undefined,
    followUpsSection: undefined, // set by the renderer, which numbers the sections
    workpaperFile,
    reperformCommand: `tolrate reperform ${workpaperFile ?? 'FILE'}`,
    toolVersion: opts.toolVersion ?? wp.tool.version,
    generatedAt: dateTime(now.toISOString()),
    updatedAt: dateTime(wp.updatedAt),
    workpaperId: wp.id,
    logEntries: int(wp.log.length),
    lastLogHash: last?.hash,
    contentHash: stateHash(wp),
    ...partValues(wp, rfModel),
  };

  // A test in parts: the spread is shown over the whole period, both parts added month by month.
  const spread = spreadView(wp);
  if (spread && spread.kind !== 'no-dates') values.spreadDateColumn = spread.dateColumn;
  if (spread?.kind === 'table') {
    values.spreadMonthsUnselected = spread.unselected.join(', ');
    values.spreadMonthsEmpty = spread.empty.join(', ');
    values.spreadOutsideCount = int(spread.outside.population);
    values.spreadUndatedCount = int(spread.undated.population);
    const sp = spread.parts;
    if (sp) {
      const names = (ps: readonly SpreadPart[]) => (ps.length ? ps.map((x) => L.spreadPartNames[x]).join(` ${L.spreadPartsAnd} `) : undefined);
      const uncounted = new Set<SpreadPart>([...sp.noTally, ...sp.noDates, ...sp.noPopulation]);
      values.spreadSplitMonth = sp.split;
      values.spreadPartsPending = names(sp.pending);
      values.spreadPartsNoTally = names(sp.noTally);
      values.spreadPartsNoDates = names(sp.noDates);
      values.spreadPartsNoPopulation = names(sp.noPopulation);
      values.spreadPartsCounted = names((['interim', 'roll-forward'] as const).filter((x) => !uncounted.has(x)));
    }
  }

  const followUps = (wp.conclusion?.followUps ?? []).map((f) => ({ ...f, kindLabel: L.followUpKinds[f.kind] }));
  return { wp, draft, notFinal, concluded, evaluation, outcome, nonStatistical, haphazard, illustrative, values, attributes, deviations, items, spares, followUps, missing, spread, ...(rfModel ? { rollForward: rfModel } : {}) };
}

/** The placeholders of a test done in parts (undefined members for a test without a roll-forward). */
function partValues(wp: Workpaper, rf: MemoModel | undefined): Record<string, string | undefined> {
  const r = wp.rollForward;
  if (!r || !rf) return {};
  const N = (wp.population?.fingerprint.rowCount ?? 0) + (r.population?.fingerprint.rowCount ?? 0);
  return {
    interimDate: r.interimDate,
    rollForwardStart: r.periodStart,
    rollForwardEnd: r.periodEnd,
    rollForwardPopulationCount: r.population ? int(r.population.fingerprint.rowCount) : undefined,
    rollForwardSha256: r.population?.fingerprint.sha256,
    rollForwardSampleSize: r.sampleSize !== undefined ? int(r.sampleSize) : undefined,
    rollForwardRationale: r.rationale,
    rollForwardSeed: r.selection?.seed,
    rollForwardSparesUsed: rf.values.sparesUsed,
    wholePeriodPopulation: r.population && wp.population ? int(N) : undefined,
  };
}

/** Exact figures for the appendix, to 4 decimal places of a percent. */
export function exact(f: number): string {
  return pctExact(f);
}
