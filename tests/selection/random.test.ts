import fc from 'fast-check';
import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import { Draws, drawSeed, normaliseSeed, RANDOM_V1, selectRandom } from '../../src/selection/index.js';

describe('the generator', () => {
  // Reference: the seedrandom 3.0.5 README, which prints these values for the seed 'hello.'
  // ("Always 0.9282578795792454", "Always 0.3752569768646784", quick "0.7316977467853576",
  // int32 "1966374204"). If the installed library ever differs, every recorded seed would draw
  // differently, so this must fail first.
  it('is seedrandom ARC4 as published', () => {
    const rng = seedrandom('hello.');
    expect(rng()).toBe(0.9282578795792454);
    expect(rng()).toBe(0.3752569768646784);
    expect(rng.quick()).toBe(0.7316977467853576);
    expect(rng.int32()).toBe(1966374204);
  });

  it('draws whole numbers from the 32-bit outputs, rejecting the uneven tail', () => {
    const ref = seedrandom('hello.');
    const first = ref.int32() >>> 0;
    expect(new Draws('hello.').below(2 ** 32)).toBe(first); // the whole range: no rejection
    expect(new Draws('hello.').below(10)).toBe(first % 10); // 3986837235 < 4294967290, kept
    // m = 3·2^30 + 1: the first output (3,986,837,235 ≥ 3,221,225,473) must be thrown away.
    const m = 3 * 2 ** 30 + 1;
    const d = new Draws('hello.');
    const got = d.below(m);
    expect(d.used).toBe(2);
    expect(got).toBe((ref.int32() >>> 0) % m);
  });

  it('draws evenly (chi-square, 10 cells, 100,000 draws)', () => {
    const d = new Draws('uniform');
    const cells = new Array(10).fill(0);
    for (let i = 0; i < 100_000; i++) cells[d.below(10)]++;
    const chi = cells.reduce((s, c) => s + (c - 10_000) ** 2 / 10_000, 0);
    // 99.9th percentile of chi-square with 9 degrees of freedom is 27.88 (standard tables).
    expect(chi).toBeLessThan(27.88);
  });

  it('seeds are text of printable ASCII; a drawn seed has 6 to 9 digits', () => {
    expect(normaliseSeed('  48213 ')).toBe('48213');
    expect(() => normaliseSeed('')).toThrow(TolrateInputError);
    expect(() => normaliseSeed('sé')).toThrow(/plain ASCII/);
    expect(() => normaliseSeed('x'.repeat(101))).toThrow(/too long/);
    for (let i = 0; i < 50; i++) expect(drawSeed()).toMatch(/^[1-9]\d{5,8}$/);
  });
});

/**
 * Reference implementation written from the algorithm's description alone: a full array of the
 * positions shuffled by Fisher–Yates, each j drawn in [i, N) by rejection on seedrandom's int32.
 */
function referenceRandom(N: number, count: number, seed: string): number[] {
  const rng = seedrandom(seed);
  const below = (m: number) => {
    if (m === 1) return 0;
    const limit = 2 ** 32 - (2 ** 32 % m);
    for (;;) {
      const u = rng.int32() >>> 0;
      if (u < limit) return u % m;
    }
  };
  const a = Array.from({ length: N }, (_, i) => i);
  for (let i = 0; i < count; i++) {
    const j = i + below(N - i);
    [a[i], a[j]] = [a[j]!, a[i]!];
  }
  return a.slice(0, count);
}

