import { SamplingInputError } from '../errors.js';
import type { SingleStagePlan, TwoStagePlan } from './types.js';
import { checkCount } from './validate.js';

/** Whether a plan is two-stage. Internal. */
export function isTwoStage(plan: SingleStagePlan | TwoStagePlan): plan is TwoStagePlan {
  return (plan as TwoStagePlan).firstSampleSize !== undefined;
}

/**
 * Check a single- or two-stage plan: whole numbers, c within the sample, c1 < c2,
 * c1 + 2 ≤ r1 ≤ c2 + 1, and no more items than the population when it is known. Internal.
 */
export function checkPlan(plan: unknown, populationSize: number | undefined): asserts plan is SingleStagePlan | TwoStagePlan {
  if (typeof plan !== 'object' || plan === null) {
    throw new SamplingInputError('plan', 'plan must be an object: { sampleSize, acceptanceNumber } or a two-stage plan.');
  }
  const p = plan as Record<string, unknown>;
  if (p.firstSampleSize === undefined) {
    checkCount('plan.sampleSize', p.sampleSize, 1);
    checkCount('plan.acceptanceNumber', p.acceptanceNumber, 0);
    if (p.acceptanceNumber >= p.sampleSize) {
      throw new SamplingInputError('plan.acceptanceNumber', `plan.acceptanceNumber (${p.acceptanceNumber}) must be below plan.sampleSize (${p.sampleSize}).`);
    }
    if (populationSize !== undefined && p.sampleSize > populationSize) {
      throw new SamplingInputError('plan.sampleSize', `plan.sampleSize (${p.sampleSize}) cannot exceed populationSize (${populationSize}).`);
    }
    return;
  }
  checkCount('plan.firstSampleSize', p.firstSampleSize, 1);
  checkCount('plan.secondSampleSize', p.secondSampleSize, 1);
  checkCount('plan.firstAcceptanceNumber', p.firstAcceptanceNumber, 0);
  checkCount('plan.firstRejectionNumber', p.firstRejectionNumber, 0);
  checkCount('plan.secondAcceptanceNumber', p.secondAcceptanceNumber, 0);
  const c1 = p.firstAcceptanceNumber;
  const r1 = p.firstRejectionNumber;
  const c2 = p.secondAcceptanceNumber;
  if (!(c1 < c2)) {
    throw new SamplingInputError('plan.secondAcceptanceNumber', `plan.secondAcceptanceNumber (${c2}) must be above plan.firstAcceptanceNumber (${c1}).`);
  }
  if (r1 < c1 + 2 || r1 > c2 + 1) {
    throw new SamplingInputError(
      'plan.firstRejectionNumber',
      `plan.firstRejectionNumber (${r1}) must be from firstAcceptanceNumber + 2 (${c1 + 2}) to secondAcceptanceNumber + 1 (${c2 + 1}).`,
    );
  }
  if (r1 - 1 > p.firstSampleSize) {
    throw new SamplingInputError('plan.firstRejectionNumber', `plan.firstRejectionNumber (${r1}) is more than one above plan.firstSampleSize (${p.firstSampleSize}).`);
  }
  if (populationSize !== undefined && p.firstSampleSize + p.secondSampleSize > populationSize) {
    throw new SamplingInputError(
      'plan.secondSampleSize',
      `the two stages (${p.firstSampleSize} + ${p.secondSampleSize}) cannot exceed populationSize (${populationSize}).`,
    );
  }
}
