/**
 * Re-performance: re-derive a test from its workpaper file and its population, and name every
 * difference. A reviewer (or an inspector years later) runs this instead of redoing the
 * arithmetic by hand:
 *
 *  1. the workpaper's change log: hash chain intact, and the file is what its log says (an edit
 *     made outside tolrate is named by its path);
 *  2. the population: SHA-256, row count, first and last key, amount total, the rows by month;
 *  3. the selection: drawn again from the recorded method, seed and algorithm and compared item
 *     by item (position, key, source row); a haphazard list is checked against the population;
 *  4. the sample size: recomputed from the recorded confidence, rates and model;
 *  5. the evidence: every evidence file fingerprinted when its item was recorded is unchanged;
 *  6. the evaluation: every rate, limit, risk, decision and extension recomputed from the
 *     recorded results;
 *  7. the conclusion: no attribute concluded as supporting reliance that the figures or the
 *     qualitative review do not support;
 *  8. optionally the memo: it carries the same figures as the workpaper.
 */
import { dirname, isAbsolute, relative, resolve } from 'node:path';
import { accessSync, constants } from 'node:fs';
import { readRegularFile } from '../io/read.js';
import { FileInputError, TolrateInputError } from '../errors.js';
import { planForBothRisks, sampleSize as computeSampleSize, twoStagePlan } from '../stats/index.js';
import { stageOfDraw } from '../selection/index.js';
import { twoStageOf } from '../control-test/index.js';
import { conclusionProblems, evaluate, evaluationDifferences, evidenceDifferences, monthsTouched, partView, progress, proRataSize, worklist, worklistProblems } from '../control-test/index.js';
import { parseWorkpaper, verifyLog, type Workpaper } from '../workpaper/index.js';
import { replay } from '../workpaper/log.js';
import { compareMemoBlocks, readMemoBlocks } from '../memo/read.js';
import { createHash } from 'node:crypto';
import type { PopulationSource as WorkpaperSource, SelectedItem } from '../workpaper/schema.js';
import { pct, pctExact, pctLimit, pctPlain, pctUp } from '../util/format.js';
import { wrap } from '../util/text.js';

export type Area = 'integrity' | 'population' | 'selection' | 'sample size' | 'results' | 'evidence' | 'evaluation' | 'conclusion' | 'memo';

export interface Check {
  area: Area;
  /** One line saying what was checked and what was found. */
  summary: string;
  /** Each difference, named. Empty when the area agrees. */
  differences: string[];
  /** True when the area could not be checked (not recorded yet); not a difference. */
  skipped?: boolean;
}

export interface ReperformReport {
  workpaperPath: string;
  populationPath?: string;
  memoPath?: string;
  checks: Check[];
  /** True when every check that ran agrees. */
  ok: boolean;
}

export interface ReperformOptions {
  workpaper: Workpaper;
  workpaperPath: string;
  /** Overrides the population path recorded in the workpaper. */
  populationPath?: string;
  memoPath?: string;
  /** The memo template the memo was written with, when not the one recorded with it. */
  templateDir?: string;
  /** The memo's name as the user gave it (shown in the report; default: its path). */
  memoLabel?: string;
  /** Progress bar stream for big populations (a terminal), or nothing. */
  progress?: { write(text: string): unknown; isTTY?: boolean };
}

const LIMIT_TOLERANCE = 1e-9;

function close(a: number, b: number, tol = LIMIT_TOLERANCE): boolean {
  return Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));
}

/** The population source as the population reader wants it, with its path resolved. */
export function resolveSource(wp: Workpaper, workpaperPath: string, override?: string): { source: import('../population/index.js').PopulationSource; path?: string } {
  const s = wp.population!.source as WorkpaperSource;
  if (s.kind === 'ranges') return { source: { kind: 'ranges', ranges: s.ranges, exclusions: s.exclusions } };
  if (s.kind === 'periods') return { source: { ...s } };
  const base = dirname(resolve(workpaperPath));
  const path = override ? resolve(override) : isAbsolute(s.path) ? s.path : resolve(base, s.path);
  const cols = {
    keyColumn: s.keyColumn,
    ...(s.amountColumn ? { amountColumn: s.amountColumn } : {}),
    ...(s.dateColumn ? { dateColumn: s.dateColumn } : {}),
    ...(s.decimalComma ? { decimalComma: s.decimalComma } : {}),
    ...(s.dateOrder ? { dateOrder: s.dateOrder } : {}),
  };
  if (s.kind === 'csv') return { source: { kind: 'csv', path, ...cols, ...(s.delimiter ? { delimiter: s.delimiter } : {}) }, path };
  return { source: { kind: 'xlsx', path, ...cols, ...(s.sheet ? { sheet: s.sheet } : {}) }, path };
}

