/**
 * A test done in parts: the interim part (the workpaper's own population, selection and results,
 * from the period start to the interim date) and the roll-forward part (`rollForward`: the day
 * after the interim date to the period end, with its own population, size, selection and
 * results). This is the one place that knows how a part maps to a test: `partView` gives a
 * Workpaper-shaped view of a part, so that the worklist, recording (withResult, voidResult),
 * countResults and attributeFigures work on it unchanged, and `withPartView` puts a changed view
 * back. Pure: no I/O.
 */
import type { Workpaper } from '../workpaper/schema.js';

export const PARTS = ['interim', 'roll-forward'] as const;
export type Part = (typeof PARTS)[number];

export const PART_LABELS: Record<Part, string> = { interim: 'Interim', 'roll-forward': 'Roll-forward' };

/** The members of a Workpaper that a part view takes from its part. */
const PART_MEMBERS = ['population', 'selection', 'results', 'approach', 'engagement', 'rollForward'] as const;

/** True when the test is done in parts (a roll-forward is recorded, planned or not). */
export function hasRollForward(wp: Workpaper): boolean {
  return wp.rollForward !== undefined;
}

/** The day after an ISO date. */
export function dayAfter(iso: string): string {
  return new Date(Date.parse(`${iso}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
}

/** The dates a part covers: the interim part ends at the interim date; the roll-forward runs to the period end. */
export function partPeriod(wp: Workpaper, part: Part): { start: string; end: string } | undefined {
  const e = wp.engagement;
  if (!e) return undefined;
  const rf = wp.rollForward;
  if (!rf) return { start: e.periodStart, end: e.periodEnd };
  return part === 'interim' ? { start: e.periodStart, end: rf.interimDate } : { start: rf.periodStart, end: rf.periodEnd };
}

/**
 * A part as a test: the interim part is the workpaper itself, with the engagement's period cut
 * to the interim date when a roll-forward is recorded; the roll-forward part is the workpaper
 * with the roll-forward's population, selection, results and size in place of the interim ones
 * and the roll-forward's dates as its period. The view has no `rollForward` member, so it is
 * never taken for a test in parts.
 */
export function partView(wp: Workpaper, part: Part): Workpaper {
  const rf = wp.rollForward;
  if (!rf) return wp;
  const period = partPeriod(wp, part)!;
  const { rollForward: _rf, population, selection, results, ...rest } = wp;
  const engagement = wp.engagement ? { ...wp.engagement, periodStart: period.start, periodEnd: period.end } : undefined;
  if (part === 'interim') {
    return { ...rest, ...(engagement ? { engagement } : {}), ...(population ? { population } : {}), ...(selection ? { selection } : {}), ...(results ? { results } : {}) } as Workpaper;
  }
  // The roll-forward is one sample sized by its own rule: a plan of the interim sample (planned
  // for both risks, with its acceptance number for its n) does not carry over to it.
  const { plan: _plan, ...ownApproach } = (wp.approach ?? {}) as NonNullable<Workpaper['approach']>;
  const approach = wp.approach && rf.sampleSize !== undefined
    ? { ...ownApproach, sampleSize: rf.sampleSize, ...(rf.rationale ? { rationale: rf.rationale } : {}) }
    : wp.approach;
  return {
    ...rest,
    ...(engagement ? { engagement } : {}),
    ...(approach ? { approach } : {}),
    ...(rf.population ? { population: rf.population } : {}),
    ...(rf.selection ? { selection: rf.selection } : {}),
    ...(rf.results ? { results: rf.results } : {}),
  } as Workpaper;
}

/**
 * The workpaper with a changed part view put back: the part's population, selection and results
 * go to the part; every other member (evaluation and conclusion cleared, sign-offs, ...) is
 * taken from the view; the engagement and the approach stay the workpaper's own.
 */
export function withPartView(wp: Workpaper, part: Part, view: Workpaper): Workpaper {
  const rf = wp.rollForward;
  if (!rf) return view;
  const out: Record<string, unknown> = { ...view };
  for (const m of PART_MEMBERS) delete out[m];
  for (const m of ['engagement', 'approach'] as const) if (wp[m] !== undefined) out[m] = wp[m];
  const put = (target: Record<string, unknown>) => {
    for (const m of ['population', 'selection', 'results'] as const) {
      if (view[m] !== undefined) target[m] = view[m];
      else delete target[m];
    }
  };
  if (part === 'interim') {
    put(out);
    out.rollForward = rf;
  } else {
    for (const m of ['population', 'selection', 'results'] as const) if (wp[m] !== undefined) out[m] = wp[m];
    const next: Record<string, unknown> = { ...rf };
    put(next);
    out.rollForward = next;
  }
  return out as Workpaper;
}

/** The parts a test has: the interim part alone, or both. */
export function partsOf(wp: Workpaper): Part[] {
  return wp.rollForward ? ['interim', 'roll-forward'] : ['interim'];
}

/** Whole months a date range touches (a month partly covered counts as one). */
export function monthsTouched(start: string, end: string): number {
  const [y1, m1] = start.split('-').map(Number) as [number, number];
  const [y2, m2] = end.split('-').map(Number) as [number, number];
  return (y2 - y1) * 12 + (m2 - m1) + 1;
}

/**
 * The roll-forward size under a non-statistical policy: the policy's size for the whole period
 * pro rata to the months remaining, rounded up (at least 1, at most the population). Common
 * practice, no single source.
 */
export function proRataSize(policySize: number, periodMonths: number, rollForwardMonths: number, populationSize: number): number {
  // Whole numbers only: ⌈a·b / c⌉ = ⌊(a·b + c − 1) / c⌋.
  const raw = Math.floor((policySize * rollForwardMonths + periodMonths - 1) / periodMonths);
  return Math.max(1, Math.min(populationSize, raw));
}
