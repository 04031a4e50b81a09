/**
 * Every public function rejects bad input with a SamplingInputError that names the parameter
 * (DEVELOPERS.md, "Conventions": errors a user can fix are typed and carry a message they can act on).
 */
import { describe, expect, it } from 'vitest';
import { SamplingInputError, TolrateInputError } from '../../src/errors.js';
import {
  betaInc,
  betaInv,
  binomialCdf,
  decision,
  expectedDeviations,
  extensionSize,
  gammaInc,
  gammaInv,
  hypergeometricCdf,
  overrelianceRisk,
  planningTable,
  poissonCdf,
  sampleSize,
  upperLimit,
} from '../../src/stats/index.js';

function thrown(f: () => unknown): SamplingInputError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(SamplingInputError);
    expect(e).toBeInstanceOf(TolrateInputError); // so the CLI shows it and exits 2
    return e as SamplingInputError;
  }
  throw new Error('expected a SamplingInputError');
}

const size = { confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 };
const limit = { sampleSize: 78, deviations: 2, confidence: 0.95 };
const risk = { sampleSize: 78, deviations: 2, tolerableRate: 0.06 };
const ext = { ...risk, confidence: 0.95 };

const cases: Array<[string, () => unknown, string, RegExp?]> = [
  ['sampleSize: confidence 95 (a percentage)', () => sampleSize({ ...size, confidence: 95 }), 'confidence', /pass 0.95/],
  ['sampleSize: confidence 0', () => sampleSize({ ...size, confidence: 0 }), 'confidence'],
  ['sampleSize: confidence 1', () => sampleSize({ ...size, confidence: 1 }), 'confidence'],
  ['sampleSize: confidence NaN', () => sampleSize({ ...size, confidence: Number.NaN }), 'confidence'],
  ['sampleSize: tolerableRate 0', () => sampleSize({ ...size, tolerableRate: 0 }), 'tolerableRate'],
  ['sampleSize: tolerableRate 6', () => sampleSize({ ...size, tolerableRate: 6 }), 'tolerableRate', /If you meant 6%, pass 0.06/],
  ['sampleSize: tolerableRate as text', () => sampleSize({ ...size, tolerableRate: '0.06' as unknown as number }), 'tolerableRate'],
  ['sampleSize: expectedRate −0.01', () => sampleSize({ ...size, expectedRate: -0.01 }), 'expectedRate'],
  ['sampleSize: expectedRate 1', () => sampleSize({ ...size, expectedRate: 1 }), 'expectedRate'],
  ['sampleSize: EDR ≥ TDR', () => sampleSize({ ...size, expectedRate: 0.07 }), 'expectedRate', /expectedRate \(7%\) must be below tolerableRate \(6%\)/],
  ['sampleSize: EDR = TDR', () => sampleSize({ ...size, expectedRate: 0.06 }), 'expectedRate'],
  ['sampleSize: populationSize 0', () => sampleSize({ ...size, populationSize: 0 }), 'populationSize'],
  ['sampleSize: populationSize 80.5', () => sampleSize({ ...size, populationSize: 80.5 }), 'populationSize'],
  ['sampleSize: unknown model', () => sampleSize({ ...size, model: 'normal' as never }), 'model', /binomial, hypergeometric, poisson/],
  ['sampleSize: hypergeometric without N', () => sampleSize({ ...size, model: 'hypergeometric' }), 'populationSize'],
  ['sampleSize: no options', () => sampleSize(undefined as never), 'options'],
  ['upperLimit: sampleSize 0', () => upperLimit({ ...limit, sampleSize: 0 }), 'sampleSize'],
  ['upperLimit: sampleSize 7.5', () => upperLimit({ ...limit, sampleSize: 7.5 }), 'sampleSize'],
  ['upperLimit: deviations −1', () => upperLimit({ ...limit, deviations: -1 }), 'deviations'],
  ['upperLimit: deviations > n', () => upperLimit({ ...limit, deviations: 79 }), 'deviations', /cannot exceed sampleSize/],
  ['upperLimit: n > N', () => upperLimit({ ...limit, populationSize: 50 }), 'sampleSize', /cannot exceed populationSize/],
  ['upperLimit: confidence 1.5', () => upperLimit({ ...limit, confidence: 1.5 }), 'confidence'],
  ['upperLimit: unknown model', () => upperLimit({ ...limit, model: 'Binomial' as never }), 'model'],
  ['overrelianceRisk: tolerableRate 1', () => overrelianceRisk({ ...risk, tolerableRate: 1 }), 'tolerableRate'],
  ['overrelianceRisk: deviations 2.5', () => overrelianceRisk({ ...risk, deviations: 2.5 }), 'deviations'],
  ['overrelianceRisk: hypergeometric without N', () => overrelianceRisk({ ...risk, model: 'hypergeometric' }), 'populationSize'],
  ['extensionSize: confidence −0.1', () => extensionSize({ ...ext, confidence: -0.1 }), 'confidence'],
  ['extensionSize: tolerableRate missing', () => extensionSize({ ...ext, tolerableRate: undefined as never }), 'tolerableRate'],
  ['extensionSize: sampleSize > N', () => extensionSize({ ...ext, populationSize: 10 }), 'sampleSize'],
  ['planningTable: empty tolerable list', () => planningTable({ confidence: 0.95, tolerableRates: [] }), 'tolerableRates'],
  ['planningTable: bad tolerable entry', () => planningTable({ confidence: 0.95, tolerableRates: [0.05, 5] }), 'tolerableRates[1]'],
  ['planningTable: bad expected entry', () => planningTable({ confidence: 0.95, expectedRates: [-1] }), 'expectedRates[0]'],
  ['planningTable: confidence 90', () => planningTable({ confidence: 90 }), 'confidence'],
  ['decision: achievedRisk 2', () => decision({ achievedRisk: 2, confidence: 0.95 }), 'achievedRisk'],
  ['expectedDeviations: negative size', () => expectedDeviations(-1, 0.01), 'sampleSize'],
  ['binomialCdf: p 1.2', () => binomialCdf(1, 10, 1.2), 'p'],
  ['binomialCdf: k 1.5', () => binomialCdf(1.5, 10, 0.2), 'k'],
  ['hypergeometricCdf: M > N', () => hypergeometricCdf(1, 10, 11, 5), 'M'],
  ['hypergeometricCdf: n > N', () => hypergeometricCdf(1, 10, 3, 11), 'n'],
  ['poissonCdf: λ < 0', () => poissonCdf(1, -2), 'lambda'],
  ['betaInc: a 0', () => betaInc(0.5, 0, 1), 'a'],
  ['betaInv: prob 1.1', () => betaInv(1.1, 1, 1), 'prob'],
  ['gammaInc: x < 0', () => gammaInc(-1, 2), 'x'],
  ['gammaInv: a −1', () => gammaInv(0.5, -1), 'a'],
];

describe('validation', () => {
  for (const [name, f, parameter, message] of cases) {
    it(`${name} → SamplingInputError(${parameter})`, () => {
      const e = thrown(f);
      expect(e.parameter).toBe(parameter);
      expect(e.message).toContain(parameter.replace(/\[\d+\]$/, ''));
      if (message) expect(e.message).toMatch(message);
    });
  }
});
