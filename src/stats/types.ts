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
  /**
   * The most deviations in this sample with which the results still support reliance (the
   * evaluation's rule: risk of overreliance ≤ β); at least k_e.
   */
  acceptanceNumber: number;
  /** The chance that a control working at the expected rate shows more than acceptanceNumber deviations. */
  underrelianceRisk: number;
  /** Set when the size is far beyond what tests of controls usually use (above 200). */
  sizeRemark?: string;
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
  /** Set when the size is far beyond what tests of controls usually use (above 200). */
  sizeRemark?: string;
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

/**
 * A two-stage attribute sampling plan. Test n1 items; with at most c1 deviations the results
 * support reliance, with r1 or more they do not; in between, test n2 more items (the second stage)
 * and the results support reliance when the deviations of both stages together are at most c2.
 * Always c1 < c2 and c1 + 2 ≤ r1 ≤ c2 + 1 (r1 = c2 + 1: the first stage rejects only when the
 * second could not help).
 */
export interface TwoStagePlan {
  firstSampleSize: number;
  firstAcceptanceNumber: number;
  firstRejectionNumber: number;
  secondSampleSize: number;
  secondAcceptanceNumber: number;
}

/** A single-stage plan: test n items; the results support reliance with at most c deviations. */
export interface SingleStagePlan {
  sampleSize: number;
  acceptanceNumber: number;
}

/** The figures of a plan (single- or two-stage) at the tolerable and expected rates. */
export interface PlanRisks {
  /** P(the results support reliance) at the tolerable rate: the risk of overreliance. */
  overrelianceRisk: number;
  /** P(the results do not support reliance) at the expected rate: the risk of underreliance. */
  underrelianceRisk: number;
  /** Expected number of items tested at the expected rate (the average sample number). */
  averageSampleNumber: number;
  /** Expected number of items tested at the tolerable rate. */
  averageSampleNumberAtTolerable: number;
  /** The most items the plan can need. */
  maximumSampleSize: number;
  /** Two-stage plans: P(the second stage is needed) at the expected rate; 0 for a single stage. */
  secondStageProbability: number;
}

/** Options of {@link planRisks}. */
export interface PlanRisksOptions {
  plan: SingleStagePlan | TwoStagePlan;
  tolerableRate: number;
  expectedRate: number;
  populationSize?: number;
  model?: Model;
}

/** Options of {@link acceptanceNumber}. */
export interface AcceptanceNumberOptions {
  sampleSize: number;
  tolerableRate: number;
  confidence: number;
  populationSize?: number;
  model?: Model;
}

/** Options of {@link underrelianceRisk}. */
export interface UnderrelianceRiskOptions {
  sampleSize: number;
  /** The most deviations with which the results still support reliance. */
  acceptanceNumber: number;
  expectedRate: number;
  populationSize?: number;
  model?: Model;
}

/** Options of {@link operatingCharacteristic}. */
export interface OperatingCharacteristicOptions {
  plan: SingleStagePlan | TwoStagePlan;
  /** True deviation rates to evaluate; default 0% to 20% in steps of 0.5%. */
  rates?: readonly number[];
  populationSize?: number;
  model?: Model;
}

/** One point of an operating characteristic. */
export interface OperatingCharacteristicPoint {
  /** The true deviation rate. */
  rate: number;
  /** Hypergeometric only: the deviations in the population at this rate, ⌈rate·N⌉. */
  deviationsInPopulation?: number;
  /** P(the results support reliance) if the population deviates at this rate. */
  acceptanceProbability: number;
  /** Expected number of items tested at this rate. */
  averageSampleNumber: number;
}

/** Options of {@link twoStagePlan}. */
export interface TwoStagePlanOptions {
  confidence: number;
  tolerableRate: number;
  expectedRate: number;
  populationSize?: number;
  model?: Model;
  /**
   * The most risk of underreliance allowed at the expected rate. Default: that of the single-stage
   * plan of {@link sampleSize} (so the two-stage plan is no worse on either risk).
   */
  underrelianceRisk?: number;
}

/** Result of {@link twoStagePlan}. */
export interface TwoStagePlanResult extends PlanRisks {
  plan: TwoStagePlan;
  model: Model;
  confidence: number;
  tolerableRate: number;
  expectedRate: number;
  populationSize?: number;
  /** The underreliance bound the search kept to. */
  allowedUnderrelianceRisk: number;
  /** The single-stage plan it is compared with (the exact size and its acceptance number). */
  singleStage: SingleStagePlan & { underrelianceRisk: number; overrelianceRisk: number };
  /** Plans whose risks were computed in the search. */
  plansExamined: number;
  /** Set when the largest sample the plan can need is far beyond what tests of controls use (above 200). */
  sizeRemark?: string;
}

/** Options of {@link planForBothRisks}. */
export interface BothRisksPlanOptions {
  confidence: number;
  tolerableRate: number;
  expectedRate: number;
  /** The most risk of underreliance allowed at the expected rate, a fraction in (0, 1). */
  underrelianceRisk: number;
  populationSize?: number;
  model?: Model;
}