async function checkPopulation(wp: Workpaper, opts: ReperformOptions): Promise<{ check: Check; source?: import('../population/index.js').PopulationSource; rowCount?: number }> {
  const pop = await import('../population/index.js');
  const { groupDigits } = pop;
  if (!wp.population) return { check: { area: 'population', summary: 'not recorded yet', differences: [], skipped: true } };
  const { source, path } = resolveSource(wp, opts.workpaperPath, opts.populationPath);
  if (path) {
    try {
      accessSync(path, constants.R_OK);
    } catch {
      throw new FileInputError(path, `Cannot read the population file ${path}.`, [
        `The workpaper records it as "${(wp.population.source as { path: string }).path}" relative to the workpaper's folder.`,
        'Give its current location with --population PATH.',
      ]);
    }
  }
  const scan = await pop.scanPopulation(source, opts.progress ? { progress: opts.progress } : {});
  const rec = wp.population.fingerprint;
  const got = scan.fingerprint;
  const diffs: string[] = [];
  if (got.sha256 !== rec.sha256) diffs.push(`population SHA-256 differs: recorded ${rec.sha256}, file has ${got.sha256} — the file is not the one tested`);
  if (got.rowCount !== rec.rowCount) diffs.push(`population row count differs: recorded ${rec.rowCount}, file has ${got.rowCount}`);
  if (got.firstKey !== rec.firstKey) diffs.push(`first key differs: recorded "${rec.firstKey}", file has "${got.firstKey}"`);
  if (got.lastKey !== rec.lastKey) diffs.push(`last key differs: recorded "${rec.lastKey}", file has "${got.lastKey}"`);
  if (rec.amountTotal !== undefined && got.amountTotal !== rec.amountTotal) {
    diffs.push(`amount total differs: recorded ${rec.amountTotal}, file has ${got.amountTotal ?? '(none)'}`);
  }
  // The rows by month, counted again (files written before it was recorded have none to compare).
  if (rec.monthTally !== undefined) diffs.push(...pop.monthTallyDifferences(rec.monthTally, got.monthTally));
  const rel = path ? relative(dirname(resolve(opts.workpaperPath)), path) : undefined;
  const ws = wp.population.source;
  const where = path ? (rel && !rel.startsWith('..') ? rel : path) : ws.kind === 'periods' ? `periods: ${pop.describePeriods(ws)}` : `ranges ${(ws as { ranges: string }).ranges}`;
  const summary = diffs.length === 0
    ? `${where}: SHA-256 ${got.sha256.slice(0, 16)}…, ${got.rowCount.toLocaleString('en-US')} rows, first ${got.firstKey}, last ${got.lastKey}${got.amountTotal ? `, total ${groupDigits(got.amountTotal)}` : ''}${rec.monthTally?.dateColumn !== undefined ? `, ${rec.monthTally.months.length} month${rec.monthTally.months.length === 1 ? '' : 's'} by ${rec.monthTally.dateColumn}` : ''} — as recorded`
    : `${where}: ${diffs.length} difference(s)`;
  return { check: { area: 'population', summary, differences: diffs }, source, rowCount: got.rowCount };
}

