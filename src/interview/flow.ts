/**
 * The runs of the interview's steps (their order and what each writes are the test's rules, in
 * src/control-test/steps.ts): from the first unanswered step, revisits, and the step list. Each step saves when it
 * is answered, so an interruption at any question leaves the last answered step on file.
 */
import type { Workpaper } from '../workpaper/schema.js';
import { clearSteps, reviewStatus, dependents, firstOpen, hasStepMembers, isAnswered, recordingComplete, sameAnswer, ROLL_FORWARD_MEMBERS, ROLL_FORWARD_STEPS, STEP_LABELS, STEPS, type StepName } from '../control-test/index.js';
import { askRollForwardPeriod, askRollForwardPopulation, askRollForwardSelection, askRollForwardSize, partSession } from './rollforward.js';
import type { Session } from './session.js';
import { askAttributes, askControl, askEngagement } from './plan-basics.js';
import { askApproach } from './plan-approach.js';
import { askPopulation } from './plan-population.js';
import { askSelection } from './plan-selection.js';
import { changeResults, runRecordStep } from './record.js';
import { askConclusion, askSignoff } from './conclude.js';
import { wrap } from './show.js';

/**
 * Run one step: ask, store, save. For a step answered before (a revisit), the new answer
 * replaces the old one; if it differs and later steps depend on it, the user confirms that
 * those later steps are cleared (they will be asked again).
 */
export async function runStep(s: Session, step: StepName): Promise<'done' | 'stopped' | 'kept'> {
  s.currentStep = step;
  const rfStep = (ROLL_FORWARD_STEPS as readonly string[]).includes(step);
  const revisit = rfStep ? hasStepMembers(s.wp, step) : isAnswered(s.wp, step) || (step === 'record' && s.wp.results !== undefined);
  if (s.wp.signoffs?.preparer && step !== 'signoff') await s.beforeEdit(STEP_LABELS[step].toLowerCase());
  const set = async (member: keyof Workpaper, value: unknown): Promise<'done' | 'kept'> => {
    const before = (s.wp as Record<string, unknown>)[member];
    if (revisit && sameAnswer(before, value)) {
      // Nothing changed but the time it was asked: keep the answer (and its time) as it was.
      await s.save(step);
      return 'done';
    }
    const later = dependents(step, s.wp, value).filter((d) => hasStepMembers(s.wp, d));
    if (revisit && later.length > 0) {
      s.print('', `  This change makes the later steps out of date: ${later.map((d) => STEP_LABELS[d]).join(', ')}. They will be cleared and asked again.`);
      const go = await s.asker.confirm({ id: `${step}.clearLater`, message: 'Make the change?', default: false });
      if (!go) return 'kept';
      s.wp = clearSteps(s.wp, later);
    }
    s.wp = { ...s.wp, [member]: value } as Workpaper;
    await s.save(step);
    return 'done';
  };
  /** The same for a roll-forward step, which writes members of `rollForward`. */
  const setPart = async (patch: Record<string, unknown>): Promise<'done' | 'kept'> => {
    const members = ROLL_FORWARD_MEMBERS[step as keyof typeof ROLL_FORWARD_MEMBERS];
    const rf = (s.wp.rollForward ?? {}) as Record<string, unknown>;
    if (revisit && members.every((m) => sameAnswer(rf[m], patch[m]))) {
      await s.save(step);
      return 'done';
    }
    const later = dependents(step, s.wp, patch).filter((d) => hasStepMembers(s.wp, d));
    if (revisit && later.length > 0) {
      s.print('', `  This change makes the later steps out of date: ${later.map((d) => STEP_LABELS[d]).join(', ')}. They will be cleared and asked again.`);
      const go = await s.asker.confirm({ id: `${step}.clearLater`, message: 'Make the change?', default: false });
      if (!go) return 'kept';
      s.wp = clearSteps(s.wp, later);
    }
    if (!revisit && step === 'rollforward.period' && (s.wp.evaluation || s.wp.conclusion)) {
      // Adding a roll-forward changes what the conclusion covers: it is concluded again over the whole period.
      s.wp = clearSteps(s.wp, ['conclude']);
      s.print(...wrap('The test now has a roll-forward part: the evaluation and conclusion made from the interim part alone are cleared; conclude again over the whole period (your earlier answers are offered).', 92, '  '));
    }
    const next: Record<string, unknown> = { ...((s.wp.rollForward ?? {}) as Record<string, unknown>) };
    for (const m of members) {
      if (patch[m] === undefined) delete next[m];
      else next[m] = patch[m];
    }
    s.wp = { ...s.wp, rollForward: next } as Workpaper;
    await s.save(step);
    return 'done';
  };
  switch (step) {
    case 'plan.engagement':
      return set('engagement', await askEngagement(s));
    case 'plan.control':
      return set('control', await askControl(s));
    case 'plan.attributes':
      return set('attributes', await askAttributes(s));
    case 'plan.population':
      return set('population', await askPopulation(s));
    case 'plan.approach':
      return set('approach', await askApproach(s));
    case 'plan.selection':
      return set('selection', await askSelection(s));
    case 'record':
      return recordingComplete(s.wp) ? changeResults(s) : runRecordStep(s);
    case 'rollforward.period':
      return setPart(await askRollForwardPeriod(s));
    case 'rollforward.population':
      return setPart({ population: await askRollForwardPopulation(s) });
    case 'rollforward.size':
      return setPart(await askRollForwardSize(s));
    case 'rollforward.selection':
      return setPart({ selection: await askRollForwardSelection(s) });
    case 'rollforward.record': {
      const ps = partSession(s);
      return recordingComplete(ps.wp) ? changeResults(ps) : runRecordStep(ps, 'Record the roll-forward results');
    }
    case 'conclude': {
      const c = await askConclusion(s);
      const { earlierConclusion: _earlier, ...rest } = s.wp;
      s.wp = { ...rest, conclusion: c } as Workpaper;
      await s.save('conclude');
      return 'done';
    }
    case 'signoff': {
      const p = await askSignoff(s);
      s.wp = { ...s.wp, signoffs: { ...(s.wp.signoffs ?? {}), preparer: p } };
      await s.save('signoff', p.name);
      return 'done';
    }
  }
}

