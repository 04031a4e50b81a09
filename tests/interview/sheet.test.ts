import { describe, expect, it } from 'vitest';
import { parseResultsSheet, readCause, resultColumns } from '../../src/interview/sheet-results.js';
import type { Attribute, SelectedItem } from '../../src/workpaper/schema.js';

const attrs: Attribute[] = [{ id: 'A1', description: 'd', deviationDefinition: 'x' }];
const items: SelectedItem[] = [1, 2, 3].map((seq) => ({ seq, role: seq < 3 ? 'sample' : 'spare', position: seq * 10, row: seq * 10 + 1, key: `K${seq}`, values: {} }));
const header = ['Seq', 'Role', 'Row', 'Key', ...resultColumns(attrs), 'Note'].join(',');

function sheet(...rows: string[]): string {
  return `\uFEFF${header}\r\n${rows.join('\r\n')}\r\n`;
}

describe('reading the filled fieldwork sheet', () => {
  it('reads results by the column conventions; formula-guarded cells are restored', () => {
    const r = parseResultsSheet(
      sheet(
        `1,sample,11,K1,c,,,,,,`,
        `2,sample,21,K2,Deviation,'-missing signature,Performed late,Suspected,systemic,,`,
        `3,spare,31,K3,,,,,,,`,
      ),
      items,
      attrs,
    );
    expect(r.problems).toEqual([]);
    expect(r.items.get(1)!.attributes.A1).toEqual({ result: 'conforms' });
    expect(r.items.get(2)!.attributes.A1).toEqual({ result: 'deviation', found: '-missing signature', cause: 'performed-late', intentional: 'suspected', pattern: 'systemic' });
    expect(r.items.get(3)!.blank).toBe(true);
  });

  it('names rows that do not belong, and columns that are missing', () => {
    const r = parseResultsSheet(sheet(`1,sample,11,K9,C,,,,,,`, `7,sample,71,K7,C,,,,,,`, `2,sample,21,K2,C,,,,,,`, `2,sample,21,K2,C,,,,,,`), items, attrs);
    expect(r.problems).toEqual([
      { row: 2, column: 'Key', value: 'K9', why: 'item 1 is K1 in the workpaper' },
      { row: 3, column: 'Seq', value: '7', why: 'no selected item has this number' },
      { row: 5, column: 'Seq', value: '2', why: 'item 2 appears twice (first at row 4)' },
    ]);
    const m = parseResultsSheet('Seq,Key,A1 result\n1,K1,C\n', items, attrs);
    expect(m.problems.map((p) => p.column)).toEqual(['A1 found', 'A1 cause [code]', 'A1 intent [no/suspected/yes]', 'A1 pattern [isolated/systemic/unclear]', 'Void reason']);
    expect(m.problems.every((p) => p.row === 1 && p.why === 'this column is missing from the header')).toBe(true);
  });

  it('a void is the whole item; a tested attribute beside it is refused', () => {
    const r = parseResultsSheet(
      'Seq,Key,A1 result,A1 found,A1 cause,A1 intent,A1 pattern,A2 result,A2 found,A2 cause,A2 intent,A2 pattern,Void reason\n1,K1,V,,,,,C,,,,,Cancelled\n',
      items,
      [...attrs, { id: 'A2', description: 'e', deviationDefinition: 'y' }],
    );
    expect(r.items.get(1)!.problems.map((p) => [p.column, p.why.slice(0, 40)])).toEqual([['A2 result', 'the item is marked void in another colum']]);
    expect(readCause('evidence missing')).toBe('evidence-missing');
    expect(readCause('Wrong or unauthorised performer')).toBe('wrong-performer');
    expect(readCause('lost')).toBeUndefined();
  });
});
