import { describe, expect, it } from 'vitest';
import { table } from '../../src/interview/show.js';

describe('plain-text tables', () => {
  it('align numbers right and text left', () => {
    expect(table(['Item', 'n'], [['A1', '77'], ['A22', '5']])).toEqual(['  Item   n', '  ----  --', '  A1    77', '  A22    5']);
  });

  it('wrap a long last column instead of running past the width', () => {
    const why = 'a deviation needs a cause: not-performed, performed-late, wrong-performer, evidence-missing, system, other';
    const out = table(['Sheet row', 'Column', 'Why'], [['32', 'A2 cause [code]', why]], '  ', 60);
    for (const l of out) expect(l.length).toBeLessThanOrEqual(60);
    expect(out.length).toBeGreaterThan(3);
    expect(out.slice(2).map((l) => l.slice(2 + 9 + 2 + 15 + 2)).join(' ').replace(/\s+/g, ' ').trim()).toBe(why);
    expect(out[3]!.startsWith(' '.repeat(2 + 9 + 2 + 15 + 2))).toBe(true);
  });
});
