/**
 * Shared types of the statistics engine. Rates are fractions (0.06 means 6%); counts are whole
 * numbers. Nothing here touches the terminal or the file system.
 */

/** Every model name the engine accepts, in the order shown to users (the workpaper schema uses this list). */
export const MODELS = ['binomial', 'hypergeometric', 'poisson'] as const;

/** The probability model used for the risk of overreliance. */
export type Model = (typeof MODELS)[number];

/** Options of {@link sampleSize}. */
export interface SampleSizeOptions {
  /** Confidence c in (0, 1); the planned risk of overreliance is 1 − c. */
  confidence: number;
  /** Tolerable deviation rate in (0, 1). */
  tolerableRate: number;
  /** Expected deviation rate in [0, 1), below the tolerable rate. */
  expectedRate: number;
  /** Population size N (whole number ≥ 1). Switches the default model to hypergeometric. */
  populationSize?: number;
  model?: Model;
}

/** The textbook finite population correction, reported beside (never instead of) the exact size. */
export interface FinitePopulationCorrection {
  /** The binomial (infinite population) sample size n. */
  binomialSampleSize: number;
  /** n' = ⌈n / (1 + n/N)⌉. */
  correctedSampleSize: number;
}

/** Result of {@link sampleSize}. */
export interface SampleSizeResult {
  sampleSize: number;
  /** k_e = ⌈n·EDR⌉, the deviations that may be found with the planned reliance still supported. */
  expectedDeviations: number;
  model: Model;
  /** The risk of overreliance at n and k_e under the model; ≤ 1 − confidence. */
  achievedRisk: number;
  confidence: number;
  tolerableRate: number;
  expectedRate: number;
  populationSize?: number;
  /** Present when the population size is known and a binomial size exists within the cap. */
  finitePopulationCorrection?: FinitePopulationCorrection;
}

/** Options of {@link upperLimit}. */
export interface UpperLimitOptions {
  sampleSize: number;
  deviations: number;
  confidence: number;
  populationSize?: number;
  model?: Model;
}

/** Result of {@link upperLimit}. */
export interface UpperLimitResult {
  /** The upper deviation limit as a fraction (exact, not rounded). */
  rate: number;
  model: Model;
  sampleSize: number;
  deviations: number;
  confidence: number;
  populationSize?: number;
  /** Hypergeometric only: M*, the largest number of deviations in the population still plausible. */
  deviationsInPopulation?: number;
}

/** Options of {@link overrelianceRisk}. */
export interface OverrelianceRiskOptions {
  sampleSize: number;
  deviations: number;
  tolerableRate: number;
  populationSize?: number;
  model?: Model;
}

/** Options of {@link extensionSize}. */
export interface ExtensionSizeOptions {
  sampleSize: number;
  deviations: number;
  tolerableRate: number;
  confidence: number;
  populationSize?: number;
  model?: Model;
}

/** Options of {@link planningTable}. */
export interface PlanningTableOptions {
  confidence: number;
  /** Columns; defaults to {@link DEFAULT_TOLERABLE_RATES}. */
  tolerableRates?: readonly number[];
  /** Rows; defaults to {@link DEFAULT_EXPECTED_RATES}. */
  expectedRates?: readonly number[];
  populationSize?: number;
  model?: Model;
}

/** One cell of a planning table. */
export interface PlanningTableCell {
  tolerableRate: number;
  expectedRate: number;
  /** null where no practical size exists (expected rate not below tolerable, or beyond the cap). */
  sampleSize: number | null;
  expectedDeviations: number | null;
  /** Why the cell is empty. */
  note?: string;
}

/** One row of a planning table: one expected rate across every tolerable rate. */
export interface PlanningTableRow {
  expectedRate: number;
  cells: PlanningTableCell[];
}

/** Result of {@link planningTable}. */
export interface PlanningTableResult {
  confidence: number;
  model: Model;
  populationSize?: number;
  tolerableRates: number[];
  expectedRates: number[];
  rows: PlanningTableRow[];
}

/** Options of {@link decision}. */
export interface DecisionOptions {
  achievedRisk: number;
  confidence: number;
}

/** Result of {@link decision}. */
export interface DecisionResult {
  /** True when the achieved risk of overreliance does not exceed the allowable risk. */
  supported: boolean;
  achievedRisk: number;
  /** β = 1 − confidence. */
  allowableRisk: number;
}
