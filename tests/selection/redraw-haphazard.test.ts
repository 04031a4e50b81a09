import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import type { KeyLookup } from '../../src/population/index.js';
import { HAPHAZARD_NOTE, recordHaphazard, redraw, selectRandom, selectSystematic } from '../../src/selection/index.js';

describe('redraw', () => {
  it('re-derives random and systematic selections from their record', () => {
    const r = selectRandom({ populationSize: 5000, sampleSize: 40, spares: 4, seed: 'wp-2024-17' });
    // A record as a workpaper keeps it (JSON round trip, extra fields ignored).
    const rec = JSON.parse(JSON.stringify({ ...r, items: [] }));
    expect(redraw(rec, 5000).positions).toEqual(r.positions);
    const s = selectSystematic({ populationSize: 5000, sampleSize: 40, starts: 4, spares: 2, seed: '7' });
    expect(redraw({ method: 'systematic', algorithm: s.algorithm, seed: '7', sampleSize: 40, spares: 2, starts: s.starts }, 5000).positions).toEqual(s.positions);
    expect(redraw({ algorithm: 'systematic-v1', seed: '7', sampleSize: 40, spares: 2, starts: 4 }, 5000).positions).toEqual(s.positions);
  });

  it('draws differently from a different population size (the reviewer sees the difference)', () => {
    const r = selectRandom({ populationSize: 5000, sampleSize: 10, seed: 'a' });
    expect(redraw(r, 5001).positions).not.toEqual(r.positions);
  });

  it('refuses unknown algorithms, missing seeds, mismatched methods and haphazard records', () => {
    expect(() => redraw({ algorithm: 'random-v9: future', seed: '1', sampleSize: 1 }, 10)).toThrow(/Unknown selection algorithm "random-v9"/);
    try {
      redraw({ algorithm: 'shuffle', seed: '1', sampleSize: 1 }, 10);
    } catch (e) {
      expect(e).toBeInstanceOf(TolrateInputError);
      expect((e as TolrateInputError).code).toBe('UNKNOWN_ALGORITHM');
    }
    expect(() => redraw({ algorithm: 'random-v1', sampleSize: 1 }, 10)).toThrow(/no seed/);
    expect(() => redraw({ method: 'systematic', algorithm: 'random-v1', seed: '1', sampleSize: 1 }, 10)).toThrow(TolrateInputError);
    expect(() => redraw({ method: 'haphazard', algorithm: 'haphazard-v1', sampleSize: 1 }, 10)).toThrow(/cannot be drawn again/);
  });
});

describe('recordHaphazard', () => {
  const lookup: KeyLookup = {
    found: [
      { position: 4, row: 6, key: 'INV-5', values: {} },
      { position: 0, row: 2, key: 'INV-1', values: {} },
      { position: 9, row: 11, key: 'INV-10', values: {} },
    ],
    unknown: ['INV-99'],
    repeated: ['INV-5'],
    blankEntries: 0,
    ambiguous: [],
    rowCount: 12,
  };

  it('records who chose, how, the positions in list order, the caution, and the list problems', () => {
    const h = recordHaphazard({ lookup, selectedBy: 'R. Tester', how: 'one from each month of the printed listing', sampleSize: 2 });
    expect(h.selection).toMatchObject({
      method: 'haphazard',
      populationSize: 12,
      sampleSize: 2,
      spares: 1,
      positions: [4, 0, 9],
      haphazard: { selectedBy: 'R. Tester', how: 'one from each month of the printed listing' },
      note: HAPHAZARD_NOTE,
    });
    expect(h.selection.seed).toBeUndefined();
    // The trade's rule (common practice; ISA 530 / AU-C 530): a haphazard selection cannot support
    // a statistical conclusion and its sampling risk cannot be measured.
    expect(HAPHAZARD_NOTE).toMatch(/sampling risk cannot be quantified/);
    expect(HAPHAZARD_NOTE).toMatch(/cannot support a statistical conclusion/);
    expect(h.ok).toBe(false);
    expect(h.problems).toEqual([
      '1 listed key is not in the population: "INV-99".',
      '1 key is listed more than once (kept once): "INV-5".',
    ]);
    expect(h.keys).toEqual(['INV-5', 'INV-1', 'INV-10']);
  });

  it('needs who and how, and at least one key found', () => {
    expect(() => recordHaphazard({ lookup, selectedBy: ' ', how: 'x' })).toThrow(/who chose/);
    expect(() => recordHaphazard({ lookup, selectedBy: 'x', how: '' })).toThrow(/how the haphazard items/);
    expect(() => recordHaphazard({ lookup: { ...lookup, found: [] }, selectedBy: 'x', how: 'y' })).toThrow(/None of the listed keys/);
    expect(() => recordHaphazard({ lookup, selectedBy: 'x', how: 'y', sampleSize: 4 })).toThrow(/between 1 and the 3 items found/);
  });
});
