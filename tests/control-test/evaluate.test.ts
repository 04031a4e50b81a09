import { describe, expect, it } from 'vitest';
import { evaluate, proposeConclusion, attributeFigures } from '../../src/control-test/index.js';
import { newWorkpaper } from '../../src/workpaper/index.js';
import type { ItemResult, Workpaper } from '../../src/workpaper/schema.js';

/** A workpaper with n tested items for A1, the first `devs` of them deviations. */
function workpaper(opts: { n: number; devs: Array<Partial<{ intentional: 'no' | 'suspected' | 'yes'; pattern: 'isolated' | 'systemic' | 'unclear' }>>; kind?: 'statistical' | 'non-statistical'; voids?: number }): Workpaper {
  const wp = newWorkpaper('test');
  const items: ItemResult[] = [];
  // The selection: the voided items and the first n − voids tested items are the sample; the last
  // `voids` tested items are the spares that replace the voided ones, in draw order.
  const v = opts.voids ?? 0;
  const keys = [...Array.from({ length: v }, (_, i) => `V${i}`), ...Array.from({ length: opts.n }, (_, i) => `K${i}`)];
  const seqOf = new Map(keys.map((k, i) => [k, i + 1]));
  const selected = keys.map((key, i) => ({ seq: i + 1, role: (i < opts.n ? 'sample' : 'spare') as 'sample' | 'spare', position: i, row: i + 2, key, values: {} }));
  for (let i = 0; i < v; i++) {
    items.push({ key: `V${i}`, seq: seqOf.get(`V${i}`)!, void: { reason: 'voided cheque, properly cancelled', replacedBy: keys[opts.n + i]! }, attributes: {} });
  }
  for (let i = 0; i < opts.n; i++) {
    const d = opts.devs[i];
    items.push({
      key: `K${i}`,
      seq: seqOf.get(`K${i}`)!,
      attributes: {
        A1: d
          ? { result: 'deviation', found: 'no approval signature', cause: 'not-performed', intentional: d.intentional ?? 'no', pattern: d.pattern ?? 'isolated' }
          : { result: 'conforms' },
      },
    });
  }
  return {
    ...wp,
    control: { id: 'C-01', description: 'd', objective: 'o', owner: 'Payables lead', frequency: 'many-times-daily', nature: 'manual', key: true },
    attributes: [{ id: 'A1', description: 'Approved before payment', deviationDefinition: 'No approval evidence' }],
    approach: {
      kind: opts.kind ?? 'statistical', confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, model: 'binomial', sizes: [],
      sampleSize: opts.n, rationale: 'test',
    },
    selection: { method: 'random', algorithm: 'random-v1', seed: '1', sampleSize: opts.n, spares: v, items: selected, selectedAt: new Date().toISOString() },
    results: { source: 'interview', items, recordedAt: new Date().toISOString() },
  };
}

/** A statistical workpaper with n items and k isolated, unintentional deviations. */
function fixtureFor(n: number, k: number): Workpaper {
  return workpaper({ n, devs: Array.from({ length: k }, () => ({})) });
}

describe('evaluation', () => {
  it('2 deviations in 78 at 95% / 6%: rate 2.6%, limit above 6%, not supported, extension 25', () => {
    const ev = evaluate(workpaper({ n: 78, devs: [{}, {}], voids: 1 })).attributes[0]!;
    // Sample rate 2/78 = 0.025641 (arithmetic).
    expect(ev.sampleSize).toBe(78);
    expect(ev.deviations).toBe(2);
    expect(ev.sampleRate).toBeCloseTo(0.02564, 5);
    // Exact one-sided Clopper-Pearson limit for 2 in 78 at 95% is 7.85%, above the 6% tolerable
    // rate: the AICPA attribute tables give 8.2% at the next lower tabulated size, n = 75 (from memory).
    expect(ev.upperLimit).toBeGreaterThan(0.06);
    expect(ev.upperLimit).toBeLessThan(0.082);
    expect(ev.supportedByRates).toBe(false);
    // AICPA 95% sample size table: 6% tolerable, 1.75% expected -> 103 (2), i.e. 25 more (from memory).
    expect(ev.extension).toBe(25);
    expect(ev.illustrative).toBe(false);
  });

  it('0 deviations in 49 at 95% / 6% supports reliance (AICPA 95% table, 0% expected, 6% -> 49; from memory)', () => {
    const ev = evaluate(workpaper({ n: 49, devs: [] })).attributes[0]!;
    expect(ev.supportedByRates).toBe(true);
    expect(ev.extension).toBe(0);
    const c = proposeConclusion(workpaper({ n: 49, devs: [] }), evaluate(workpaper({ n: 49, devs: [] })));
    expect(c.control.supportsReliance).toBe(true);
    expect(c.followUps).toEqual([]);
  });

  it('an intentional deviation escalates even when the rates support reliance', () => {
    const wp = workpaper({ n: 200, devs: [{ intentional: 'suspected' }] });
    const ev = evaluate(wp);
    expect(ev.attributes[0]!.supportedByRates).toBe(true);
    const c = proposeConclusion(wp, ev);
    expect(c.findings[0]!.supportsReliance).toBe(false);
    expect(c.findings[0]!.overridden).toBe(true);
    expect(c.qualitative.intentionalFound).toBe(true);
    expect(c.followUps.map((f) => f.kind)).not.toContain('extend-sample');
    expect(c.followUps.find((f) => f.kind === 'communicate')!.description).toMatch(/fraud/);
  });

  it('a non-statistical sample with a deviation does not support reliance and is illustrative', () => {
    const wp = workpaper({ n: 25, devs: [{}], kind: 'non-statistical' });
    const ev = evaluate(wp);
    expect(ev.attributes[0]!.illustrative).toBe(true);
    const c = proposeConclusion(wp, ev);
    expect(c.control.supportsReliance).toBe(false);
    expect(c.findings[0]!.reasoning).toMatch(/sampling risk is not quantified|non-statistical/);
  });

  it('refuses to evaluate with results missing', () => {
    const wp = workpaper({ n: 3, devs: [] });
    wp.results!.items[1]!.attributes = {};
    expect(() => evaluate(wp)).toThrowError(/no result yet/);
  });

  it('hypergeometric figures carry the count of deviations in the population', () => {
    const ev = attributeFigures({ attributeId: 'A1', sampleSize: 60, deviations: 1, tolerableRate: 0.06, confidence: 0.95, model: 'hypergeometric', populationSize: 400, illustrative: false });
    expect(ev.deviationsInPopulation).toBeGreaterThan(0);
    expect(ev.upperLimit).toBeCloseTo(ev.deviationsInPopulation! / 400, 12);
  });
});

describe('proposed follow-ups', () => {
  it('name the control owner without nested brackets', () => {
    const wp = { ...JSON.parse(JSON.stringify(fixtureFor(78, 2))) };
    wp.control.owner = 'Head of Finance (G. Tallamy)';
    const c = proposeConclusion(wp, evaluate(wp));
    const text = c.followUps.find((f) => f.kind === 'communicate')!.description;
    expect(text).toContain('control owner (Head of Finance, G. Tallamy)');
  });
});
