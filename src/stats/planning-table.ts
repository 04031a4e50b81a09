import { SamplingInputError } from '../errors.js';
import { DEFAULT_EXPECTED_RATES, DEFAULT_TOLERABLE_RATES, MAX_SAMPLE_SIZE } from './constants.js';
import { resolveModel } from './resolve-model.js';
import { searchSize } from './sample-size.js';
import { sizeRemark } from './size-remark.js';
import type { PlanningTableCell, PlanningTableOptions, PlanningTableResult, PlanningTableRow } from './types.js';
import { checkConfidence, checkOptions, checkRate } from './validate.js';

/**
 * A planning table of sample sizes: one row per expected deviation rate, one cell per tolerable
 * rate, each the exact {@link sampleSize} with its k_e (shown in parentheses in the published
 * tables). Cells are null where the expected rate is not below the tolerable rate or no size
 * within the cap works. The default grids are those of the published attribute sampling tables
 * (AICPA Audit Sampling guide; from memory): tolerable 2–10%, 15%, 20%; expected 0–4% by 0.25%,
 * then 5, 6, 7%.
 *
 * @throws SamplingInputError for an out-of-range input (naming the parameter).
 */
export function planningTable(options: PlanningTableOptions): PlanningTableResult {
  checkOptions(options, 'planningTable');
  const { confidence, populationSize } = options;
  checkConfidence(confidence);
  const model = resolveModel(options.model, populationSize);
  const tolerableRates = rateList('tolerableRates', options.tolerableRates ?? DEFAULT_TOLERABLE_RATES, false);
  const expectedRates = rateList('expectedRates', options.expectedRates ?? DEFAULT_EXPECTED_RATES, true);
  const cap =
    model === 'hypergeometric'
      ? `the population of ${populationSize}`
      : `${MAX_SAMPLE_SIZE.toLocaleString('en-US')} items`;
  const rows: PlanningTableRow[] = expectedRates.map((expectedRate) => ({
    expectedRate,
    cells: tolerableRates.map((tolerableRate): PlanningTableCell => {
      if (expectedRate >= tolerableRate) {
        return {
          tolerableRate,
          expectedRate,
          sampleSize: null,
          expectedDeviations: null,
          note: 'expected rate is not below the tolerable rate',
        };
      }
      const found = searchSize(model, confidence, tolerableRate, expectedRate, populationSize);
      if (!found) {
        return {
          tolerableRate,
          expectedRate,
          sampleSize: null,
          expectedDeviations: null,
          note: `not practical: no sample size within ${cap}`,
        };
      }
      const cell: PlanningTableCell = { tolerableRate, expectedRate, sampleSize: found.sampleSize, expectedDeviations: found.expectedDeviations };
      const remark = sizeRemark(found.sampleSize);
      if (remark) cell.sizeRemark = remark;
      return cell;
    }),
  }));
  const result: PlanningTableResult = { confidence, model, tolerableRates, expectedRates, rows };
  if (populationSize !== undefined) result.populationSize = populationSize;
  return result;
}

function rateList(name: string, values: unknown, allowZero: boolean): number[] {
  if (!Array.isArray(values) || values.length === 0) {
    throw new SamplingInputError(name, `${name} must be a non-empty list of rates (fractions, 0.05 means 5%).`);
  }
  values.forEach((v, i) => checkRate(`${name}[${i}]`, v, allowZero));
  return [...(values as number[])];
}
