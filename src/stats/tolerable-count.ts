import { ceilTimes } from './exact-rate.js';

/** min(N, ⌈rate·N⌉) exactly, unchecked ({@link tolerableDeviations} is the checked form). Internal. */
export function tolerableCount(populationSize: number, rate: number): number {
  return Math.min(populationSize, ceilTimes(populationSize, rate));
}
