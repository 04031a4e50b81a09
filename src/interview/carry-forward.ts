/**
 * Carrying a test forward from last year's workpaper: the control, the attributes with their
 * deviation definitions, and the approach and rates become the defaults of this year's questions
 * (by question id), to be confirmed one by one. The population, the selection, the results and
 * the conclusion are not copied. Last year's figures, severity and follow-up actions are kept
 * beside them, to be shown when the expected rate is asked.
 */
import type { CarriedForward, Workpaper } from '../workpaper/schema.js';
import { stateHash } from '../workpaper/log.js';
import { isAnswered, SEVERITY_LABELS, FOLLOW_UP_LABELS, type StepName } from '../control-test/index.js';
import { pctPlain, pctUp, int } from '../util/format.js';
import { TolrateInputError, UsageError } from '../errors.js';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { loadWorkpaper, newWorkpaper, saveWorkpaper } from '../workpaper/file.js';
import { attributeAnswers, controlAnswers } from '../engagement/library.js';

type Answers = Record<string, string | boolean>;

/** The answers of last year's control, attributes and approach, by step and question id. */
export function defaultsFrom(last: Workpaper): CarriedForward['defaults'] {
  const out: CarriedForward['defaults'] = {};
  const c = last.control;
  if (c) {
    out['plan.control'] = controlAnswers(c);
  }
  const attrs = last.attributes ?? [];
  if (attrs.length > 0) out['plan.attributes'] = attributeAnswers(attrs);
  const ap = last.approach;
  if (ap) {
    const a: Answers = { 'plan.approach.kind': ap.kind, 'plan.approach.tolerableRate': pctPlain(ap.tolerableRate) };
    if (ap.kind === 'statistical') {
      a['plan.approach.confidence'] = pctPlain(ap.confidence);
      a['plan.approach.expectedRate'] = pctPlain(ap.expectedRate);
      a['plan.approach.model'] = ap.model;
      a['plan.approach.plan'] = ap.plan?.kind ?? 'single';
      if (ap.plan?.kind === 'both-risks') a['plan.approach.underrelianceRisk'] = pctPlain(ap.plan.allowedUnderrelianceRisk);
    }
    out['plan.approach'] = a;
  }
  return out;
}

/** What this year's file records of last year's: where it is, its state, the defaults and the figures. */
export function carryForward(last: Workpaper, shownPath: string): CarriedForward {
  if (!last.control || !last.attributes) {
    throw new TolrateInputError(`${shownPath} has no control and attributes yet, so there is nothing to carry forward.`, 'NOTHING_TO_CARRY');
  }
  const ev = last.evaluation;
  return {
    path: shownPath,
    stateHash: stateHash(last),
    ...(last.engagement ? { reference: last.engagement.reference, periodEnd: last.engagement.periodEnd } : {}),
    defaults: defaultsFrom(last),
    lastYear: {
      ...(last.approach?.kind === 'statistical' ? { expectedRate: last.approach.expectedRate } : {}),
      attributes: (ev?.attributes ?? []).map((x) => ({ attributeId: x.attributeId, sampleSize: x.sampleSize, deviations: x.deviations, sampleRate: x.sampleRate, upperLimit: x.upperLimit, tolerableRate: x.tolerableRate })),
      ...(last.conclusion ? { controlSupportsReliance: last.conclusion.control.supportsReliance } : {}),
      ...(last.conclusion?.severity ? { severity: { classification: last.conclusion.severity.classification, rationale: last.conclusion.severity.rationale } } : {}),
      followUps: last.conclusion?.followUps ?? [],
    },
  };
}

/** The carried-forward defaults of the steps this workpaper has not answered yet. */
export function carriedDefaults(wp: Workpaper): Answers {
  const cf = wp.carriedForward;
  if (!cf) return {};
  const out: Answers = {};
  for (const [step, answers] of Object.entries(cf.defaults)) {
    if (!isAnswered(wp, step as StepName)) Object.assign(out, answers);
  }
  return out;
}

/** Last year's figures and findings, shown when this year's expected rate is asked. */
export function lastYearLines(cf: CarriedForward): string[] {
  const L: string[] = [];
  const ly = cf.lastYear;
  L.push(`  Last year (${cf.reference ?? cf.path}${cf.periodEnd ? `, period to ${cf.periodEnd}` : ''}):`);
  if (ly.attributes.length === 0) L.push('    not evaluated: no sample deviation rate to show');
  for (const a of ly.attributes) {
    L.push(`    ${a.attributeId}: ${a.deviations} deviation(s) in ${int(a.sampleSize)} items, sample rate ${pctPlain(a.sampleRate)}, upper limit ${pctUp(a.upperLimit)} against ${pctPlain(a.tolerableRate)} tolerable`);
  }
  if (ly.expectedRate !== undefined) L.push(`    expected rate planned last year: ${pctPlain(ly.expectedRate)}`);
  if (ly.controlSupportsReliance === false) L.push('    last year the control did not support the planned reliance');
  if (ly.severity && ly.severity.classification !== 'none') L.push(`    deficiency last year: ${SEVERITY_LABELS[ly.severity.classification]} — ${ly.severity.rationale}`);
  return L;
}

/** Last year's follow-up actions, listed for this year's attention. */
export function followUpLines(cf: CarriedForward): string[] {
  const f = cf.lastYear.followUps;
  if (f.length === 0) return [];
  return [
    `  Last year's follow-up actions (${f.length}; tolrate does not record whether they were done — check each this year):`,
    ...f.map((x) => `    - ${FOLLOW_UP_LABELS[x.kind]}: ${x.description}${x.owner ? ` Owner: ${x.owner}.` : ''}${x.due ? ` Due ${x.due}.` : ''}`),
  ];
}

/**
 * Start this year's workpaper at `path` from last year's at `fromPath`: a new file holding only
 * where it came from and the defaults. Refused when `path` exists (it would be overwritten).
 */
export function startCarriedForward(path: string, fromPath: string, shownFrom: string, toolVersion: string, now: Date): Workpaper {
  if (existsSync(path)) {
    throw new UsageError(`${path} exists already; carry forward starts a new workpaper file.`, ['Name a new file, e.g. the control and this year: tolrate plan NEW --from LAST.tolrate.json']);
  }
  if (resolve(path) === resolve(fromPath)) throw new UsageError('The new workpaper and last year\'s are the same file.');
  const last = loadWorkpaper(fromPath);
  const wp: Workpaper = { ...newWorkpaper(toolVersion, now), carriedForward: carryForward(last, shownFrom) };
  return saveWorkpaper(path, wp, { by: 'tolrate', step: 'plan.carry-forward', at: now });
}
