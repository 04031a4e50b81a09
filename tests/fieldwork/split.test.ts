/**
 * Testing split between people: `record` reads several filled sheets (one per tester) and merges
 * them. An item with different results on two sheets is refused with both values and both files
 * named; nothing is guessed.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runWith as record } from '../../src/commands/record/index.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, fixedClock, plannedTest } from '../fixtures/interview.js';
import { fillSheet, type Fill } from '../fixtures/sheet.js';

describe('two testers, two sheets', () => {
  it('merges the sheets; an item filled differently on both is refused with both values and files, then read once corrected', async () => {
    const { dir, file } = await plannedTest();
    const wp0 = loadWorkpaper(file);
    const n = wp0.selection!.sampleSize;
    const sheet = join(dir, wp0.selection!.fieldworkSheet!);
    const part = (tester: string, odd: boolean, extra: Record<number, Fill> = {}) => {
      const cells: Record<number, Fill> = {};
      for (let seq = 1; seq <= n; seq++) {
        if ((seq % 2 === 1) === odd) cells[seq] = { 'A1 result': 'C', 'A2 result': 'C', 'Tested by': tester };
      }
      return { ...cells, ...extra };
    };
    // A. Achebe tests the odd items, B. Brandt the even ones; both filled item 3, with different A1 results.
    const deviation: Fill = { 'A1 result': 'D', 'A1 found': 'No signature', 'A1 cause': 'not-performed', 'A1 intent': 'no', 'A1 pattern': 'isolated', 'A2 result': 'C', 'Tested by': 'A. Achebe' };
    fillSheet(sheet, join(dir, 'achebe.csv'), part('A. Achebe', true));
    fillSheet(sheet, join(dir, 'brandt.csv'), part('B. Brandt', false, { 3: deviation }));
    const ctx = captureContext(dir);
    const asker = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'achebe.csv; brandt.csv', 'record.sheet.problems.1': 'stop' });
    await record(['t1.tolrate.json'], ctx, asker, { now: fixedClock() });
    const out = ctx.text().replace(/\s+/g, ' ');
    expect(out).toContain('Read 2 item(s) from achebe.csv; brandt.csv.');
    expect(out).toContain(`item 3 (${wp0.selection!.items[2]!.key}) differs between two sheets in A1 result: "C" in achebe.csv row 4, "D (No signature; not-performed; no; isolated)" in brandt.csv row 4`);
    // Nothing was taken for item 3.
    expect(loadWorkpaper(file).results!.items.find((r) => r.seq === 3)!.attributes).toEqual({});

    // B. Brandt clears the row she filled by mistake: the two sheets merge.
    fillSheet(sheet, join(dir, 'brandt.csv'), part('B. Brandt', false));
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': '' }), { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.results!.sheetPaths).toEqual(['achebe.csv', 'brandt.csv']);
    expect(wp.results!.items.filter((r) => r.seq <= n).map((r) => r.testedBy)).toEqual(Array.from({ length: n }, (_, i) => (i % 2 === 0 ? 'A. Achebe' : 'B. Brandt')));
  });

  it('the same item filled the same on two sheets is read once', async () => {
    const { dir, file } = await plannedTest();
    const wp0 = loadWorkpaper(file);
    const sheet = join(dir, wp0.selection!.fieldworkSheet!);
    fillSheet(sheet, join(dir, 'a.csv'), {}, { 'A1 result': 'C', 'A2 result': 'C' });
    fillSheet(sheet, join(dir, 'b.csv'), { 1: { 'A1 result': 'C', 'A2 result': 'C' } });
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'a.csv;b.csv' }), { now: fixedClock() })).toBe(0);
    expect(loadWorkpaper(file).results!.items.filter((r) => Object.keys(r.attributes).length === 2)).toHaveLength(wp0.selection!.sampleSize);
  });
});
