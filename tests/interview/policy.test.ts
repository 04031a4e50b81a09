import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { defaultPolicyPath, loadPolicy, policySize } from '../../src/interview/policy.js';
import { FREQUENCIES } from '../../src/workpaper/schema.js';
import { tempDir } from '../fixtures/interview.js';

describe('the firm sampling policy', () => {
  it('the shipped policy is valid and within the usual ranges by frequency', () => {
    const p = loadPolicy();
    // Common practice, no single source: annual 1, quarterly 2, monthly 2-5, weekly 5-15,
    // daily 20-40, many times a day 25-60; about 90% confidence and no expected deviations.
    const ranges: Record<(typeof FREQUENCIES)[number], [number, number]> = {
      annual: [1, 1],
      quarterly: [2, 2],
      monthly: [2, 5],
      weekly: [5, 15],
      daily: [20, 40],
      'many-times-daily': [25, 60],
    };
    for (const f of FREQUENCIES) {
      for (const l of p.relianceLevels) {
        const n = policySize(p, f, l.id);
        expect(n).toBeGreaterThanOrEqual(ranges[f][0]);
        expect(n).toBeLessThanOrEqual(ranges[f][1]);
      }
    }
    // Moderate reliance about 25, high 40-60 for a control operating many times a day (common practice).
    expect(policySize(p, 'many-times-daily', 'moderate')).toBe(25);
    expect(policySize(p, 'many-times-daily', 'high')).toBeGreaterThanOrEqual(40);
    expect(p.assumptions.confidencePercent).toBe(90);
    expect(p.assumptions.expectedDeviations).toBe(0);
  });

  it('a broken copy names every problem', () => {
    const dir = tempDir();
    const bad = JSON.parse(readFileSync(defaultPolicyPath(), 'utf8'));
    delete bad.sizes.weekly;
    bad.sizes.daily.moderate = 0;
    bad.sizes.monthly.low = 3;
    bad.assumptions.confidencePercent = 0.9e3;
    const path = join(dir, 'policy.json');
    writeFileSync(path, JSON.stringify(bad));
    try {
      loadPolicy(path);
      expect.unreachable();
    } catch (e) {
      const d = (e as { details: string[] }).details.join('\n');
      expect((e as Error).message).toMatch(/is not valid/);
      expect(d).toMatch(/sizes\.weekly: no sizes for the frequency "weekly"/);
      expect(d).toMatch(/sizes\.daily\.moderate: must be at least 1/);
      expect(d).toMatch(/sizes\.monthly\.low: "low" is not one of the reliance levels/);
      expect(d).toMatch(/assumptions\.confidencePercent: confidencePercent must be below 100/);
    }
    writeFileSync(path, '{');
    expect(() => loadPolicy(path)).toThrow(/not valid JSON/);
    expect(() => loadPolicy(join(dir, 'none.json'))).toThrow(/No sampling policy file/);
  });
});
