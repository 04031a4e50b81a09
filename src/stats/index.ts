/**
 * The statistics engine of tolrate: exact attribute sampling — sample sizes, upper deviation
 * limits, risks of overreliance and underreliance, single- and two-stage plans and their
 * operating characteristics, sample extensions with the risk of the procedure followed, limits
 * for a population tested in parts, planning tables — and the distribution functions they rest on. Pure functions; rates are fractions (0.06 means 6%).
 */
export type {
  DecisionOptions,
  DecisionResult,
  ExtensionSizeOptions,
  FinitePopulationCorrection,
  Model,
  OverrelianceRiskOptions,
  PlanningTableCell,
  PlanningTableOptions,
  PlanningTableResult,
  PlanningTableRow,
  SampleSizeOptions,
  SampleSizeResult,
  UpperLimitOptions,
  UpperLimitResult,
  AcceptanceNumberOptions,
  BothRisksPlanOptions,
  BothRisksPlanResult,
  OperatingCharacteristicOptions,
  OperatingCharacteristicPoint,
  PlanRisks,
  PlanRisksOptions,
  SingleStagePlan,
  TwoStagePlan,
  TwoStagePlanOptions,
  TwoStagePlanResult,
  UnderrelianceRiskOptions,
  ExtensionRiskOptions,
  ExtensionRiskResult,
  CombinedUpperLimitOptions,
  CombinedUpperLimitResult,
  PopulationPart,
  LimitDecisionOptions,
  LimitDecisionResult,
} from './types.js';
export { MODELS } from './types.js';
export {
  CEIL_GUARD,
  DEFAULT_EXPECTED_RATES,
  DEFAULT_TOLERABLE_RATES,
  LARGE_SAMPLE_SIZE,
  MAX_SAMPLE_SIZE,
  RISK_TOLERANCE,
} from './constants.js';

export { sampleSize } from './sample-size.js';
export { upperLimit } from './upper-limit.js';
export { overrelianceRisk } from './overreliance-risk.js';
export { extensionSize } from './extension-size.js';
export { planningTable } from './planning-table.js';
export { decision } from './decision.js';
export { withinRisk } from './within-risk.js';
export { resolveModel } from './resolve-model.js';
export { expectedDeviations } from './expected-deviations.js';
export { tolerableDeviations } from './tolerable-deviations.js';
export { acceptanceNumber } from './acceptance-number.js';
export { underrelianceRisk } from './underreliance-risk.js';
export { planRisks } from './plan-risks.js';
export { operatingCharacteristic } from './operating-characteristic.js';
export { twoStagePlan } from './two-stage-plan.js';
export { extensionRisk } from './extension-risk.js';
export { planForBothRisks } from './both-risks-plan.js';
export { combinedUpperLimit } from './combined-upper-limit.js';
export { limitDecision } from './limit-decision.js';
export { sizeRemark } from './size-remark.js';

export { binomialPmf } from './binomial-pmf.js';
export { binomialLogPmf } from './binomial-log-pmf.js';
export { binomialCdf } from './binomial-cdf.js';
export { binomialLogCdf } from './binomial-log-cdf.js';
export { hypergeometricPmf } from './hypergeometric-pmf.js';
export { hypergeometricLogPmf } from './hypergeometric-log-pmf.js';
export { hypergeometricCdf } from './hypergeometric-cdf.js';
export { hypergeometricLogCdf } from './hypergeometric-log-cdf.js';
export { poissonPmf } from './poisson-pmf.js';
export { poissonLogPmf } from './poisson-log-pmf.js';
export { poissonCdf } from './poisson-cdf.js';
export { poissonLogCdf } from './poisson-log-cdf.js';
export { betaInc } from './beta-inc.js';
export { betaInv } from './beta-inv.js';
export { gammaInc } from './gamma-inc.js';
export { gammaInv } from './gamma-inv.js';
export { logGamma } from './log-gamma.js';