describe('selectRandom (random-v1)', () => {
  // Golden vectors: computed once by this implementation and frozen here. Any change to the order
  // of draws changes them; such a change needs a new algorithm id, not an edit of these numbers.
  it.each([
    [100, 10, 3, '20240131', [22, 67, 46, 90, 3, 85, 56, 83, 9, 32, 95, 55, 61]],
    [
      13_848,
      60,
      5,
      '48213',
      [
        5650, 10159, 13478, 11174, 5683, 4450, 6694, 192, 2913, 11500, 9471, 7311, 8736, 4267, 3320, 3210, 733, 9869, 4153, 298, 8608,
        13816, 5047, 6323, 12080, 11380, 6827, 6043, 6474, 3403, 3777, 12380, 8693, 6749, 9455, 13550, 6614, 1341, 6361, 2867, 12505,
        12573, 10456, 10141, 2272, 8962, 11768, 1569, 5442, 4509, 5783, 10771, 2556, 5464, 2083, 8616, 11184, 5751, 1640, 1845, 10262,
        3575, 8098, 6734, 3573,
      ],
    ],
    [
      1_000_000,
      20,
      0,
      'tolrate demo',
      [
        193498, 589785, 318919, 671730, 390863, 508828, 416435, 187950, 6250, 908976, 629761, 394285, 538195, 376163, 8007, 779421,
        791574, 506461, 295925, 727224,
      ],
    ],
    [2 ** 40, 5, 0, 'big', [413551267165, 650536173651, 235013829267, 210162687295, 970669289277]],
  ])('N=%i n=%i spares=%i seed=%j', (N, n, k, seed, expected) => {
    const s = selectRandom({ populationSize: N, sampleSize: n, spares: k, seed });
    expect(s.positions).toEqual(expected);
    expect(s).toMatchObject({ method: 'random', algorithm: RANDOM_V1, seed, seedDrawn: false, sampleSize: n, spares: k, populationSize: N });
  });

  it('matches the plain full-array Fisher–Yates reference (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 3000 }), fc.string({ minLength: 1, maxLength: 12 }), fc.nat(), (N, seedRaw, pick) => {
        const seed = seedRaw.replace(/[^\x21-\x7e]/g, 'x');
        const count = 1 + (pick % N);
        expect(selectRandom({ populationSize: N, sampleSize: count, seed }).positions).toEqual(referenceRandom(N, count, seed));
      }),
      { numRuns: 200 },
    );
  });

  it('no duplicates, all in range, spares after and apart from the sample, same seed same items (property)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 100_000 }),
        fc.integer({ min: 1, max: 200 }),
        fc.integer({ min: 0, max: 20 }),
        fc.stringMatching(/^[0-9A-Za-z]{1,10}$/),
        (N, nRaw, kRaw, seed) => {
          const n = Math.min(N, nRaw);
          const k = Math.min(N - n, kRaw);
          const a = selectRandom({ populationSize: N, sampleSize: n, spares: k, seed });
          expect(a.positions).toHaveLength(n + k);
          expect(new Set(a.positions).size).toBe(n + k);
          for (const p of a.positions) expect(Number.isInteger(p) && p >= 0 && p < N).toBe(true);
          const sample = new Set(a.positions.slice(0, n));
          for (const s of a.positions.slice(n)) expect(sample.has(s)).toBe(false);
          expect(selectRandom({ populationSize: N, sampleSize: n, spares: k, seed }).positions).toEqual(a.positions);
          // Asking for spares does not change the sample: they are the next draws.
          expect(selectRandom({ populationSize: N, sampleSize: n, seed }).positions).toEqual(a.positions.slice(0, n));
        },
      ),
    );
  });

  it('different seeds give different samples', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) seen.add(selectRandom({ populationSize: 10_000, sampleSize: 25, seed: `seed-${i}` }).positions.join(','));
    expect(seen.size).toBe(200);
  });

  it('draws and records a seed when none is given', () => {
    const s = selectRandom({ populationSize: 500, sampleSize: 5 });
    expect(s.seedDrawn).toBe(true);
    expect(s.seed).toMatch(/^\d{6,9}$/);
    expect(selectRandom({ populationSize: 500, sampleSize: 5, seed: s.seed! }).positions).toEqual(s.positions);
  });

  it('each row is equally likely to be selected (1,000 samples of 3 from 12)', () => {
    const counts = new Array(12).fill(0);
    for (let i = 0; i < 1000; i++) for (const p of selectRandom({ populationSize: 12, sampleSize: 3, seed: `u${i}` }).positions) counts[p]++;
    // Each row expects 250; the 99.9th percentile of chi-square with 11 df is 31.26 (standard tables).
    const chi = counts.reduce((s, c) => s + (c - 250) ** 2 / 250, 0);
    expect(chi).toBeLessThan(31.26);
  });

  it('refuses sizes that do not fit', () => {
    expect(() => selectRandom({ populationSize: 0, sampleSize: 1, seed: '1' })).toThrow(/population is empty/);
    expect(() => selectRandom({ populationSize: 10, sampleSize: 11, seed: '1' })).toThrow(/larger than the population/);
    expect(() => selectRandom({ populationSize: 10, sampleSize: 8, spares: 3, seed: '1' })).toThrow(/at most 2 spares can be drawn/);
    expect(() => selectRandom({ populationSize: 10, sampleSize: 0, seed: '1' })).toThrow(TolrateInputError);
    expect(() => selectRandom({ populationSize: 10, sampleSize: 2.5, seed: '1' })).toThrow(TolrateInputError);
  });
});
