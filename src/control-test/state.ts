/**
 * Where a test stands as a whole: the steps still open, whether the file is as tolrate last wrote
 * it, whether the recorded figures and conclusion still follow from the recorded results, and so
 * whether a memo of it can be final.
 */
import { pctExact, pctPlain } from '../util/format.js';
import { verifyLog, type IntegrityProblem } from '../workpaper/log.js';
import type { Evaluation, Workpaper } from '../workpaper/schema.js';
import { TolrateInputError } from '../errors.js';
import { evaluate, evaluationDifferences } from './evaluate.js';
import { conclusionProblems } from './conclude.js';
import { clearSteps, openSteps, STEP_LABELS, type StepName } from './steps.js';
import { worklistProblems } from './worklist.js';
import { partView } from './parts.js';
import { notes, noteStatus } from './review.js';

export interface TestState {
  open: StepName[];
  /** The file differs from what its change log says (edited outside tolrate), each named. */
  integrity: IntegrityProblem[];
  /** Results that do not fit the selection. */
  worklist: string[];
  /** Recorded figures that the recorded results do not give. */
  evaluation: string[];
  /** A conclusion that goes further than the evidence. */
  conclusion: string[];
  /** Every reason a memo of this state cannot be final; empty when it can. */
  notFinal: string[];
  /** The evaluation the recorded results give now (when they can be evaluated). */
  fresh?: Evaluation;
}

/** The state of a test, from its workpaper alone. */
export function testState(wp: Workpaper): TestState {
  const open = openSteps(wp);
  const integrity = verifyLog(wp);
  const requireComplete = wp.evaluation !== undefined || wp.conclusion !== undefined;
  const worklist = [
    ...worklistProblems(wp, { requireComplete }),
    ...(wp.rollForward ? worklistProblems(partView(wp, 'roll-forward'), { requireComplete }).map((p) => `roll-forward part: ${p}`) : []),
  ];
  let evaluation: string[] = [];
  let fresh: Evaluation | undefined;
  if (wp.evaluation && wp.results) {
    try {
      fresh = evaluate(wp, new Date(wp.evaluation.evaluatedAt));
      evaluation = evaluationDifferences(wp.evaluation, fresh, { pct: pctPlain, exact: pctExact });
    } catch (e) {
      if (!(e instanceof TolrateInputError)) throw e;
      evaluation = [`the recorded results cannot be evaluated: ${e.message}`];
    }
  }
  const conclusion = conclusionProblems(wp);
  const notFinal: string[] = [];
  if (open.length > 0) notFinal.push(`steps still open: ${open.map((s) => STEP_LABELS[s]).join(', ')}`);
  if (integrity.length > 0) notFinal.push(`the file was changed outside tolrate (${integrity.length} difference(s) from its change log)`);
  for (const w of worklist) notFinal.push(`results and selection: ${w}`);
  for (const d of evaluation) notFinal.push(`evaluation: ${d}`);
  for (const d of conclusion) notFinal.push(`conclusion: ${d}`);
  const unclear = notes(wp).filter((n) => noteStatus(n) !== 'cleared');
  if (unclear.length > 0) notFinal.push(`review notes not cleared: ${unclear.map((n) => `${n.id} (${noteStatus(n)})`).join(', ')}`);
  if (wp.signoffs?.preparer && !wp.signoffs.reviewer) notFinal.push('the reviewer has not signed off');
  return { open, integrity, worklist, evaluation, conclusion, notFinal, ...(fresh ? { fresh } : {}) };
}

/**
 * The workpaper after the practitioner accepted changes made to it outside tolrate: the
 * evaluation is made again from the results as they now are, the sign-offs are cleared (they
 * covered a different record), and a conclusion is kept only while the new figures still bear it
 * out; otherwise its answers are kept as the defaults for concluding again. Returns what was done,
 * in words, for the log and the screen.
 */
export function afterOutsideEdit(wp: Workpaper, now: Date): { wp: Workpaper; notes: string[] } {
  let out: Workpaper = wp;
  const notes: string[] = [];
  if (out.signoffs?.preparer || out.signoffs?.reviewer) {
    const { signoffs: _s, ...rest } = out;
    out = rest as Workpaper;
    notes.push('the sign-offs are cleared: they covered the file as it was before');
  }
  if (out.evaluation || out.conclusion) {
    let fresh;
    try {
      fresh = out.results ? evaluate(out, now) : undefined;
    } catch (e) {
      if (!(e instanceof TolrateInputError)) throw e;
      fresh = undefined;
    }
    const recorded = out.evaluation;
    const differs = !fresh || !recorded || evaluationDifferences(recorded, fresh, { pct: pctPlain, exact: pctExact }).length > 0;
    if (differs) {
      out = clearSteps(out, ['conclude']);
      if (fresh) out = { ...out, evaluation: fresh };
      notes.push(fresh ? 'the evaluation is made again from the results as they now are; conclude again (your earlier answers are offered)' : 'the evaluation and conclusion are cleared: the results as they now are cannot be evaluated');
    } else if (conclusionProblems(out).length > 0) {
      out = clearSteps(out, ['conclude']);
      if (fresh) out = { ...out, evaluation: fresh };
      notes.push('the conclusion no longer follows from the results; conclude again (your earlier answers are offered)');
    }
  }
  return { wp: out, notes };
}
