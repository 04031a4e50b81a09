import { TolrateInputError } from '../errors.js';
import { Draws, GENERATOR, drawSeed, normaliseSeed, partialShuffle } from './draws.js';
import type { RandomInput, RecordedSelection, Selection, SystematicInput } from './types.js';

/**
 * The selection algorithms. Each has a versioned id; the same (population size, seed, sample size,
 * spares, starts, algorithm id) always gives the same positions in the same order. A change to the
 * order of draws needs a new id, never an edit of an old one (the golden tests guard this).
 */
export const RANDOM_V1 =
  `random-v1: ${GENERATOR} generator keyed by the seed text; whole numbers below m by rejection ` +
  'sampling on 32-bit outputs; partial Fisher–Yates shuffle of the 0-based row positions with a sparse ' +
  'swap map; the sample is the first n positions drawn, the spares the next ones, in draw order';

export const SYSTEMATIC_V1 =
  'systematic-v1: interval r·N/n kept as an exact fraction; each of the r starts is u/n with u a whole ' +
  `number below r·N drawn as in random-v1 (${GENERATOR}); the positions of a start are floor((u + i·r·N)/n) ` +
  'for i = 0 .. n/r−1 (with one start every row has the same chance n/N); a start whose positions meet those of an ' +
  'earlier start is drawn again; listed start by start in draw order; spares are drawn from the rows not ' +
  'selected by a partial Fisher–Yates shuffle continuing the same draws';

export const HAPHAZARD_V1 =
  'haphazard-v1: items chosen by the practitioner from a list of keys; no random draw, nothing to re-draw';

export const ALGORITHM_IDS = ['random-v1', 'systematic-v1', 'haphazard-v1'] as const;

/** The id part of an algorithm text: 'random-v1: ...' -> 'random-v1'. */
export function algorithmId(algorithm: string): string {
  return String(algorithm).split(':')[0]!.trim();
}

function whole(v: unknown, name: string, min: number): number {
  if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < min) {
    throw new TolrateInputError(`${name} must be a whole number${min > 0 ? ` of at least ${min}` : ' (0 or more)'}; got ${String(v)}.`, 'INVALID_SELECTION');
  }
  return v;
}

function sizes(input: RandomInput): { N: number; n: number; k: number } {
  const N = whole(input.populationSize, 'The population size', 0);
  if (N === 0) throw new TolrateInputError('The population is empty: there is nothing to select from.', 'EMPTY_POPULATION');
  const n = whole(input.sampleSize, 'The sample size', 1);
  const k = whole(input.spares ?? 0, 'The number of spares', 0);
  if (n > N) {
    throw new TolrateInputError(`The sample size (${n}) is larger than the population (${N.toLocaleString('en-US')} rows).`, 'INVALID_SELECTION');
  }
  if (n + k > N) {
    throw new TolrateInputError(
      `The sample (${n}) and the spares (${k}) together exceed the population (${N.toLocaleString('en-US')} rows); ` +
        `at most ${N - n} spare${N - n === 1 ? '' : 's'} can be drawn.`,
      'INVALID_SELECTION',
    );
  }
  return { N, n, k };
}

function seedOf(seed: string | undefined): { seed: string; drawn: boolean } {
  return seed === undefined ? { seed: drawSeed(), drawn: true } : { seed: normaliseSeed(seed), drawn: false };
}

/** Random selection without replacement (random-v1). */
export function selectRandom(input: RandomInput): Selection {
  const { N, n, k } = sizes(input);
  const { seed, drawn } = seedOf(input.seed);
  const positions = partialShuffle(new Draws(seed), N, n + k);
  return { method: 'random', algorithm: RANDOM_V1, seed, seedDrawn: drawn, populationSize: N, sampleSize: n, spares: k, positions };
}

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}

function fraction(num: number, den: number): string {
  const g = gcd(num, den);
  return den / g === 1 ? String(num / g) : `${num / g}/${den / g}`;
}

/** floor((u + i·step)/n) exactly, in BigInt when the product could pass 2^53. */
function floorDiv(u: number, i: number, step: number, n: number): number {
  const prod = i * step;
  if (Number.isSafeInteger(prod) && Number.isSafeInteger(prod + u)) return Math.floor((u + prod) / n);
  return Number((BigInt(u) + BigInt(i) * BigInt(step)) / BigInt(n));
}

