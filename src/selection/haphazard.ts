import { TolrateInputError } from '../errors.js';
import type { KeyLookup } from '../population/types.js';
import { HAPHAZARD_V1 } from './select.js';
import type { Selection } from './types.js';

export const HAPHAZARD_NOTE =
  'Haphazard selection: the items were chosen by a person, not drawn at random, so sampling risk ' +
  'cannot be quantified and the results cannot support a statistical conclusion.';

export interface HaphazardInput {
  /** The practitioner's list checked against the population (from findKeys). */
  lookup: KeyLookup;
  /** Who chose the items. */
  selectedBy: string;
  /** How they were chosen (e.g. "picked across the months from the printed listing"). */
  how: string;
  /** How many of the listed items form the sample; the rest, in list order, are spares. Default: all. */
  sampleSize?: number;
}

export interface HaphazardRecord {
  selection: Selection;
  /** The keys kept, in order (sample, then spares). */
  keys: string[];
  /** Problems with the list: unknown keys, keys listed twice, keys the population holds twice. */
  problems: string[];
  ok: boolean;
}

/**
 * Record a haphazard selection: the keys the practitioner listed, as found in the population,
 * with who chose them and how, and the caution that it cannot support a statistical conclusion.
 * Problems with the list are reported, not fixed; the caller decides whether to go on.
 */
export function recordHaphazard(input: HaphazardInput): HaphazardRecord {
  const selectedBy = String(input.selectedBy ?? '').trim();
  const how = String(input.how ?? '').trim();
  if (!selectedBy) throw new TolrateInputError('Say who chose the haphazard items.', 'INVALID_SELECTION');
  if (!how) throw new TolrateInputError('Say how the haphazard items were chosen.', 'INVALID_SELECTION');
  const { lookup } = input;
  if (lookup.found.length === 0) {
    throw new TolrateInputError(
      lookup.unknown.length
        ? `None of the listed keys is in the population (e.g. ${lookup.unknown.slice(0, 3).map((k) => JSON.stringify(k)).join(', ')}).`
        : 'The list of keys is empty.',
      'INVALID_SELECTION',
    );
  }
  const n = input.sampleSize ?? lookup.found.length;
  if (!Number.isSafeInteger(n) || n < 1 || n > lookup.found.length) {
    throw new TolrateInputError(
      `The sample size must be between 1 and the ${lookup.found.length} items found; got ${String(input.sampleSize)}.`,
      'INVALID_SELECTION',
    );
  }
  const problems: string[] = [];
  const list = (xs: string[]) => xs.slice(0, 10).map((k) => JSON.stringify(k)).join(', ') + (xs.length > 10 ? ', ...' : '');
  if (lookup.unknown.length) problems.push(`${lookup.unknown.length} listed key${lookup.unknown.length === 1 ? ' is' : 's are'} not in the population: ${list(lookup.unknown)}.`);
  if (lookup.repeated.length) problems.push(`${lookup.repeated.length} key${lookup.repeated.length === 1 ? ' is' : 's are'} listed more than once (kept once): ${list(lookup.repeated)}.`);
  if (lookup.ambiguous.length) {
    problems.push(
      `${lookup.ambiguous.length} listed key${lookup.ambiguous.length === 1 ? ' is' : 's are'} held by more than one row (the first row was taken): ` +
        lookup.ambiguous.slice(0, 10).map((a) => `${JSON.stringify(a.key)} (rows ${a.rows.join(', ')})`).join('; ') + '.',
    );
  }
  return {
    selection: {
      method: 'haphazard',
      algorithm: HAPHAZARD_V1,
      populationSize: lookup.rowCount,
      sampleSize: n,
      spares: lookup.found.length - n,
      positions: lookup.found.map((r) => r.position),
      haphazard: { selectedBy, how },
      note: HAPHAZARD_NOTE,
    },
    keys: lookup.found.map((r) => r.key),
    problems,
    ok: problems.length === 0,
  };
}
