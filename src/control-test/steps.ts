/**
 * The steps of a test and what each one writes in the workpaper, which of them a workpaper has
 * answered, and which later answers a changed answer makes out of date.
 */
import { canonicalJson } from '../workpaper/log.js';
import type { Workpaper } from '../workpaper/schema.js';
import { recordingComplete } from './worklist.js';

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
export const STEP_MEMBERS: Record<StepName, ReadonlyArray<keyof Workpaper>> = {
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
      return wp.conclusion !== undefined && wp.evaluation !== undefined;
    case 'signoff':
      return wp.signoffs?.preparer !== undefined;
  }
}

/** The first step not answered, or undefined when the whole test is done. */
export function firstOpen(wp: Workpaper, steps: readonly StepName[] = STEPS): StepName | undefined {
  return steps.find((st) => !isAnswered(wp, st));
}

/** Every step not answered, in order. */
export function openSteps(wp: Workpaper, steps: readonly StepName[] = STEPS): StepName[] {
  return steps.filter((st) => !isAnswered(wp, st));
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

/**
 * Drop the members written by `steps` and the sign-offs, which no longer cover the test. A
 * conclusion that is dropped is kept as `earlierConclusion`, so that when the test is concluded
 * again every earlier answer is offered as the default (only the ones the new figures contradict
 * must be answered afresh).
 */
export function clearSteps(wp: Workpaper, steps: readonly StepName[]): Workpaper {
  const out: Record<string, unknown> = { ...wp };
  for (const st of steps) for (const m of STEP_MEMBERS[st]) delete out[m];
  if (steps.includes('conclude') && wp.conclusion) out.earlierConclusion = wp.conclusion;
  if (steps.length > 0) delete out.signoffs;
  return out as Workpaper;
}

/** Times of reading or selecting: not part of the answer when deciding whether it changed. */
const TIMES = ['scannedAt', 'selectedAt', 'concludedAt', 'recordedAt', 'evaluatedAt'];

/** Two answers of a step are the same when they differ only in the time they were given. */
export function sameAnswer(a: unknown, b: unknown): boolean {
  const strip = (v: unknown) => {
    if (!v || typeof v !== 'object' || Array.isArray(v)) return v;
    const o = { ...(v as Record<string, unknown>) };
    for (const t of TIMES) delete o[t];
    return o;
  };
  return canonicalJson(strip(a)) === canonicalJson(strip(b));
}