export { PLAN_STEPS, STEPS, STEP_LABELS, isAnswered, firstOpen, dependents, type StepName } from '../control-test/index.js';

/** Run the given steps in order from the first unanswered one. */
export async function runOpenSteps(s: Session, steps: readonly StepName[]): Promise<'done' | 'stopped'> {
  for (;;) {
    const st = firstOpen(s.wp, steps);
    if (!st) return 'done';
    const got = await runStep(s, st);
    if (got === 'stopped') return 'stopped';
    if (got === 'kept' && !isAnswered(s.wp, st)) return 'stopped';
  }
}

/** Offer to change an answered step; returns the step chosen or undefined for none. */
export async function chooseRevisit(s: Session, steps: readonly StepName[], id: string): Promise<StepName | undefined> {
  // A roll-forward step is offered only when the test has a roll-forward and the step holds an answer.
  const answered = steps.filter((st) => ((ROLL_FORWARD_STEPS as readonly string[]).includes(st) ? hasStepMembers(s.wp, st) : isAnswered(s.wp, st)));
  if (answered.length === 0) return undefined;
  const pick = await s.asker.select<StepName | 'none'>({
    id,
    message: 'Change an answered step?',
    choices: [{ value: 'none', name: 'No, leave it as it is' }, ...answered.map((st) => ({ value: st, name: `Change: ${STEP_LABELS[st]}` }))],
    default: 'none',
  });
  return pick === 'none' ? undefined : pick;
}

/** Where the test stands, one line per step, and the review. */
export function statusLines(wp: Workpaper): string[] {
  // The roll-forward's steps are listed only for a test that has one.
  const shown = STEPS.filter((st) => wp.rollForward || !(ROLL_FORWARD_STEPS as readonly string[]).includes(st));
  return [...shown.map((st) => `  ${isAnswered(wp, st) ? '[done]' : '[    ]'} ${STEP_LABELS[st]}`), `  Review: ${reviewStatus(wp).label}`];
}