/** Result of {@link planForBothRisks}. */
export interface BothRisksPlanResult {
  sampleSize: number;
  acceptanceNumber: number;
  overrelianceRisk: number;
  underrelianceRisk: number;
  model: Model;
  confidence: number;
  tolerableRate: number;
  expectedRate: number;
  allowedUnderrelianceRisk: number;
  populationSize?: number;
  /** Set when the size is far beyond what tests of controls usually use. */
  sizeRemark?: string;
}

/** Options of {@link extensionRisk}. */
export interface ExtensionRiskOptions {
  /** Items tested in the first look (the planned sample). */
  sampleSize: number;
  /** Deviations found in them. */
  deviations: number;
  tolerableRate: number;
  confidence: number;
  populationSize?: number;
  model?: Model;
}

/** Result of {@link extensionRisk}. */
export interface ExtensionRiskResult {
  sampleSize: number;
  deviations: number;
  model: Model;
  /** β = 1 − confidence: the risk the plan stated. */
  plannedRisk: number;
  /** The most deviations in the planned sample with which its results support reliance (null: none). */
  acceptanceNumber: number | null;
  /** The single-stage extension figure m (0 when already supported); null when none is offered. */
  extensionSize: number | null;
  /** n + m, or null. */
  totalSize: number | null;
  /** Why no extension is offered, when none is. */
  note?: string;
  /**
   * The risk of overreliance at n + m items and k deviations, as if the extended sample had been
   * planned in advance: a labelled figure only, not the risk of what was done.
   */
  singleStageFigure: number | null;
  /**
   * The exact risk of overreliance of the procedure "test n; if the results do not support
   * reliance, extend by the single-stage figure for the deviations found and rely only if none of
   * the added items deviates", over every outcome of the first look.
   */
  procedureRisk: number;
  /** The same when the extension is repeated after each extension that finds a deviation. */
  repeatedProcedureRisk: number;
}

/** One part of a population tested in parts (a location, or the interim or roll-forward part). */
export interface PopulationPart {
  /** Units in this part. */
  populationSize: number;
  /** Items tested from it (drawn at random without replacement). */
  sampleSize: number;
  /** Deviations found in them. */
  deviations: number;
}

/** Options of {@link combinedUpperLimit}. */
export interface CombinedUpperLimitOptions {
  parts: readonly PopulationPart[];
  confidence: number;
  /** When given, the result says whether the combined limit supports reliance at this rate. */
  tolerableRate?: number;
}

/** Result of {@link combinedUpperLimit}. */
export interface CombinedUpperLimitResult {
  confidence: number;
  populationSize: number;
  sampleSize: number;
  deviations: number;
  /** The exact combined limit on the whole population's deviations (null when the search is too large; see note). */
  deviationsInPopulation: number | null;
  /** deviationsInPopulation ÷ populationSize. */
  rate: number | null;
  /** The allocation of deviationsInPopulation + 1 across the parts that came closest to plausible. */
  worstAllocation: number[] | null;
  /** The simple conservative bound: the sum of each part's limit at confidence 1 − β/P (Bonferroni). */
  conservative: { deviationsInPopulation: number; rate: number; partLimits: number[]; partConfidence: number };
  /** With tolerableRate: whether the exact limit (or, without it, the conservative one) is below ⌈TDR·N⌉. */
  supported?: boolean;
  tolerableRate?: number;
  /**
   * With tolerableRate: the risk of overreliance over the whole population, the largest chance,
   * over every allocation of ⌈TDR·N⌉ deviations across the parts, of a result as good as the one
   * observed (null when the exact search is too large).
   */
  achievedRisk?: number | null;
  /**
   * With tolerableRate: the risk the conservative bound achieves, the smallest β' at which the sum
   * of the parts' limits at confidence 1 − β'/P falls below ⌈TDR·N⌉ (1 when none does).
   */
  conservativeRisk?: number;
  note?: string;
}

/** Options of {@link limitDecision}. */
export interface LimitDecisionOptions {
  sampleSize: number;
  deviations: number;
  confidence: number;
  tolerableRate: number;
  populationSize?: number;
  model?: Model;
}

/** Result of {@link limitDecision}: the decision and how to word the limit against the tolerable rate. */
export interface LimitDecisionResult {
  /** True when the results support reliance (risk of overreliance ≤ β); the chart's colour follows this. */
  supported: boolean;
  achievedRisk: number;
  allowableRisk: number;
  /** The exact upper deviation limit (a fraction). */
  upperLimit: number;
  /**
   * The rule in words: 'below' for the hypergeometric model (the limit M* ÷ N must be below the
   * tolerable rate; it can equal it, and then the results do not support reliance), 'not above'
   * otherwise (the continuous limit must not exceed the tolerable rate).
   */
  rule: 'below' | 'not above';
  /** How the limit stands against the tolerable rate: 'below', 'equal' or 'above'. */
  relation: 'below' | 'equal' | 'above';
}