async function checkSelection(wp: Workpaper, source: import('../population/index.js').PopulationSource | undefined, rowCount: number | undefined): Promise<Check> {
  const sel = wp.selection;
  if (!sel) return { area: 'selection', summary: 'not recorded yet', differences: [], skipped: true };
  const items = [...sel.items].sort((a, b) => a.seq - b.seq);
  const diffs: string[] = [];
  const samples = items.filter((i) => i.role === 'sample').length;
  const spares = items.filter((i) => i.role === 'spare').length;
  if (samples !== sel.sampleSize) diffs.push(`the workpaper lists ${samples} sample items but records a sample size of ${sel.sampleSize}`);
  if (spares !== sel.spares) diffs.push(`the workpaper lists ${spares} spares but records ${sel.spares}`);
  diffs.push(...stageProblems(wp, items));
  if (wp.approach && sel.method !== 'haphazard' && sel.sampleSize !== wp.approach.sampleSize) {
    diffs.push(`the selection drew ${sel.sampleSize} items but the approach adopted a sample size of ${wp.approach.sampleSize}`);
  }
  if (!source || rowCount === undefined) {
    return { area: 'selection', summary: 'population not available, selection not re-drawn', differences: diffs, skipped: diffs.length === 0 };
  }
  const pop = await import('../population/index.js');
  const selection = await import('../selection/index.js');
  if (sel.method === 'haphazard') {
    const found = await pop.findKeys(source, items.map((i) => i.key));
    for (const k of found.unknown) diffs.push(`haphazard item ${k} is not in the population`);
    const byKey = new Map(found.found.map((r) => [r.key, r]));
    for (const it of items) {
      const r = byKey.get(it.key);
      if (r && r.position !== it.position) diffs.push(`item ${it.seq} (${it.key}): recorded at position ${it.position}, found at ${r.position}`);
    }
    const summary = diffs.length === 0
      ? `haphazard list of ${items.length} items: every key found in the population where recorded (a haphazard selection cannot be re-drawn)`
      : `haphazard list of ${items.length} items: ${diffs.length} difference(s)`;
    return { area: 'selection', summary, differences: diffs };
  }
  let redrawn;
  try {
    redrawn = selection.redraw(
      { method: sel.method, algorithm: sel.algorithm, ...(sel.seed !== undefined ? { seed: sel.seed } : {}), sampleSize: sel.sampleSize, spares: sel.spares, ...(sel.starts ? { starts: sel.starts } : {}) },
      rowCount,
    );
  } catch (e) {
    if (e instanceof TolrateInputError) {
      diffs.push(`the selection cannot be drawn again: ${e.message}`);
      return { area: 'selection', summary: 'not re-drawn', differences: diffs };
    }
    throw e;
  }
  const positions = redrawn.positions;
  const rows = await pop.readRowsAt(source, positions);
  const n = Math.max(positions.length, items.length);
  let itemDiffs = 0;
  for (let i = 0; i < n; i++) {
    const it = items[i];
    const p = positions[i];
    const row = rows[i];
    if (!it) {
      diffs.push(`re-drawing gives an item ${i + 1} (position ${p}) that the workpaper does not list`);
      itemDiffs++;
      continue;
    }
    if (p === undefined) {
      diffs.push(`item ${it.seq} (${it.key}) is listed but re-drawing gives only ${positions.length} items`);
      itemDiffs++;
      continue;
    }
    const label = `item ${it.seq} (${it.role})`;
    if (it.position !== p) {
      diffs.push(`${label}: recorded position ${it.position} (key ${it.key}), re-drawn position ${p}${row ? ` (key ${row.key})` : ''}`);
      itemDiffs++;
    } else if (row && row.key !== it.key) {
      diffs.push(`${label}: recorded key ${it.key}, the population has ${row.key} at that position (row ${row.row})`);
      itemDiffs++;
    } else if (row && row.row !== it.row) {
      diffs.push(`${label} (${it.key}): recorded source row ${it.row}, found at row ${row.row}`);
      itemDiffs++;
    }
  }
  if (sel.interval !== undefined && redrawn.interval !== undefined && !close(sel.interval, redrawn.interval)) {
    diffs.push(`systematic interval: recorded ${sel.interval}, re-derived ${redrawn.interval}`);
  }
  const what = `${sel.method}, ${sel.algorithm.split(':')[0]}, seed ${sel.seed}, ${sel.sampleSize} items + ${sel.spares} spares`;
  const summary = diffs.length === 0 ? `${what}: every item re-drawn the same, in the same order` : `${what}: ${diffs.length} difference(s)${itemDiffs ? `, ${itemDiffs} item(s)` : ''}`;
  return { area: 'selection', summary, differences: diffs };
}

/**
 * Two-stage plan: each sample item's recorded stage against the rule (the first n1 draws are
 * stage 1, the next n2 stage 2; spares have none); without such a plan no item has a stage.
 */
function stageProblems(wp: Workpaper, items: readonly SelectedItem[]): string[] {
  const two = twoStageOf(wp);
  const out: string[] = [];
  items.forEach((it, i) => {
    const expected = two && it.role === 'sample' ? stageOfDraw(i, two.firstSampleSize) : undefined;
    if (it.stage !== expected) {
      out.push(`item ${it.seq} (${it.key}, ${it.role}): recorded ${it.stage ? `stage ${it.stage}` : 'no stage'}, ${expected ? `the plan gives stage ${expected} (the first ${two!.firstSampleSize} draws are stage 1)` : 'the plan gives none'}`);
    }
  });
  const n = two ? two.firstSampleSize + two.secondSampleSize : undefined;
  if (n !== undefined && wp.selection && wp.selection.sampleSize !== n) out.push(`the two-stage plan needs ${n} sample items (${two!.firstSampleSize} + ${two!.secondSampleSize}); the selection has ${wp.selection.sampleSize}`);
  return out;
}

