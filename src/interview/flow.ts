/**
 * The order of the interview's steps, which of them a workpaper has answered, and the runs of
 * the stages (plan, record, conclude) from the first unanswered step. Each step saves when it
 * is answered, so an interruption at any question leaves the last answered step on file.
 */
import type { Workpaper } from '../workpaper/schema.js';
import { canonicalJson } from '../workpaper/log.js';
import type { Session } from './session.js';
import { askAttributes, askControl, askEngagement } from './plan-basics.js';
import { askApproach } from './plan-approach.js';
import { askPopulation } from './plan-population.js';
import { askSelection } from './plan-selection.js';
import { changeResults, recordingComplete, runRecordStep } from './record.js';
import { askConclusion, askSignoff } from './conclude.js';

export const PLAN_STEPS = ['plan.engagement', 'plan.control', 'plan.attributes', 'plan.population', 'plan.approach', 'plan.selection'] as const;
export const STEPS = [...PLAN_STEPS, 'record', 'conclude', 'signoff'] as const;
export type StepName = (typeof STEPS)[number];

export const STEP_LABELS: Record<StepName, string> = {
  'plan.engagement': 'Engagement',
  'plan.control': 'Control',
  'plan.attributes': 'Attributes',
  'plan.population': 'Population',
  'plan.approach': 'Approach and sample size',
  'plan.selection': 'Selection',
  record: 'Results',
  conclude: 'Evaluation and conclusion',
  signoff: 'Sign-off',
};

/** The workpaper members each step writes, in step order (later steps depend on earlier ones). */
const STEP_MEMBERS: Record<StepName, ReadonlyArray<keyof Workpaper>> = {
  'plan.engagement': ['engagement'],
  'plan.control': ['control'],
  'plan.attributes': ['attributes'],
  'plan.population': ['population'],
  'plan.approach': ['approach'],
  'plan.selection': ['selection'],
  record: ['results'],
  conclude: ['evaluation', 'conclusion'],
  signoff: ['signoffs'],
};

export function isAnswered(wp: Workpaper, step: StepName): boolean {
  switch (step) {
    case 'plan.engagement':
      return wp.engagement !== undefined;
    case 'plan.control':
      return wp.control !== undefined;
    case 'plan.attributes':
      return wp.attributes !== undefined && wp.attributes.length > 0;
    case 'plan.population':
      return wp.population !== undefined;
    case 'plan.approach':
      return wp.approach !== undefined;
    case 'plan.selection':
      return wp.selection !== undefined;
    case 'record':
      return recordingComplete(wp);
    case 'conclude':
      return wp.conclusion !== undefined;
    case 'signoff':
      return wp.signoffs?.preparer !== undefined;
  }
}

/** The first step not answered, or undefined when the whole test is done. */
export function firstOpen(wp: Workpaper, steps: readonly StepName[] = STEPS): StepName | undefined {
  return steps.find((st) => !isAnswered(wp, st));
}

/**
 * Steps whose answers would be invalid if `step` changed to `value`. The engagement changes
 * nothing below. The control changes the approach onwards only when a non-statistical size was
 * read from the firm's policy for its frequency and the frequency changed. The attributes do not
 * change the population (only the sizes, the sheet's result columns and what follows).
 */
export function dependents(step: StepName, wp?: Workpaper, value?: unknown): StepName[] {
  const from = (first: StepName) => STEPS.slice(STEPS.indexOf(first)).filter((x) => x !== 'signoff');
  if (step === 'plan.engagement') return [];
  if (step === 'plan.control') {
    const freq = (value as { frequency?: string } | undefined)?.frequency;
    const ap = wp?.approach;
    return ap?.kind === 'non-statistical' && ap.policy && freq !== undefined && freq !== ap.policy.frequency ? from('plan.approach') : [];
  }
  if (step === 'plan.attributes') return from('plan.approach');
  const i = STEPS.indexOf(step);
  return STEPS.slice(i + 1).filter((x) => x !== 'signoff');
}

/** Drop the members written by `steps` (and the sign-offs, which no longer cover the test). */
function clear(wp: Workpaper, steps: readonly StepName[]): Workpaper {
  const out: Record<string, unknown> = { ...wp };
  for (const st of steps) for (const m of STEP_MEMBERS[st]) delete out[m];
  if (steps.length > 0) delete out.signoffs;
  return out as Workpaper;
}

/** Times of reading or selecting: not part of the answer when deciding whether it changed. */
const TIMES = ['scannedAt', 'selectedAt', 'concludedAt', 'recordedAt', 'evaluatedAt'];

function sameAnswer(a: unknown, b: unknown): boolean {
  const strip = (v: unknown) => {
    if (!v || typeof v !== 'object' || Array.isArray(v)) return v;
    const o = { ...(v as Record<string, unknown>) };
    for (const t of TIMES) delete o[t];
    return o;
  };
  return canonicalJson(strip(a)) === canonicalJson(strip(b));
}

/**
 * Run one step: ask, store, save. For a step answered before (a revisit), the new answer
 * replaces the old one; if it differs and later steps depend on it, the user confirms that
 * those later steps are cleared (they will be asked again).
 */
export async function runStep(s: Session, step: StepName): Promise<'done' | 'stopped' | 'kept'> {
  const revisit = isAnswered(s.wp, step) || (step === 'record' && s.wp.results !== undefined);
  if (s.wp.signoffs?.preparer && step !== 'signoff') await s.beforeEdit(STEP_LABELS[step].toLowerCase());
  const set = async (member: keyof Workpaper, value: unknown): Promise<'done' | 'kept'> => {
    const before = (s.wp as Record<string, unknown>)[member];
    if (revisit && sameAnswer(before, value)) {
      // Nothing changed but the time it was asked: keep the answer (and its time) as it was.
      await s.save(step);
      return 'done';
    }
    const later = dependents(step, s.wp, value).filter((d) => STEP_MEMBERS[d].some((m) => (s.wp as Record<string, unknown>)[m] !== undefined));
    if (revisit && later.length > 0) {
      s.print('', `  This change makes the later steps out of date: ${later.map((d) => STEP_LABELS[d]).join(', ')}. They will be cleared and asked again.`);
      const go = await s.asker.confirm({ id: `${step}.clearLater`, message: 'Make the change?', default: false });
      if (!go) return 'kept';
      s.wp = clear(s.wp, later);
    }
    s.wp = { ...s.wp, [member]: value } as Workpaper;
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
    case 'conclude': {
      const c = await askConclusion(s);
      s.wp = { ...s.wp, conclusion: c };
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
  const answered = steps.filter((st) => isAnswered(s.wp, st));
  if (answered.length === 0) return undefined;
  const pick = await s.asker.select<StepName | 'none'>({
    id,
    message: 'Change an answered step?',
    choices: [{ value: 'none', name: 'No, leave it as it is' }, ...answered.map((st) => ({ value: st, name: `Change: ${STEP_LABELS[st]}` }))],
    default: 'none',
  });
  return pick === 'none' ? undefined : pick;
}

/** Where the test stands, one line per step. */
export function statusLines(wp: Workpaper): string[] {
  return STEPS.map((st) => `  ${isAnswered(wp, st) ? '[done]' : '[    ]'} ${STEP_LABELS[st]}`);
}
