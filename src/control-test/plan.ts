/**
 * The sampling plan of a test and its decision rule: the ordinary single-stage sample, a
 * two-stage plan (n1, c1, r1, n2, c2) or a single sample planned for both risks (n, c). The plan
 * is recorded in approach.plan; this is the one place that reads it and says what it decides.
 */
import { planRisks, type TwoStagePlan } from '../stats/index.js';
import type { Approach, StageDecision, Workpaper } from '../workpaper/schema.js';

export type TwoStageRecord = Extract<NonNullable<Approach['plan']>, { kind: 'two-stage' }>;
export type BothRisksRecord = Extract<NonNullable<Approach['plan']>, { kind: 'both-risks' }>;

/** The two-stage plan of a statistical test, or undefined. */
export function twoStageOf(wp: Pick<Workpaper, 'approach'>): TwoStageRecord | undefined {
  const p = wp.approach?.kind === 'statistical' ? wp.approach.plan : undefined;
  return p?.kind === 'two-stage' ? p : undefined;
}

/** The plan planned for both risks of a statistical test, or undefined. */
export function bothRisksOf(wp: Pick<Workpaper, 'approach'>): BothRisksRecord | undefined {
  const p = wp.approach?.kind === 'statistical' ? wp.approach.plan : undefined;
  return p?.kind === 'both-risks' ? p : undefined;
}

/**
 * The tolerable rate a planned plan is computed at: the lowest that applies to an attribute
 * (the one that needs the most items, so the plan serves every attribute).
 */
export function plannedTolerableRate(wp: Pick<Workpaper, 'approach' | 'attributes'>): number | undefined {
  const a = wp.approach;
  if (!a) return undefined;
  return Math.min(a.tolerableRate, ...(wp.attributes ?? []).map((x) => x.tolerableRate ?? a.tolerableRate));
}

/** The plan's parameters in the form of the engine (src/stats). */
export function statsPlan(p: TwoStageRecord): TwoStagePlan {
  return {
    firstSampleSize: p.firstSampleSize,
    firstAcceptanceNumber: p.firstAcceptanceNumber,
    firstRejectionNumber: p.firstRejectionNumber,
    secondSampleSize: p.secondSampleSize,
    secondAcceptanceNumber: p.secondAcceptanceNumber,
  };
}

/**
 * What a two-stage plan decides from the deviations of the first stage (k1) and, when it was
 * needed, of the second (k2): k1 ≤ c1 accept; k1 ≥ r1 reject; otherwise the second stage is
 * needed, and then k1 + k2 ≤ c2 accepts, more rejects.
 */
export function stageDecision(p: Pick<TwoStageRecord, 'firstAcceptanceNumber' | 'firstRejectionNumber' | 'secondAcceptanceNumber'>, k1: number, k2?: number): StageDecision | 'second-stage-needed' {
  if (k1 <= p.firstAcceptanceNumber) return 'accepted-at-first';
  if (k1 >= p.firstRejectionNumber) return 'rejected-at-first';
  if (k2 === undefined) return 'second-stage-needed';
  return k1 + k2 <= p.secondAcceptanceNumber ? 'accepted-at-second' : 'rejected-at-second';
}

/** True when the first stage's deviations leave the decision to the second stage (c1 < k1 < r1). */
export function needsSecondStage(p: Pick<TwoStageRecord, 'firstAcceptanceNumber' | 'firstRejectionNumber'>, k1: number): boolean {
  return k1 > p.firstAcceptanceNumber && k1 < p.firstRejectionNumber;
}

/** The plan's exact risk of overreliance at a tolerable rate (stats planRisks, over both stages). */
export function twoStageRisk(wp: Workpaper, p: TwoStageRecord, tolerableRate: number): number {
  const a = wp.approach!;
  const N = a.model === 'hypergeometric' ? wp.population?.fingerprint.rowCount : undefined;
  return planRisks({ plan: statsPlan(p), tolerableRate, expectedRate: a.expectedRate, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) }).overrelianceRisk;
}

/** Plain words for a stage decision. */
export const STAGE_DECISION_WORDS: Record<StageDecision, string> = {
  'accepted-at-first': 'supports reliance at the first stage',
  'rejected-at-first': 'does not support reliance at the first stage',
  'accepted-at-second': 'supports reliance after the second stage',
  'rejected-at-second': 'does not support reliance after the second stage',
};