/** Systematic selection with one or more random starts (systematic-v1). */
export function selectSystematic(input: SystematicInput): Selection {
  const { N, n, k } = sizes(input);
  const r = whole(input.starts ?? 1, 'The number of random starts', 1);
  if (r > n) throw new TolrateInputError(`There cannot be more random starts (${r}) than items (${n}).`, 'INVALID_SELECTION');
  if (n % r !== 0) {
    const lo = n - (n % r);
    const hi = lo + r;
    throw new TolrateInputError(
      `With ${r} random starts the sample size must be a multiple of ${r} (each start gives the same number of items); ` +
        `${n} is not. Use ${lo > 0 ? `${lo} or ` : ''}${hi}, or another number of starts.`,
      'INVALID_SELECTION',
    );
  }
  const { seed, drawn } = seedOf(input.seed);
  const draws = new Draws(seed);
  const step = r * N; // the interval r·N/n, in units of 1/n
  if (!Number.isSafeInteger(step)) throw new TolrateInputError('The population is too large for systematic selection.', 'INVALID_SELECTION');
  const per = n / r;
  const taken = new Set<number>();
  const positions: number[] = [];
  const startUnits: number[] = [];
  const maxTries = 1000 + 100 * r;
  let tries = 0;
  while (startUnits.length < r) {
    if (++tries > maxTries) {
      throw new TolrateInputError(
        `Could not place ${r} random starts whose items do not meet (the interval is ${fraction(step, n)} rows). Use fewer starts.`,
        'INVALID_SELECTION',
      );
    }
    const u = draws.below(step);
    const mine: number[] = [];
    let clash = false;
    for (let i = 0; i < per; i++) {
      const p = floorDiv(u, i, step, n);
      if (taken.has(p)) {
        clash = true;
        break;
      }
      mine.push(p);
    }
    if (clash) continue;
    startUnits.push(u);
    for (const p of mine) {
      taken.add(p);
      positions.push(p);
    }
  }
  // Spares: random from the rows not selected, continuing the same draws.
  if (k > 0) {
    const sorted = [...positions].sort((a, b) => a - b);
    const unselected = (idx: number): number => {
      let x = idx;
      for (const s of sorted) {
        if (s <= x) x++;
        else break;
      }
      return x;
    };
    positions.push(...partialShuffle(draws, N - n, k, unselected));
  }
  return {
    method: 'systematic',
    algorithm: SYSTEMATIC_V1,
    seed,
    seedDrawn: drawn,
    populationSize: N,
    sampleSize: n,
    spares: k,
    positions,
    interval: step / n,
    intervalExact: fraction(step, n),
    starts: startUnits.map((u) => u / n),
    startsExact: startUnits.map((u) => fraction(u, n)),
  };
}

/**
 * Draw again from a recorded method, algorithm id and seed (for re-performance). The result has the
 * positions the algorithm gives today; compare them with the recorded ones. Unknown algorithm ids,
 * a missing seed, and haphazard selections (nothing to draw) are refused with a TolrateInputError.
 */
export function redraw(record: RecordedSelection, populationSize: number): Selection {
  if (!record || typeof record.algorithm !== 'string') {
    throw new TolrateInputError('The selection record has no algorithm id.', 'UNKNOWN_ALGORITHM');
  }
  const id = algorithmId(record.algorithm);
  if (id === 'haphazard-v1') {
    throw new TolrateInputError(
      'A haphazard selection cannot be drawn again: it was chosen by a person. Check its keys against the population instead.',
      'NOT_REDRAWABLE',
    );
  }
  if (id !== 'random-v1' && id !== 'systematic-v1') {
    throw new TolrateInputError(
      `Unknown selection algorithm "${id}". This version of tolrate knows ${ALGORITHM_IDS.join(', ')}.`,
      'UNKNOWN_ALGORITHM',
      ['The selection may have been made with a newer version of tolrate.'],
    );
  }
  const method = id === 'random-v1' ? 'random' : 'systematic';
  if (record.method !== undefined && record.method !== method) {
    throw new TolrateInputError(`The record says method "${record.method}" but algorithm "${id}".`, 'INVALID_SELECTION');
  }
  if (record.seed === undefined) throw new TolrateInputError('The selection record has no seed, so it cannot be drawn again.', 'INVALID_SEED');
  const base = { populationSize, sampleSize: record.sampleSize, spares: record.spares ?? 0, seed: record.seed };
  if (method === 'random') return { ...selectRandom(base), seedDrawn: false };
  const r = Array.isArray(record.starts) ? record.starts.length : (record.starts ?? 1);
  return { ...selectSystematic({ ...base, starts: r }), seedDrawn: false };
}