/** The recorded plan (two stages, or both risks) recomputed from the recorded parameters; each difference named. */
function planDifferences(wp: Workpaper): { diffs: string[]; words?: string } {
  const a = wp.approach!;
  const p = a.plan;
  if (!p || a.kind !== 'statistical') return { diffs: [] };
  const diffs: string[] = [];
  const N = wp.population?.fingerprint.rowCount;
  const params = { confidence: a.confidence, tolerableRate: a.tolerableRate, expectedRate: a.expectedRate, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) };
  const own = (wp.attributes ?? []).filter((x) => x.tolerableRate !== undefined && x.tolerableRate !== a.tolerableRate);
  if (p.kind === 'two-stage' && own.length > 0) diffs.push(`the two-stage plan uses the test's one tolerable rate, but ${own.map((x) => x.id).join(', ')} ${own.length === 1 ? 'has its' : 'have their'} own`);
  // Both risks: planned at the lowest tolerable rate, which serves every attribute.
  const rates = (wp.attributes ?? []).map((x) => x.tolerableRate ?? a.tolerableRate);
  const lowest = rates.length > 0 ? Math.min(...rates) : a.tolerableRate;
  const num = (label: string, rec: number, got: number) => {
    if (!close(rec, got)) diffs.push(`${label}: recorded ${rec}, recomputed ${got}`);
  };
  try {
    if (p.kind === 'two-stage') {
      const t = twoStagePlan(params);
      num('first sample size n1', p.firstSampleSize, t.plan.firstSampleSize);
      num('first acceptance number c1', p.firstAcceptanceNumber, t.plan.firstAcceptanceNumber);
      num('first rejection number r1', p.firstRejectionNumber, t.plan.firstRejectionNumber);
      num('second sample size n2', p.secondSampleSize, t.plan.secondSampleSize);
      num('second acceptance number c2', p.secondAcceptanceNumber, t.plan.secondAcceptanceNumber);
      num("the plan's risk of overreliance", p.overrelianceRisk, t.overrelianceRisk);
      num("the plan's risk of underreliance", p.underrelianceRisk, t.underrelianceRisk);
      num('expected items at the expected rate', p.averageSampleNumber, t.averageSampleNumber);
      num('chance of the second stage', p.secondStageProbability, t.secondStageProbability);
      num('allowed risk of underreliance', p.allowedUnderrelianceRisk, t.allowedUnderrelianceRisk);
      if (a.sampleSize !== p.firstSampleSize + p.secondSampleSize) diffs.push(`adopted sample size ${a.sampleSize}, the two-stage plan has ${p.firstSampleSize} + ${p.secondSampleSize}`);
      return { diffs, words: `two stages n1 ${t.plan.firstSampleSize}, c1 ${t.plan.firstAcceptanceNumber}, r1 ${t.plan.firstRejectionNumber}, n2 ${t.plan.secondSampleSize}, c2 ${t.plan.secondAcceptanceNumber} (risk of overreliance ${pctUp(t.overrelianceRisk)})` };
    }
    const b = planForBothRisks({ ...params, tolerableRate: lowest, underrelianceRisk: p.allowedUnderrelianceRisk });
    num('sample size planned for both risks', p.sampleSize, b.sampleSize);
    num('acceptance number', p.acceptanceNumber, b.acceptanceNumber);
    num("the plan's risk of overreliance", p.overrelianceRisk, b.overrelianceRisk);
    num("the plan's risk of underreliance", p.underrelianceRisk, b.underrelianceRisk);
    if (a.sampleSize !== p.sampleSize) diffs.push(`adopted sample size ${a.sampleSize}, the plan for both risks has ${p.sampleSize}`);
    return { diffs, words: `planned for both risks: n ${b.sampleSize}, c ${b.acceptanceNumber} (overreliance ${pctUp(b.overrelianceRisk)}, underreliance ${pctUp(b.underrelianceRisk)} within ${pctPlain(p.allowedUnderrelianceRisk)})` };
  } catch (e) {
    if (e instanceof TolrateInputError) return { diffs: [...diffs, `the recorded parameters give no ${p.kind} plan: ${e.message}`] };
    throw e;
  }
}

