/**
 * `tolrate record`: typed results over several sittings, voids replaced by spares, results read
 * from the filled fieldwork sheet with every unreadable cell reported, and a file changed
 * outside the tool.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runWith as record } from '../../src/commands/record/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, fixedClock, plannedTest, FIELDWORK_ANSWERS } from '../fixtures/interview.js';
import { fillSheet } from '../fixtures/sheet.js';

/** Typed answers: item 2 void, item 4 an A1 deviation, all else conforms. */
function typed(): ScriptAnswers {
  return {
    'record.source': 'type', ...FIELDWORK_ANSWERS,
    'record.item.*.A1.result': 'conforms',
    'record.item.*.A2.result': 'conforms',
    'record.item.2.A1.result': 'void',
    'record.item.2.void': ['', 'Voucher cancelled before release; marked VOID and never paid.'],
    'record.item.4.A1.result': 'deviation',
    'record.item.4.A1.found': 'Signed twice by the same person.',
    'record.item.4.A1.cause': 'wrong-performer',
    'record.item.4.A1.intent': 'no',
    'record.item.4.A1.pattern': 'isolated',
  };
}

describe('tolrate record', () => {
  it('records typed results in several sittings, resuming at the first unrecorded item', async () => {
    const { dir, file } = await plannedTest();
    const planned = loadWorkpaper(file);
    const n = planned.selection!.sampleSize;
    // First sitting: stop at item 6's first question.
    const probe = new ScriptedAsker(typed());
    await record(['t1.tolrate.json'], captureContext(dir), probe, { now: fixedClock() }).catch(() => undefined);
    const stopAt = probe.ids.indexOf('record.item.6.A1.result');
    expect(stopAt).toBeGreaterThan(0);
    // The probe above recorded everything; start again from the plan for the sittings.
    const fresh = await plannedTest();
    const s1 = new ScriptedAsker(typed(), { stopAt });
    await expect(record(['t1.tolrate.json'], captureContext(fresh.dir), s1, { now: fixedClock() })).rejects.toMatchObject({ name: 'ExitPromptError' });
    const mid = loadWorkpaper(fresh.file);
    const done = mid.results!.items.filter((r) => r.void || Object.keys(r.attributes).length === 2).map((r) => r.seq);
    // In the order tested: the spare follows the voided item it replaces.
    expect(done).toEqual([1, 2, n + 1, 3, 4, 5]);
    // One log entry per item recorded (the placeholders for the other items are written with the first).
    expect(mid.log.filter((e) => e.step === 'record')).toHaveLength(done.length);

    const s2 = new ScriptedAsker(typed());
    const ctx = captureContext(fresh.dir);
    expect(await record(['t1.tolrate.json'], ctx, s2, { now: fixedClock() })).toBe(0);
    expect(s2.ids.filter((i) => i.startsWith('record.item.'))[0]).toBe('record.item.6.A1.result');
    expect(ctx.text()).toMatch(/6 recorded so far, continuing at item PV-\d+/);
    const wp = loadWorkpaper(fresh.file);
    expect(verifyLog(wp)).toEqual([]);
    const items = wp.results!.items;
    const spare = planned.selection!.items.find((i) => i.seq === n + 1)!;
    // Item 2 is void and replaced by the first spare, which is tested in its place.
    const item2 = items.find((r) => r.seq === 2)!;
    const key2 = wp.selection!.items.find((i) => i.seq === 2)!.key;
    expect(item2.void).toEqual({ reason: 'Voucher cancelled before release; marked VOID and never paid.', replacedBy: wp.selection!.items.find((i) => i.seq === n + 1)!.key });
    expect(items.find((r) => r.seq === n + 1)).toMatchObject({ replaces: key2, attributes: { A1: { result: 'conforms' }, A2: { result: 'conforms' } } });
    expect(spare.role).toBe('spare');
    expect(items.find((r) => r.seq === 4)!.attributes.A1).toEqual({ result: 'deviation', found: 'Signed twice by the same person.', cause: 'wrong-performer', intentional: 'no', pattern: 'isolated' });
    expect(items.filter((r) => !r.void)).toHaveLength(n);
    expect(s1.refusals.concat(s2.refusals).map((r) => r.message)).toContain('The reason must not be empty.');
    expect(ctx.text()).toMatch(/A1\s+\d+\s+1/);
  });

  it('reads the filled sheet, reports every unreadable cell without guessing, and re-reads after a fix', async () => {
    const { dir, file } = await plannedTest();
    const wp0 = loadWorkpaper(file);
    const n = wp0.selection!.sampleSize;
    const sheet = join(dir, 't1.fieldwork.csv');
    const filled = join(dir, 'filled.csv');
    const good = { 'A1 result': 'C', 'A2 result': 'C' };
    const bad: Record<number, Record<string, string>> = {
      3: { 'A1 result': 'X', 'A2 result': 'C' },
      5: { 'A1 result': 'D', 'A1 found': 'One signature only', 'A1 cause': 'forgot', 'A1 intent': '', 'A1 pattern': 'isolated', 'A2 result': 'C' },
      7: { 'A1 result': 'C', 'A1 found': 'looked fine', 'A2 result': 'C' },
      8: { 'A1 result': 'V', 'A2 result': 'V', 'Void reason': '' },
      9: { 'A1 result': 'C' },
    };
    fillSheet(sheet, filled, bad, good);
    const fixed = (): void =>
      fillSheet(sheet, filled, {
        5: { 'A1 result': 'D', 'A1 found': 'One signature only', 'A1 cause': 'Control not performed', 'A1 intent': 'no', 'A1 pattern': 'isolated', 'A2 result': 'C' },
        7: { 'A1 result': 'C', 'A2 result': 'ok' },
        8: { 'A1 result': 'V', 'A2 result': '', 'Void reason': 'Cancelled voucher' },
        9: { 'A1 result': 'conforms', 'A2 result': 'C' },
        [n + 1]: { 'A1 result': 'C', 'A2 result': 'C' },
      }, good);
    const asker = new ScriptedAsker(
      {
        'record.source': 'sheet',
        'record.sheet.path': ['nothere.csv', 'filled.csv'],
        'record.sheet.problems.1': 'type',
        ...FIELDWORK_ANSWERS,
        'record.item.3.A1.result': 'conforms',
        'record.item.3.A2.result': 'conforms',
        'record.sheet.problems.2': 'reread',
      },
      { onAsk: (r) => (r.id === 'record.sheet.problems.2' ? fixed() : undefined) },
    );
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, asker, { now: fixedClock() })).toBe(0);
    const out = ctx.text();
    expect(asker.refusals[0]!.message).toBe(`The sheet: there is no file at ${join(dir, 'nothere.csv')}.`);
    // Every unreadable cell, by row (header = row 1), column, value and why.
    const row = (seq: number) => String(seq + 1);
    const expectLine = (seq: number, column: string, value: string, why: string) =>
      expect(out).toMatch(new RegExp(`\\n\\s+${row(seq)}\\s+${column.replace(/[[\]/]/g, '\\$&')}\\s+${value.replace(/[()]/g, '\\$&')}\\s+${why.slice(0, 30).replace(/[()]/g, '\\$&')}`));
    expectLine(3, 'A1 result [C/D/V]', 'X', 'not a result: write C (conforms), D (deviation) or V (void)');
    expectLine(5, 'A1 cause [code]', 'forgot', 'not a cause: write one of not-performed');
    expectLine(5, 'A1 intent [no/suspected/yes]', '(blank)', 'say whether the deviation looks intentional');
    expectLine(7, 'A1 found', 'looked fine', 'filled for an item that conforms');
    expectLine(8, 'Void reason', '(blank)', 'a void item needs the reason');
    expectLine(9, 'A2 result [C/D/V]', '(blank)', 'blank: no result entered');
    expect(out).toContain('Read 2 item(s) from filled.csv.');
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.results!.source).toBe('sheet');
    expect(wp.results!.sheetPath).toBe('filled.csv');
    const r = (seq: number) => wp.results!.items.find((x) => x.seq === seq)!;
    expect(r(3).attributes).toEqual({ A1: { result: 'conforms' }, A2: { result: 'conforms' } });
    expect(r(5).attributes.A1).toEqual({ result: 'deviation', found: 'One signature only', cause: 'not-performed', intentional: 'no', pattern: 'isolated' });
    expect(r(8).void!.reason).toBe('Cancelled voucher');
    expect(r(n + 1).replaces).toBe(r(8).key);
    // Who tested each item, when and on what evidence: from the sheet's columns, or typed (item 3:
    // the defaults, the preparer and today).
    expect({ by: r(5).testedBy, on: r(5).testedOn, evidence: r(5).evidence }).toEqual({ by: 'T. Tester', on: '2026-01-20', evidence: [{ ref: `voucher ${r(5).key}` }] });
    expect({ by: r(3).testedBy, on: r(3).testedOn, evidence: r(3).evidence }).toEqual({ by: wp.engagement!.preparer, on: '2026-01-20', evidence: [{ ref: 'voucher file' }] });
    expect(r(8).testedBy).toBeUndefined();
    expect(wp.results!.items.filter((x) => !x.void)).toHaveLength(n);
  });

  it('a workpaper changed outside the tool: the differences are named and a reason is asked', async () => {
    const { dir, file } = await plannedTest();
    const raw = JSON.parse(readFileSync(file, 'utf8'));
    raw.engagement.reference = 'C-9.9';
    raw.approach.rationale = 'edited by hand';
    writeFileSync(file, JSON.stringify(raw, null, 2));
    const before = readFileSync(file, 'utf8');

    const no = new ScriptedAsker({ 'open.outsideChanges.continue': false });
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, no, { now: fixedClock() })).toBe(1);
    expect(ctx.text()).toContain('t1.tolrate.json was changed outside tolrate since it was last saved:');
    expect(ctx.text()).toContain('engagement.reference: was changed outside tolrate: the log says "C-3.1", the file has "C-9.9"');
    expect(ctx.text()).toContain('approach.rationale: was changed outside tolrate');
    expect(readFileSync(file, 'utf8')).toBe(before);

    const yes = new ScriptedAsker({ 'open.outsideChanges.continue': true, 'open.outsideChanges.reason': ['', 'Reference renumbered by the reviewer.'], 'record.source': 'later' });
    expect(await record(['t1.tolrate.json'], captureContext(dir), yes, { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    const last = wp.log[wp.log.length - 1]!;
    expect(last.step).toBe('accept-outside-changes');
    expect(last.reason).toBe('Changes made outside tolrate accepted: Reference renumbered by the reviewer.');
    expect(last.changes.map((c) => c.path.join('.')).filter((p) => p !== 'updatedAt').sort()).toEqual(['approach.rationale', 'engagement.reference']);
  });

  it('needs a finished plan, and names the next step', async () => {
    const { dir, file } = await plannedTest();
    const raw = JSON.parse(readFileSync(file, 'utf8'));
    const ctx = captureContext(dir);
    // A workpaper without a selection (planning stopped before it): exit 2 through the CLI.
    const { loadWorkpaper: load, saveWorkpaper } = await import('../../src/workpaper/file.js');
    const wp = load(file);
    const { selection: _s, ...rest } = wp;
    saveWorkpaper(file, rest as typeof wp, { by: 'T. Preparer', step: 'test' });
    const code = await runCli(['record', 't1.tolrate.json'], { ...ctx, isTTY: true });
    expect(code).toBe(2);
    expect(ctx.err.join('')).toContain('The plan is not finished (next: Selection)');
    expect(raw.selection).toBeDefined();
  });
});
