import { randomInt } from 'node:crypto';
import seedrandom from 'seedrandom';
import { TolrateInputError } from '../errors.js';

/**
 * Seeded whole-number draws, the same on every machine and every version of tolrate that keeps
 * the algorithm id:
 * - the generator is seedrandom's default ARC4 generator (seedrandom 3.0.5), keyed by the seed text;
 * - a whole number below m is drawn by rejection sampling on the generator's 32-bit outputs
 *   (`int32() >>> 0`): outputs at or above the largest multiple of m below 2^32 are thrown away,
 *   so every value is exactly equally likely and no floating-point rounding is involved;
 *   for m above 2^32, a 53-bit number is made of two outputs (21 + 32 bits) the same way;
 * - a draw below 1 is 0 and takes no output.
 */

export const GENERATOR = 'seedrandom 3.0.5 ARC4';

const MAX_SEED = 100;

/**
 * Check a seed: seeds are text (not numbers: '0123' and '123' are different seeds), of 1 to 100
 * printable ASCII characters after trimming. Characters outside ASCII are refused because the
 * generator keys on only the low 8 bits of each character, so two different seeds could collide.
 */
export function normaliseSeed(seed: unknown): string {
  if (typeof seed !== 'string' && typeof seed !== 'number') {
    throw new TolrateInputError('The seed must be text (for example 48213).', 'INVALID_SEED');
  }
  const s = String(seed).trim();
  if (s === '') throw new TolrateInputError('The seed is blank. Give a seed (for example 48213) or leave it out to have one drawn.', 'INVALID_SEED');
  if (s.length > MAX_SEED) throw new TolrateInputError(`The seed is too long (${s.length} characters, at most ${MAX_SEED}).`, 'INVALID_SEED');
  if (!/^[\x20-\x7e]+$/.test(s)) {
    throw new TolrateInputError('The seed may hold only plain ASCII letters, digits, spaces and punctuation.', 'INVALID_SEED');
  }
  return s;
}

/** A fresh seed when the user gives none: a 6- to 9-digit number (from the system's secure source). */
export function drawSeed(): string {
  return String(randomInt(100_000, 1_000_000_000));
}

const TWO32 = 4294967296;
const TWO53 = 9007199254740992;

export class Draws {
  private readonly rng: seedrandom.PRNG;
  /** Number of 32-bit outputs used so far (for tests and diagnostics). */
  used = 0;

  constructor(seed: string) {
    this.rng = seedrandom(seed);
  }

  private next32(): number {
    this.used++;
    return this.rng.int32() >>> 0;
  }

  /** A whole number in [0, m), m a whole number from 1 to 2^53. */
  below(m: number): number {
    if (!Number.isSafeInteger(m) || m < 1) throw new RangeError(`draw range ${m}`);
    if (m === 1) return 0;
    if (m <= TWO32) {
      const limit = TWO32 - (TWO32 % m);
      for (;;) {
        const u = this.next32();
        if (u < limit) return u % m;
      }
    }
    const limit = TWO53 - (TWO53 % m);
    for (;;) {
      const hi = this.next32() >>> 11;
      const lo = this.next32();
      const u = hi * TWO32 + lo;
      if (u < limit) return u % m;
    }
  }
}

/**
 * Partial Fisher–Yates over 0..size-1 with a sparse swap map: `count` distinct positions in draw
 * order, using O(count) memory whatever the size. Step i draws j in [i, size), outputs the value
 * at j and moves the value at i to j.
 */
export function partialShuffle(draws: Draws, size: number, count: number, valueAt: (i: number) => number = (i) => i): number[] {
  const swap = new Map<number, number>();
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const j = i + draws.below(size - i);
    const vj = swap.has(j) ? swap.get(j)! : valueAt(j);
    const vi = swap.has(i) ? swap.get(i)! : valueAt(i);
    swap.set(j, vi);
    swap.delete(i);
    out.push(vj);
  }
  return out;
}