function checkSampleSize(wp: Workpaper): Check {
  const a = wp.approach;
  if (!a) return { area: 'sample size', summary: 'not planned yet', differences: [], skipped: true };
  const diffs: string[] = [];
  if (a.kind === 'non-statistical') {
    if (a.policy && a.sampleSize < a.policy.size) diffs.push(`adopted size ${a.sampleSize} is below the policy's ${a.policy.size}`);
    return {
      area: 'sample size',
      summary: diffs.length ? `non-statistical: ${diffs.length} difference(s)` : `non-statistical: ${a.sampleSize} items${a.policy ? ` (policy "${a.policy.name}": ${a.policy.size})` : ''}; sampling risk not quantified`,
      differences: diffs,
    };
  }
  const N = a.model === 'hypergeometric' ? wp.population?.fingerprint.rowCount : undefined;
  const planned = a.sizes.length > 0
    ? a.sizes.map((s) => ({ label: s.attributeId, tolerableRate: s.tolerableRate, recorded: s }))
    : [{ label: 'the test', tolerableRate: a.tolerableRate, recorded: undefined }];
  let largest = 0;
  for (const p of planned) {
    let r;
    try {
      r = computeSampleSize({ confidence: a.confidence, tolerableRate: p.tolerableRate, expectedRate: a.expectedRate, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) });
    } catch (e) {
      if (e instanceof TolrateInputError) {
        diffs.push(`${p.label}: the recorded parameters give no sample size: ${e.message}`);
        continue;
      }
      throw e;
    }
    largest = Math.max(largest, r.sampleSize);
    if (p.recorded) {
      if (p.recorded.sampleSize !== r.sampleSize) diffs.push(`${p.label}: recorded sample size ${p.recorded.sampleSize}, recomputed ${r.sampleSize}`);
      if (p.recorded.expectedDeviations !== r.expectedDeviations) diffs.push(`${p.label}: recorded expected deviations ${p.recorded.expectedDeviations}, recomputed ${r.expectedDeviations}`);
      if (!close(p.recorded.achievedRisk, r.achievedRisk)) diffs.push(`${p.label}: recorded planned risk ${p.recorded.achievedRisk}, recomputed ${r.achievedRisk}`);
      if (p.recorded.acceptanceNumber !== undefined && p.recorded.acceptanceNumber !== r.acceptanceNumber) diffs.push(`${p.label}: recorded acceptance number ${p.recorded.acceptanceNumber}, recomputed ${r.acceptanceNumber}`);
      if (p.recorded.underrelianceRisk !== undefined && !close(p.recorded.underrelianceRisk, r.underrelianceRisk)) {
        diffs.push(`${p.label}: recorded risk of underreliance ${p.recorded.underrelianceRisk}, recomputed ${r.underrelianceRisk}`);
      }
    }
    if (a.finitePopulationCorrection && r.finitePopulationCorrection && p === planned[0]) {
      const f = a.finitePopulationCorrection;
      const g = r.finitePopulationCorrection;
      if (f.binomialSampleSize !== g.binomialSampleSize || f.correctedSampleSize !== g.correctedSampleSize) {
        diffs.push(`finite population correction: recorded ${f.binomialSampleSize} → ${f.correctedSampleSize}, recomputed ${g.binomialSampleSize} → ${g.correctedSampleSize}`);
      }
    }
  }
  const plan = planDifferences(wp);
  diffs.push(...plan.diffs);
  // A planned plan has its own size (checked above); the single-stage size is shown beside it.
  if (!a.plan && largest > 0 && a.sampleSize < largest) diffs.push(`adopted sample size ${a.sampleSize} is below the ${largest} the parameters require`);
  const summary = diffs.length === 0
    ? `${a.model}, ${pctPlain(a.confidence)} confidence, tolerable ${pctPlain(a.tolerableRate)}, expected ${pctPlain(a.expectedRate)}${N ? `, N = ${N.toLocaleString('en-US')}` : ''}: ` +
      (plan.words ? `${plan.words}, ${a.sampleSize} selected (one sample would need ${largest}) — as recorded` : `${largest} required, ${a.sampleSize} adopted — as recorded`)
    : `${diffs.length} difference(s)`;
  return { area: 'sample size', summary, differences: diffs };
}

function checkResults(wp: Workpaper): Check {
  if (!wp.results || !wp.selection) return { area: 'results', summary: 'no results recorded yet', differences: [], skipped: true };
  const evaluated = wp.evaluation !== undefined || wp.conclusion !== undefined;
  const diffs = worklistProblems(wp, { requireComplete: evaluated });
  const wl = worklist(wp);
  const p = progress(wp);
  const replacing = wl.items.length - wl.items.filter((x) => x.item.role === 'sample').length;
  const summary = diffs.length === 0
    ? `${p.recorded} of ${wl.items.length} worklist items recorded${replacing > 0 ? ` (${replacing} spare(s) replacing voided items)` : ''}; every result is for a selected item, in draw order`
    : `${diffs.length} difference(s) between the results and the selection`;
  return { area: 'results', summary, differences: diffs };
}

/** Every evidence file fingerprinted when it was recorded is read again: missing or changed is a difference. */
function checkEvidence(wp: Workpaper, workpaperPath: string): Check {
  if (!wp.results) return { area: 'evidence', summary: 'no results recorded yet', differences: [], skipped: true };
  const { checked, differences } = evidenceDifferences(wp, dirname(resolve(workpaperPath)));
  if (checked === 0) return { area: 'evidence', summary: 'no evidence file was fingerprinted (the references name no file beside the workpaper)', differences: [], skipped: true };
  const summary = differences.length === 0
    ? `${checked} evidence file(s) beside the workpaper read again: every SHA-256 as recorded`
    : `${differences.length} of ${checked} evidence file(s) missing or changed since they were recorded`;
  return { area: 'evidence', summary, differences };
}

