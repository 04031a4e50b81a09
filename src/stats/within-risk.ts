import { RISK_TOLERANCE } from './constants.js';

/**
 * The comparison "achieved risk ≤ allowable risk β", with the relative tolerance
 * {@link RISK_TOLERANCE} (1e-12) so that exact ties count as achieved. Every size, extension,
 * hypergeometric limit and decision of the engine uses this one comparison, so they agree.
 */
export function withinRisk(risk: number, allowableRisk: number): boolean {
  return risk <= allowableRisk * (1 + RISK_TOLERANCE);
}
