/**
 * Input checks shared by the engine's public functions. Each failure throws a
 * {@link SamplingInputError} that names the parameter as the library API spells it and says
 * what would be accepted. (A small family of helpers kept together; every other file of the
 * engine holds one function.)
 */
import { SamplingInputError } from '../errors.js';

/** A fraction shown as a percentage for messages: 0.07 -> "7%". */
export function asPercent(fraction: number): string {
  return `${Number((fraction * 100).toPrecision(10))}%`;
}

function shown(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  return typeof value;
}

/** The options argument must be a plain object. */
export function checkOptions(options: unknown, fn: string): asserts options is Record<string, unknown> {
  if (typeof options !== 'object' || options === null || Array.isArray(options)) {
    throw new SamplingInputError('options', `${fn}: expected an options object, got ${shown(options)}.`);
  }
}

/** A finite number. */
export function checkNumber(name: string, value: unknown): asserts value is number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new SamplingInputError(name, `${name} must be a finite number; got ${shown(value)}.`);
  }
}

/**
 * A rate as a fraction strictly between 0 and 1 (or from 0 when `allowZero`). A value of 1 or
 * more is most likely a percentage typed where a fraction was expected, and the message says so.
 */
export function checkRate(name: string, value: unknown, allowZero = false): asserts value is number {
  checkNumber(name, value);
  const low = allowZero ? value < 0 : value <= 0;
  if (low || value >= 1) {
    const range = allowZero ? 'from 0 up to (not including) 1' : 'strictly between 0 and 1';
    const hint = value >= 1 && value < 100 ? ` If you meant ${value}%, pass ${Number((value / 100).toPrecision(12))}.` : '';
    throw new SamplingInputError(name, `${name} must be a fraction ${range} (0.06 means 6%); got ${value}.${hint}`);
  }
}

/** A confidence level strictly between 0 and 1. */
export function checkConfidence(value: unknown, name = 'confidence'): asserts value is number {
  checkNumber(name, value);
  if (value <= 0 || value >= 1) {
    const hint = value >= 1 && value < 100 ? ` If you meant ${value}%, pass ${Number((value / 100).toPrecision(12))}.` : '';
    throw new SamplingInputError(name, `${name} must be a fraction strictly between 0 and 1 (0.95 means 95%); got ${value}.${hint}`);
  }
}

/** A whole number ≥ min (default 0). */
export function checkCount(name: string, value: unknown, min = 0): asserts value is number {
  if (typeof value !== 'number' || !Number.isSafeInteger(value)) {
    throw new SamplingInputError(name, `${name} must be a whole number; got ${shown(value)}.`);
  }
  if (value < min) {
    throw new SamplingInputError(name, `${name} must be at least ${min}; got ${value}.`);
  }
}

/** The expected rate must be below the tolerable rate. */
export function checkExpectedBelowTolerable(expectedRate: number, tolerableRate: number): void {
  if (expectedRate >= tolerableRate) {
    throw new SamplingInputError(
      'expectedRate',
      `expectedRate (${asPercent(expectedRate)}) must be below tolerableRate (${asPercent(tolerableRate)}): ` +
        'a sample cannot show that the deviation rate is below the tolerable rate when at least that many ' +
        'deviations are expected. Lower the expected rate, raise the tolerable rate, or plan not to rely on the control.',
    );
  }
}

/** Deviations and sample size: 0 ≤ k ≤ n, n ≥ 1, and n ≤ N when the population size is known. */
export function checkSampleCounts(sampleSize: unknown, deviations: unknown, populationSize: number | undefined): void {
  checkCount('sampleSize', sampleSize, 1);
  checkCount('deviations', deviations, 0);
  if (deviations > sampleSize) {
    throw new SamplingInputError('deviations', `deviations (${deviations}) cannot exceed sampleSize (${sampleSize}).`);
  }
  if (populationSize !== undefined && sampleSize > populationSize) {
    throw new SamplingInputError(
      'sampleSize',
      `sampleSize (${sampleSize}) cannot exceed populationSize (${populationSize}).`,
    );
  }
}

/** A whole number of either sign (a point where a distribution function is evaluated). */
export function checkInteger(name: string, value: unknown): asserts value is number {
  if (typeof value !== 'number' || !Number.isSafeInteger(value)) {
    throw new SamplingInputError(name, `${name} must be a whole number; got ${shown(value)}.`);
  }
}

/** A probability in [0, 1] (a distribution parameter or a level for an inverse). */
export function checkProbability(name: string, value: unknown): asserts value is number {
  checkNumber(name, value);
  if (value < 0 || value > 1) {
    throw new SamplingInputError(name, `${name} must be a probability from 0 to 1; got ${value}.`);
  }
}

/** A finite number > 0 (a shape parameter). */
export function checkPositive(name: string, value: unknown): asserts value is number {
  checkNumber(name, value);
  if (value <= 0) throw new SamplingInputError(name, `${name} must be above 0; got ${value}.`);
}

/** Hypergeometric parameters: 0 ≤ M ≤ N, 0 ≤ n ≤ N. */
export function checkHypergeometric(N: unknown, M: unknown, n: unknown): void {
  checkCount('N', N, 0);
  checkCount('M', M, 0);
  checkCount('n', n, 0);
  if (M > N) throw new SamplingInputError('M', `M (deviations in the population, ${M}) cannot exceed N (${N}).`);
  if (n > N) throw new SamplingInputError('n', `n (sample size, ${n}) cannot exceed N (${N}).`);
}