function checkEvaluation(wp: Workpaper): Check {
  if (!wp.results) return { area: 'evaluation', summary: 'no results recorded yet', differences: [], skipped: true };
  if (!wp.evaluation) return { area: 'evaluation', summary: 'results recorded but not evaluated yet', differences: [], skipped: true };
  let fresh;
  try {
    fresh = evaluate(wp);
  } catch (e) {
    if (e instanceof TolrateInputError) return { area: 'evaluation', summary: 'cannot be recomputed', differences: [`the recorded results cannot be evaluated: ${e.message}`] };
    throw e;
  }
  const diffs = evaluationDifferences(wp.evaluation, fresh, { pct, exact: (x: number) => pctExact(x) });
  const summary = diffs.length === 0
    ? fresh.attributes
        .map((f) =>
          f.parts && f.combined
            ? `${f.attributeId} whole period ${f.deviations}/${f.sampleSize} (${f.parts.map((p) => `${p.part} ${p.deviations}/${p.sampleSize}, limit ${pctUp(p.upperLimit)}`).join('; ')}), limit over both parts ${f.combined.rate !== null ? pctLimit(f.combined.rate, f.tolerableRate) : 'not computed'}, conservative ${pctUp(f.combined.conservativeRate)}`
            : `${f.attributeId} ${f.deviations}/${f.sampleSize}, limit ${pctLimit(f.upperLimit, f.tolerableRate)}${f.stage ? `, stage ${f.stage.reached} reached, ${f.stage.decision}` : ''}`,
        )
        .join('; ') + ' — as recorded'
    : `${diffs.length} difference(s)`;
  return { area: 'evaluation', summary, differences: diffs };
}

function checkConclusion(wp: Workpaper): Check {
  if (!wp.conclusion || !wp.results) return { area: 'conclusion', summary: 'not concluded yet', differences: [], skipped: true };
  const diffs = conclusionProblems(wp);
  const summary = diffs.length === 0
    ? `${wp.conclusion.control.supportsReliance ? 'supports' : 'does not support'} reliance — consistent with the figures and causes`
    : `${diffs.length} difference(s)`;
  return { area: 'conclusion', summary, differences: diffs };
}

/**
 * The roll-forward part of a test done in parts, re-derived as the interim part is: its dates,
 * its population re-read, its size recomputed by its own rule, its selection re-drawn, its
 * results against its worklist and its evidence files. Each check is named "roll-forward".
 */
async function checkRollForward(wp: Workpaper, opts: ReperformOptions): Promise<Check[]> {
  const rf = wp.rollForward!;
  const view = partView(wp, 'roll-forward');
  const named = (c: Check): Check => ({ ...c, summary: `roll-forward part: ${c.summary}` });
  const out: Check[] = [];
  const dates: string[] = [];
  const e = wp.engagement;
  if (e && rf.periodEnd !== e.periodEnd) dates.push(`the roll-forward ends on ${rf.periodEnd}, the period on ${e.periodEnd}`);
  const src = wp.population?.source;
  if (src?.kind === 'periods' && src.end !== rf.interimDate) dates.push(`the interim population's periods end on ${src.end}, the interim date is ${rf.interimDate}`);
  const rsrc = rf.population?.source;
  if (rsrc?.kind === 'periods' && (rsrc.start !== rf.periodStart || rsrc.end !== rf.periodEnd)) {
    dates.push(`the roll-forward population's periods run ${rsrc.start} to ${rsrc.end}, the roll-forward ${rf.periodStart} to ${rf.periodEnd}`);
  }
  out.push({ area: 'population', summary: `roll-forward part: interim date ${rf.interimDate}, roll-forward ${rf.periodStart} to ${rf.periodEnd}${dates.length ? '' : ' — dates consistent'}`, differences: dates });
  if (!rf.population) {
    out.push({ area: 'population', summary: 'roll-forward part: population not recorded yet', differences: [], skipped: true });
    return out;
  }
  // The roll-forward population as its own test's (its path is relative to the workpaper, as the interim one's).
  const { populationPath: _interimOnly, ...rest } = opts;
  const { check: popCheck, source, rowCount } = await checkPopulation(view, { ...rest, workpaper: view });
  // Its fingerprint and its rows by month counted again; each difference names the part, so a
  // month that differs is never taken for one of the interim population's.
  out.push(named({ ...popCheck, differences: popCheck.differences.map((d) => `roll-forward population: ${d}`) }));
  out.push(named(checkRollForwardSize(wp)));
  out.push(named(await checkSelection(view, source, rowCount)));
  out.push(named(checkResults(view)));
  const ev = checkEvidence(view, opts.workpaperPath);
  out.push(named(ev));
  return out;
}

