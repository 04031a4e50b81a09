/**
 * The steps of a test and what each one writes in the workpaper, which of them a workpaper has
 * answered, and which later answers a changed answer makes out of date.
 */
import { canonicalJson } from '../workpaper/log.js';
import type { Workpaper } from '../workpaper/schema.js';
import { recordingComplete } from './worklist.js';
import { partView } from './parts.js';

export const PLAN_STEPS = ['plan.engagement', 'plan.control', 'plan.attributes', 'plan.population', 'plan.approach', 'plan.selection'] as const;
/** The roll-forward part's steps (a test done at an interim date): open only when `rollForward` is recorded. */
export const ROLL_FORWARD_STEPS = ['rollforward.period', 'rollforward.population', 'rollforward.size', 'rollforward.selection', 'rollforward.record'] as const;
/** The roll-forward's planning steps (everything before its results). */
export const ROLL_FORWARD_PLAN_STEPS = ['rollforward.period', 'rollforward.population', 'rollforward.size', 'rollforward.selection'] as const;
export const STEPS = [...PLAN_STEPS, 'record', ...ROLL_FORWARD_STEPS, 'conclude', 'signoff'] as const;
export type StepName = (typeof STEPS)[number];

export const STEP_LABELS: Record<StepName, string> = {
  'plan.engagement': 'Engagement',
  'plan.control': 'Control',
  'plan.attributes': 'Attributes',
  'plan.population': 'Population',
  'plan.approach': 'Approach and sample size',
  'plan.selection': 'Selection',
  record: 'Results',
  'rollforward.period': 'Roll-forward: interim date',
  'rollforward.population': 'Roll-forward: population',
  'rollforward.size': 'Roll-forward: sample size',
  'rollforward.selection': 'Roll-forward: selection',
  'rollforward.record': 'Roll-forward: results',
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
  // The roll-forward steps write parts of the one member `rollForward` (ROLL_FORWARD_MEMBERS).
  'rollforward.period': ['rollForward'],
  'rollforward.population': ['rollForward'],
  'rollforward.size': ['rollForward'],
  'rollforward.selection': ['rollForward'],
  'rollforward.record': ['rollForward'],
  conclude: ['evaluation', 'conclusion'],
  signoff: ['signoffs'],
};

type RollForwardStep = (typeof ROLL_FORWARD_STEPS)[number];

/** The members of `rollForward` each roll-forward step writes (the dates step writes the part itself). */
export const ROLL_FORWARD_MEMBERS: Record<RollForwardStep, readonly string[]> = {
  'rollforward.period': ['interimDate', 'periodStart', 'periodEnd'],
  'rollforward.population': ['population'],
  'rollforward.size': ['sampleSize', 'rationale', 'sizing'],
  'rollforward.selection': ['selection'],
  'rollforward.record': ['results'],
};

function isRollForwardStep(step: StepName): step is RollForwardStep {
  return (ROLL_FORWARD_STEPS as readonly string[]).includes(step);
}

/** True when the workpaper holds something a step writes (a step revisited, or one a change would clear). */
export function hasStepMembers(wp: Workpaper, step: StepName): boolean {
  if (isRollForwardStep(step)) {
    const rf = wp.rollForward as Record<string, unknown> | undefined;
    return rf !== undefined && ROLL_FORWARD_MEMBERS[step].some((m) => rf[m] !== undefined);
  }
  return STEP_MEMBERS[step].some((m) => (wp as Record<string, unknown>)[m] !== undefined);
}

export function isAnswered(wp: Workpaper, step: StepName): boolean {
  const rf = wp.rollForward;
  switch (step) {
    // The roll-forward part is optional: without one its steps are not open.
    case 'rollforward.period':
      return true;
    case 'rollforward.population':
      return !rf || rf.population !== undefined;
    case 'rollforward.size':
      return !rf || rf.sampleSize !== undefined;
    case 'rollforward.selection':
      return !rf || rf.selection !== undefined;
    case 'rollforward.record':
      return !rf || recordingComplete(partView(wp, 'roll-forward'));
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
  // The roll-forward's steps depend on anything only in a test that has a roll-forward part.
  return dependentSteps(step, wp, value).filter((x) => wp?.rollForward !== undefined || !isRollForwardStep(x));
}

function dependentSteps(step: StepName, wp?: Workpaper, value?: unknown): StepName[] {
  const from = (first: StepName) => STEPS.slice(STEPS.indexOf(first)).filter((x) => x !== 'signoff');
  // The roll-forward part depends on the interim part only through the approach (its size uses
  // the test's parameters); its dates, population and selection are its own.
  const rfFrom = (first: RollForwardStep): StepName[] => [...ROLL_FORWARD_STEPS.slice(ROLL_FORWARD_STEPS.indexOf(first)), 'conclude'];
  const interim = (...steps: StepName[]): StepName[] => STEPS.filter((x) => steps.includes(x));
  if (step === 'plan.engagement') {
    // A changed period moves the period end the roll-forward runs to: the roll-forward is planned again.
    const e = value as { periodStart?: string; periodEnd?: string } | undefined;
    const was = wp?.engagement;
    return wp?.rollForward && e && was && (e.periodStart !== was.periodStart || e.periodEnd !== was.periodEnd) ? rfFrom('rollforward.period') : [];
  }
  if (step === 'plan.control') {
    const freq = (value as { frequency?: string } | undefined)?.frequency;
    const ap = wp?.approach;
    return ap?.kind === 'non-statistical' && ap.policy && freq !== undefined && freq !== ap.policy.frequency ? interim('plan.approach', 'plan.selection', 'record', 'rollforward.size', 'rollforward.selection', 'rollforward.record', 'conclude') : [];
  }
  if (step === 'plan.attributes' || step === 'plan.population') {
    return interim('plan.approach', 'plan.selection', 'record', 'rollforward.size', 'rollforward.selection', 'rollforward.record', 'conclude');
  }
  if (step === 'plan.approach') return interim('plan.selection', 'record', 'rollforward.size', 'rollforward.selection', 'rollforward.record', 'conclude');
  if (step === 'plan.selection') return interim('record', 'conclude');
  if (step === 'record') return ['conclude'];
  if (isRollForwardStep(step)) {
    const i = ROLL_FORWARD_STEPS.indexOf(step);
    return i + 1 < ROLL_FORWARD_STEPS.length ? rfFrom(ROLL_FORWARD_STEPS[i + 1]!) : ['conclude'];
  }
  const i = STEPS.indexOf(step);
  return from(STEPS[i + 1] ?? step).filter((x) => x !== step);
}

/**
 * Drop the members written by `steps` and the sign-offs, which no longer cover the test. A
 * conclusion that is dropped is kept as `earlierConclusion`, so that when the test is concluded
 * again every earlier answer is offered as the default (only the ones the new figures contradict
 * must be answered afresh).
 */
export function clearSteps(wp: Workpaper, steps: readonly StepName[]): Workpaper {
  const out: Record<string, unknown> = { ...wp };
  for (const st of steps) {
    if (isRollForwardStep(st)) {
      if (!wp.rollForward) continue;
      // The dates step clears the whole part; the others only what they wrote.
      if (st === 'rollforward.period') delete out.rollForward;
      else if (out.rollForward) {
        const rf: Record<string, unknown> = { ...(out.rollForward as Record<string, unknown>) };
        for (const m of ROLL_FORWARD_MEMBERS[st]) delete rf[m];
        out.rollForward = rf;
      }
      continue;
    }
    for (const m of STEP_MEMBERS[st]) delete out[m];
  }
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
