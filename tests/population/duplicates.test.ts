/**
 * Duplicate keys: the count, the rows involved and the first examples with their rows, found
 * exactly whatever the number of repeated keys. The expected figures are counted here with a
 * plain Map over the same keys (the obvious way, common practice, no single source).
 */
import { join } from 'node:path';
import { writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { scanPopulation } from '../../src/population/index.js';
import { Candidates, DuplicateCollector, H, hashString, KeyHashes, mergeDuplicates, utf8Of } from '../../src/population/key-index.js';
import { tempDir } from './helpers.js';

const { dir } = tempDir('tolrate-dup-');

/** The figures as a Map gives them: keys on more than one line, their lines, the first 10 by first line. */
function expected(keys: string[], firstLine: number) {
  const m = new Map<string, number[]>();
  keys.forEach((k, i) => {
    if (k === '') return;
    const l = m.get(k) ?? [];
    l.push(i + firstLine);
    m.set(k, l);
  });
  const dups = [...m].filter(([, l]) => l.length > 1);
  return {
    count: dups.length,
    rows: dups.reduce((s, [, l]) => s + l.length, 0),
    examples: dups
      .sort((a, b) => a[1][0]! - b[1][0]!)
      .slice(0, 10)
      .map(([key, l]) => ({ key, occurrences: l.length, rows: l.slice(0, 5) })),
  };
}

describe('duplicate keys', () => {
  it('every key twice: all counted, the first ten shown with their lines', async () => {
    const n = 20_000;
    const keys: string[] = [];
    for (let i = 0; i < n; i++) keys.push(`K-${(i * 7919) % (n / 2)}`);
    keys[5] = ' K-5 '; // the same key with spaces around it (keys are trimmed)
    keys.push('K-0', 'K-0', 'K-0', 'K-0', 'K-0'); // one key seven times: five lines are shown
    const path = join(dir, 'twice.csv');
    writeFileSync(path, `id,amount\n${keys.map((k) => `"${k}",1`).join('\n')}\n`);
    const s = await scanPopulation({ kind: 'csv', path, keyColumn: 'id' });
    const want = expected(keys.map((k) => k.trim()), 2);
    expect(want.count).toBe(n / 2 - 1); // K-9595 lost its second line to " K-5 "
    expect(s.validation.duplicateKeys).toEqual(want);
    expect(s.validation.messages[0]).toMatch(/^9,999 keys appear on more than one row \(20,004 rows in all\): "K-0" ×7 \(lines 2, /);
  });

  it('the parts of a confirming pass give the same result as one pass', () => {
    const keys = Array.from({ length: 3000 }, (_, i) => `key ${i % 1000}${i % 3 === 0 ? '' : 'x'}`);
    const hashes = new KeyHashes();
    for (const k of keys) {
      hashString(k);
      hashes.addCurrent(Buffer.byteLength(k));
    }
    const cands = hashes.candidates();
    // As the confirming pass does it: one collector, reset for each part.
    const run = (parts: number) => {
      const dc = new DuplicateCollector(cands, 0, parts);
      return mergeDuplicates(
        Array.from({ length: parts }, (_, part) => {
          if (part > 0) dc.reset(part);
          keys.forEach((k, i) => {
            const [b, len] = utf8Of(k);
            hashString(k);
            dc.offerCurrent(b, 0, len, i + 1);
          });
          return dc.result();
        }),
      );
    };
    const one = run(1);
    expect(one).toEqual(expected(keys, 1));
    expect(run(7)).toEqual(one);
  });

  it('different keys that share a hash are not taken for one key', () => {
    // Force one hash on two different keys, as a collision would.
    const hashes = new KeyHashes();
    const same = () => {
      H.hi = 0x12345678;
      H.lo = 0x9abcdef0;
    };
    same();
    hashes.addCurrent(1);
    same();
    hashes.addCurrent(1);
    const cands: Candidates = hashes.candidates();
    expect(cands.size).toBe(1);
    const dc = new DuplicateCollector(cands);
    for (const [k, row] of [['A', 1], ['B', 2]] as const) {
      same();
      dc.offerCurrent(Buffer.from(k), 0, 1, row);
    }
    expect(dc.result()).toEqual({ count: 0, rows: 0, examples: [] });
    same();
    dc.offerCurrent(Buffer.from('B'), 0, 1, 3);
    expect(dc.result()).toEqual({ count: 1, rows: 2, examples: [{ key: 'B', occurrences: 2, rows: [2, 3] }] });
  });
});