/** The roll-forward's size recomputed by the rule it records (policy pro rata, or statistical on its population). */
function checkRollForwardSize(wp: Workpaper): Check {
  const rf = wp.rollForward!;
  const a = wp.approach;
  if (!a || rf.sampleSize === undefined || !rf.sizing || !rf.population) return { area: 'sample size', summary: 'not planned yet', differences: [], skipped: true };
  const N = rf.population.fingerprint.rowCount;
  const diffs: string[] = [];
  let computed: number;
  if (rf.sizing.kind === 'policy-pro-rata') {
    const e = wp.engagement!;
    const periodMonths = monthsTouched(e.periodStart, e.periodEnd);
    const rfMonths = monthsTouched(rf.periodStart, rf.periodEnd);
    const policySize = a.policy?.size ?? a.sampleSize;
    if (rf.sizing.periodMonths !== periodMonths || rf.sizing.rollForwardMonths !== rfMonths) {
      diffs.push(`recorded ${rf.sizing.rollForwardMonths} of ${rf.sizing.periodMonths} month(s) remaining, the dates give ${rfMonths} of ${periodMonths}`);
    }
    if (rf.sizing.policySize !== policySize) diffs.push(`recorded policy size ${rf.sizing.policySize}, the approach gives ${policySize}`);
    computed = proRataSize(policySize, periodMonths, rfMonths, N);
  } else {
    const M = a.model === 'hypergeometric' ? N : undefined;
    const attrs = wp.attributes ?? [];
    computed = 0;
    for (const at of attrs) {
      try {
        const r = computeSampleSize({ confidence: a.confidence, tolerableRate: at.tolerableRate ?? a.tolerableRate, expectedRate: a.expectedRate, model: a.model, ...(M !== undefined ? { populationSize: M } : {}) });
        computed = Math.max(computed, r.sampleSize);
      } catch (e) {
        if (e instanceof TolrateInputError) diffs.push(`${at.id}: the recorded parameters give no roll-forward size: ${e.message}`);
        else throw e;
      }
    }
    computed = Math.min(computed, N);
  }
  if (rf.sizing.computed !== computed) diffs.push(`recorded computed size ${rf.sizing.computed}, recomputed ${computed}`);
  if (rf.sampleSize < computed) diffs.push(`adopted roll-forward size ${rf.sampleSize} is below the ${computed} its rule gives`);
  const how = rf.sizing.kind === 'policy-pro-rata' ? `policy pro rata (${rf.sizing.policySize} × ${rf.sizing.rollForwardMonths}/${rf.sizing.periodMonths} months)` : `statistical on N = ${N.toLocaleString('en-US')}`;
  return { area: 'sample size', summary: diffs.length === 0 ? `${how}: ${computed} required, ${rf.sampleSize} adopted — as recorded` : `${diffs.length} difference(s)`, differences: diffs };
}

/** The workpaper as it stood after log entry `seq` (content replayed from the log, log cut there). */
export function stateAt(wp: Workpaper, seq: number): Workpaper {
  const log = wp.log.slice(0, seq);
  return parseWorkpaper({ ...replay(log), log } as unknown, `the workpaper as of log entry ${seq}`);
}

/**
 * The memo compared in place: its SHA-256 looked up among the memos the workpaper records (which
 * says which state of the file it shows), the memo rendered afresh from that state with the same
 * template, and the two compared section by section and table cell by table cell.
 */
