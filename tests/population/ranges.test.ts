import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { TolrateInputError } from '../../src/errors.js';
import { findKeys, readRowsAt, scanPopulation, type RangesSource } from '../../src/population/index.js';

const src = (ranges: string, exclusions?: string[]): RangesSource => ({ kind: 'ranges', ranges, ...(exclusions ? { exclusions } : {}) });

describe('document-number ranges', () => {
  it('counts the numbers less the exclusions and hashes a canonical text', async () => {
    const s = await scanPopulation(src('40001-52650,60001-61200', ['40017,40233']));
    // 12,650 + 1,200 numbers, less the two voided ones (arithmetic).
    expect(s.fingerprint).toMatchObject({ rowCount: 13_848, firstKey: '40001', lastKey: '61200', format: 'ranges', excludedCount: 2 });
    const canonical = 'tolrate population: document-number ranges, v1\nranges: 40001-52650,60001-61200\nexcluded: 40017,40233\n';
    expect(s.fingerprint.canonical).toBe(canonical);
    expect(s.fingerprint.sha256).toBe(createHash('sha256').update(canonical).digest('hex'));
    expect(s.validation.ok).toBe(true);
  });

  it('gives the same population however the same numbers are typed', async () => {
    const a = await scanPopulation(src('40001-52650,60001-61200', ['40017,40233']));
    const b = await scanPopulation(src(' 60001 - 61200 ; 40001-45000, 45001-52650', ['40233', '40017', '40017']));
    expect(b.fingerprint.sha256).toBe(a.fingerprint.sha256);
    expect(b.validation.notes).toEqual(['1 excluded number was listed more than once.']);
    const rows = await readRowsAt(src('60001-61200,40001-52650', ['40017,40233']), [0, 15, 16, 12_647, 12_648, 13_847]);
    expect(rows.map((r) => [r.position, r.row, r.key])).toEqual([
      [0, 1, '40001'],
      [15, 16, '40016'],
      [16, 17, '40018'], // 40017 is voided
      [12_647, 12_648, '52650'],
      [12_648, 12_649, '60001'],
      [13_847, 13_848, '61200'],
    ]);
    expect(rows[0]!.values).toEqual({ 'document number': '40001' });
  });

  it('accepts ranges of excluded numbers and keeps zero-padded keys', async () => {
    const s = await scanPopulation(src('000100-000120', ['105-109']));
    expect(s.fingerprint).toMatchObject({ rowCount: 16, firstKey: '000100', lastKey: '000120', excludedCount: 5 });
    const r = await readRowsAt(src('000100-000120', ['105-109']), [5]);
    expect(r[0]!.key).toBe('000110');
  });

  it('reports overlapping ranges as duplicate keys and exclusions outside every range', async () => {
    const s = await scanPopulation(src('1-10,8-12', ['11', '50-52']));
    expect(s.fingerprint.rowCount).toBe(14);
    expect(s.validation.ok).toBe(false);
    expect(s.validation.duplicateKeys).toMatchObject({ count: 3, rows: 6 });
    expect(s.validation.duplicateKeys.examples[0]).toEqual({ key: '8', occurrences: 2, rows: [8, 11] });
    expect(s.validation.messages).toContain('Exclusions outside every range: 50-52. Check the numbers.');
  });

  it('an all-excluded range is an empty population', async () => {
    const s = await scanPopulation(src('5-6', ['5,6']));
    expect(s.validation).toMatchObject({ ok: false, emptyPopulation: true });
  });

  it('refuses text that is not ranges', async () => {
    await expect(scanPopulation(src('40001-3'))).rejects.toThrow(/runs backwards/);
    await expect(scanPopulation(src('INV1-INV9'))).rejects.toBeInstanceOf(TolrateInputError);
    await expect(scanPopulation(src(''))).rejects.toThrow(/No document-number ranges/);
    await expect(readRowsAt(src('1-3'), [3])).rejects.toThrow(/beyond the population/);
  });

  it('finds numbers by key', async () => {
    const r = await findKeys(src('40001-40100', ['40017']), ['40018', '40017', '99', 'x', '40018']);
    expect(r.found.map((f) => [f.key, f.position])).toEqual([['40018', 16]]);
    expect(r.unknown).toEqual(['40017', '99', 'x']);
    expect(r.repeated).toEqual(['40018']);
  });
});
