import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import { selectSystematic, SYSTEMATIC_V1 } from '../../src/selection/index.js';

/** Positions of one start by the textbook rule: floor(start + i · interval), exact in fractions. */
function byRule(startExact: string, N: number, n: number, r: number): number[] {
  const [u, den = '1'] = startExact.split('/');
  // start = u/den; interval = rN/n. floor(u/den + i·rN/n) = floor((u·n + i·r·N·den) / (den·n)).
  const out: number[] = [];
  for (let i = 0; i < n / r; i++) out.push(Math.floor((Number(u) * n + i * r * N * Number(den)) / (Number(den) * n)));
  return out;
}

describe('selectSystematic (systematic-v1)', () => {
  // Golden vectors: computed once by this implementation and frozen here.
  it('golden: N=1000, n=25, one start', () => {
    const s = selectSystematic({ populationSize: 1000, sampleSize: 25, seed: '48213' });
    expect(s).toMatchObject({ method: 'systematic', algorithm: SYSTEMATIC_V1, interval: 40, intervalExact: '40', starts: [20.56], startsExact: ['514/25'] });
    expect(s.positions).toEqual([20, 60, 100, 140, 180, 220, 260, 300, 340, 380, 420, 460, 500, 540, 580, 620, 660, 700, 740, 780, 820, 860, 900, 940, 980]);
  });

  it('golden: N=12,650, n=60, four starts, three spares', () => {
    const s = selectSystematic({ populationSize: 12_650, sampleSize: 60, starts: 4, spares: 3, seed: 'x' });
    expect(s.intervalExact).toBe('2530/3'); // 4 × 12,650 / 60
    expect(s.startsExact).toEqual(['48701/60', '2171/6', '2323/15', '7303/10']);
    expect(s.positions).toEqual([
      811, 1655, 2498, 3341, 4185, 5028, 5871, 6715, 7558, 8401, 9245, 10088, 10931, 11775, 12618, 361, 1205, 2048, 2891, 3735, 4578, 5421, 6265,
      7108, 7951, 8795, 9638, 10481, 11325, 12168, 154, 998, 1841, 2684, 3528, 4371, 5214, 6058, 6901, 7744, 8588, 9431, 10274, 11118, 11961,
      730, 1573, 2416, 3260, 4103, 4946, 5790, 6633, 7476, 8320, 9163, 10006, 10850, 11693, 12536, 12004, 5496, 10183,
    ]);
  });

  it('golden: a fractional interval (N=10, n=4) and spares from the rows left', () => {
    const s = selectSystematic({ populationSize: 10, sampleSize: 4, spares: 2, seed: '1' });
    expect([s.intervalExact, s.startsExact, s.positions]).toEqual(['5/2', ['9/4'], [2, 4, 7, 9, 8, 0]]);
  });

  it('every position follows floor(start + i·interval) from its recorded start (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5000 }), fc.integer({ min: 1, max: 60 }), fc.integer({ min: 1, max: 4 }), fc.stringMatching(/^[a-z0-9]{1,8}$/), (N, nRaw, r, seed) => {
        const n = Math.max(r, Math.min(N - (N % r), nRaw - (nRaw % r)));
        if (n > N || n % r !== 0 || n === 0) return;
        let s;
        try {
          s = selectSystematic({ populationSize: N, sampleSize: n, starts: r, seed });
        } catch (e) {
          // Only acceptable refusal: starts that cannot be placed apart in a tight population.
          expect((e as Error).message).toMatch(/Could not place/);
          return;
        }
        const expected = s.startsExact!.flatMap((st) => byRule(st, N, n, r));
        expect(s.positions).toEqual(expected);
        expect(new Set(s.positions).size).toBe(n);
        for (const p of s.positions) expect(p >= 0 && p < N).toBe(true);
        for (const st of s.starts!) expect(st >= 0 && st < s.interval!).toBe(true);
        expect(new Set(s.starts).size).toBe(r);
      }),
    );
  });

  // Common practice, no single source: with a random start in [0, N/n) every unit must have the
  // same chance n/N of selection. Checked exactly by going through every possible start u/n.
  it('gives every row the same chance n/N, even with a fractional interval (exhaustive)', () => {
    for (const [N, n] of [
      [10, 4],
      [13, 5],
      [100, 7],
      [12, 12],
    ] as const) {
      const hits = new Array(N).fill(0);
      for (let u = 0; u < N; u++) for (const p of byRule(`${u}/${n}`, N, n, 1)) hits[p]++;
      expect(new Set(hits)).toEqual(new Set([n])); // each row in exactly n of the N equally likely starts
    }
  });

  it('spares are distinct, outside the sample, and the sample does not depend on them (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 3000 }), fc.integer({ min: 1, max: 50 }), fc.integer({ min: 1, max: 10 }), fc.stringMatching(/^[a-z0-9]{1,8}$/), (N, nRaw, kRaw, seed) => {
        const n = Math.min(N - 1, nRaw);
        const k = Math.min(N - n, kRaw);
        const a = selectSystematic({ populationSize: N, sampleSize: n, spares: k, seed });
        const b = selectSystematic({ populationSize: N, sampleSize: n, seed });
        expect(a.positions.slice(0, n)).toEqual(b.positions);
        expect(new Set(a.positions).size).toBe(n + k);
        expect(a).toEqual(selectSystematic({ populationSize: N, sampleSize: n, spares: k, seed }));
      }),
    );
  });

  it('selecting every row works, starts or not', () => {
    expect(selectSystematic({ populationSize: 7, sampleSize: 7, seed: 's' }).positions).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect([...selectSystematic({ populationSize: 8, sampleSize: 8, starts: 2, seed: 's' }).positions].sort((a, b) => a - b)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  });

  it('refuses a sample size that is not a multiple of the starts, and other misfits', () => {
    expect(() => selectSystematic({ populationSize: 1000, sampleSize: 25, starts: 2, seed: '1' })).toThrow(
      /must be a multiple of 2 .* Use 24 or 26, or another number of starts/,
    );
    expect(() => selectSystematic({ populationSize: 1000, sampleSize: 3, starts: 4, seed: '1' })).toThrow(/more random starts \(4\) than items \(3\)/);
    expect(() => selectSystematic({ populationSize: 10, sampleSize: 10, spares: 1, seed: '1' })).toThrow(TolrateInputError);
  });
});