async function checkMemo(wp: Workpaper, memoPath: string, workpaperPath: string, templateDir?: string, label = memoPath): Promise<Check> {
  const data = readRegularFile(memoPath, 'The memo');
  const diffs: string[] = [];
  const sha = createHash('sha256').update(data).digest('hex');
  const records = wp.memos ?? [];
  const record = records.find((r) => r.sha256 === sha);
  const last = records[records.length - 1];
  const against = record ?? last;
  if (!record) {
    diffs.push(
      records.length === 0
        ? `the workpaper records no memo written from it (this file's SHA-256 is ${sha.slice(0, 16)}…): compared with the memo of the file as it is now`
        : `this file (SHA-256 ${sha.slice(0, 16)}…) is not a memo tolrate recorded writing from this workpaper: it was changed after it was written, or belongs to another file; compared with the last memo recorded (${last!.at}, the state after log entry ${last!.logSeq})`,
    );
  }
  let blocks;
  try {
    blocks = await readMemoBlocks(data, memoPath);
  } catch (e) {
    if (e instanceof FileInputError) return { area: 'memo', summary: `${memoPath}: cannot be read`, differences: [...diffs, e.message] };
    throw e;
  }
  const base = dirname(resolve(workpaperPath));
  const tpl = templateDir ?? (against?.template ? resolve(base, against.template) : undefined);
  const state = against && against.logSeq <= wp.log.length ? stateAt(wp, against.logSeq) : wp;
  const { loadTemplate, renderMemo } = await import('../memo/index.js');
  const template = await loadTemplate(tpl);
  const expected = await readMemoBlocks(await renderMemo(state, { workpaperPath, template, operatingCharacteristic: against?.operatingCharacteristic === true }), 'the memo rendered from the workpaper');
  const found = compareMemoBlocks(blocks, expected);
  for (const d of found.slice(0, 60)) diffs.push(`${d.section}, ${d.where}: the memo has "${d.memo}", the workpaper gives "${d.expected}"`);
  if (found.length > 60) diffs.push(`... and ${found.length - 60} more differences`);
  const later = against ? wp.log.length - against.logSeq - 1 : 0;
  const shows = against
    ? `it shows the state after log entry ${against.logSeq}${later > 0 ? ` (${later} later change(s) are not in it)` : ''}`
    : 'compared with the workpaper as it is now';
  const summary = diffs.length === 0
    ? `${label}: as tolrate wrote it on ${against!.at.replace('T', ' ').replace(/(\.\d+)?Z$/, ' UTC')}; ${shows}; every section and table cell agrees`
    : `${label}: ${found.length} difference(s) in the text; ${shows}`;
  return { area: 'memo', summary, differences: diffs };
}

/** " (item KEY)" for a path inside the selected items or the results, so a reviewer can find it. */
function itemOf(wp: Workpaper, where: string): string {
  const m = /^(selection|results)\.items\[(\d+)\]/.exec(where);
  if (!m) return '';
  const list = m[1] === 'selection' ? wp.selection?.items : wp.results?.items;
  const it = list?.[Number(m[2])];
  return it ? ` (item ${it.seq}, ${it.key})` : '';
}

/** Re-perform the test recorded in a workpaper. Throws TolrateInputError on unusable input. */
export async function reperform(opts: ReperformOptions): Promise<ReperformReport> {
  const wp = opts.workpaper;
  const checks: Check[] = [];
  const problems = verifyLog(wp);
  checks.push({
    area: 'integrity',
    summary: problems.length === 0
      ? `change log of ${wp.log.length} entries intact; the file is as tolrate last wrote it`
      : `${problems.length} problem(s) with the file or its change log`,
    differences: problems.map((p) => `${p.where}${itemOf(wp, p.where)}: ${p.message}`),
  });
  const { check: popCheck, source, rowCount } = await checkPopulation(wp, opts);
  checks.push(popCheck);
  checks.push(checkSampleSize(wp));
  checks.push(await checkSelection(wp, source, rowCount));
  checks.push(checkResults(wp));
  checks.push(checkEvidence(wp, opts.workpaperPath));
  if (wp.rollForward) checks.push(...(await checkRollForward(wp, opts)));
  checks.push(checkEvaluation(wp));
  checks.push(checkConclusion(wp));
  if (opts.memoPath) checks.push(await checkMemo(wp, opts.memoPath, opts.workpaperPath, opts.templateDir, opts.memoLabel));
  return {
    workpaperPath: opts.workpaperPath,
    ...(opts.populationPath ? { populationPath: opts.populationPath } : {}),
    ...(opts.memoPath ? { memoPath: opts.memoPath } : {}),
    checks,
    ok: checks.every((c) => c.differences.length === 0),
  };
}

/** The report as text for a terminal or a file. */
export function formatReport(r: ReperformReport): string {
  const lines: string[] = [];
  lines.push(`Re-performance of ${r.workpaperPath}`);
  lines.push('');
  const pad = ' '.repeat(2 + 12 + 1 + 8 + 1);
  for (const c of r.checks) {
    const status = c.differences.length > 0 ? 'DIFFERS' : c.skipped ? 'skipped' : 'agrees';
    const [first, ...more] = wrap(c.summary, 100 - pad.length);
    lines.push(`  ${c.area.padEnd(12)} ${status.padEnd(8)} ${first}`);
    for (const m of more) lines.push(`${pad}${m}`);
    for (const d of c.differences) {
      const [f, ...rest] = wrap(d, 100 - pad.length - 2);
      lines.push(`${pad}- ${f}`);
      for (const m of rest) lines.push(`${pad}  ${m}`);
    }
  }
  lines.push('');
  const n = r.checks.reduce((s, c) => s + c.differences.length, 0);
  lines.push(r.ok ? 'Everything re-derived agrees with the workpaper.' : `${n} difference(s) found. The workpaper does not re-perform as recorded.`);
  return `${lines.join('\n')}\n`;
}

