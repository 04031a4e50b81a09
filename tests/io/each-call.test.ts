/**
 * ENOSPC, EACCES and EROFS at each file-system call of a real save: the interview's workpaper
 * save, the memo and the fieldwork sheet. The calls are found by tracing a good save first; then
 * each one fails in turn. Before the rename the old file must be untouched and the command must
 * say what to do (exit 2, or in the interview the question what to do next); after it the new
 * file is whole. No temporary file is ever left.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { withFsOps } from '../../src/io/fs.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { captureContext, fixedClock, plannedTest, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';
import { tempFiles, tracing, type Call } from './faults.js';

const CODES = ['ENOSPC', 'EACCES', 'EROFS'] as const;
const ADVICE: Record<string, RegExp> = { ENOSPC: /disk full/, EACCES: /permission denied/, EROFS: /read-only/ };

/** The calls of one write of `target` (its temporary file, itself, its folder), by index in the trace. */
function writeCalls(calls: Call[], target: RegExp): number[] {
  return calls.map((c, i) => ({ c, i })).filter(({ c }) => c.name !== 'closeSync' && target.test(c.path)).map(({ i }) => i);
}

describe('a fault at each call of a write', () => {
  // With fsync, as in use (the suite turns it off for speed).
  let saved: string | undefined;
  beforeEach(() => {
    saved = process.env.TOLRATE_TEST_NO_FSYNC;
    delete process.env.TOLRATE_TEST_NO_FSYNC;
  });
  afterEach(() => {
    if (saved !== undefined) process.env.TOLRATE_TEST_NO_FSYNC = saved;
  });

  it('the fieldwork sheet of select', async () => {
    const dir = tempDir();
    writePopulation(dir);
    const args = ['select', '--population', 'vouchers.csv', '--key', 'voucher', '--size', '20', '--seed', 'x', '--out', 'sheet.csv', '--force'];
    expect(await runCli(args, captureContext(dir, false))).toBe(0);
    const good = readFileSync(join(dir, 'sheet.csv'));
    rmSync(join(dir, 'sheet.csv'));
    const probe = tracing();
    expect(await withFsOps(probe.ops, () => runCli(args, captureContext(dir, false)))).toBe(0);
    const idx = writeCalls(probe.calls, new RegExp(`sheet\\.csv|^${dir}$`));
    expect(idx.length).toBeGreaterThanOrEqual(6);
    const renameAt = probe.calls.findIndex((c) => c.name === 'renameSync');
    for (const code of CODES) {
      for (const i of idx) {
        rmSync(join(dir, 'sheet.csv'), { force: true });
        const t = tracing((c, j) => (j === i ? code : undefined));
        const ctx = captureContext(dir, false);
        const exit = await withFsOps(t.ops, () => runCli(args, ctx));
        if (i > renameAt) {
          expect(exit).toBe(0);
          expect(readFileSync(join(dir, 'sheet.csv')).equals(good)).toBe(true);
        } else {
          expect(exit, `${code} at ${probe.calls[i]!.name}`).toBe(2);
          expect(ctx.err.join('')).toMatch(ADVICE[code]!);
          expect(() => readFileSync(join(dir, 'sheet.csv'))).toThrow();
        }
        expect(tempFiles(dir)).toEqual([]);
      }
    }
  });

  it('the memo', async () => {
    const { dir } = await plannedTest();
    expect(await runCli(['memo', 't1.tolrate.json'], captureContext(dir, false))).toBe(0);
    const memo = join(dir, 't1.memo.docx');
    const before = readFileSync(memo);
    const probe = tracing();
    expect(await withFsOps(probe.ops, () => runCli(['memo', 't1.tolrate.json'], captureContext(dir, false)))).toBe(0);
    const idx = writeCalls(probe.calls, new RegExp(`t1\\.memo\\.docx|^${dir}$`));
    const renameAt = probe.calls.findIndex((c) => c.name === 'renameSync');
    for (const [n, i] of idx.entries()) {
      const code = CODES[n % CODES.length]!;
      copyFileSync(join(dir, 't1.memo.docx'), join(dir, 'keep.docx'));
      const t = tracing((c, j) => (j === i ? code : undefined));
      const ctx = captureContext(dir, false);
      const exit = await withFsOps(t.ops, () => runCli(['memo', 't1.tolrate.json'], ctx));
      if (i > renameAt) expect(exit).toBe(0);
      else {
        expect(exit, `${code} at ${probe.calls[i]!.name}`).toBe(2);
        expect(ctx.err.join('')).toMatch(ADVICE[code]!);
        // The memo written before is kept as it was, byte for byte.
        expect(readFileSync(memo).equals(readFileSync(join(dir, 'keep.docx')))).toBe(true);
      }
      expect(tempFiles(dir)).toEqual([]);
    }
    expect(before.length).toBeGreaterThan(10_000);
  });

  it("the interview's workpaper save", async () => {
    const { dir, file } = await plannedTest();
    const planned = join(dir, 'planned.json');
    copyFileSync(file, planned);
    const answers = { 'record.source': 'type', ...FIELDWORK_ANSWERS, 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms', 'save.failed': 'stop' };
    // The first save of a record sitting, traced: the calls of writing t1.tolrate.json.
    const probe = tracing();
    await withFsOps(probe.ops, () => record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ ...answers, 'record.item.2.A1.result': 'x' }), { now: fixedClock() })).catch(() => undefined);
    const TMP = /t1\.tolrate\.json\.\d+\.[0-9a-f]{8}\.tmp$/;
    const firstRename = probe.calls.findIndex((c) => c.name === 'renameSync' && TMP.test(c.path));
    const tmpOpen = probe.calls.findIndex((c) => c.name === 'openSync' && TMP.test(c.path));
    // The save starts with its check that the file on disk is the one loaded (a read of it).
    const check = probe.calls.slice(0, tmpOpen).map((c) => c.name === 'openSync' && /t1\.tolrate\.json$/.test(c.path)).lastIndexOf(true);
    const idx = writeCalls(probe.calls, /t1\.tolrate\.json\.\d+\.[0-9a-f]{8}\.tmp$|t1\.tolrate\.json$/).filter((i) => i >= check && i <= firstRename);
    expect(idx.length).toBeGreaterThanOrEqual(5);
    for (const code of CODES) {
      for (const i of idx) {
        copyFileSync(planned, file);
        const t = tracing((c, j) => (j === i ? code : undefined));
        const err = await withFsOps(t.ops, () => record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(answers), { now: fixedClock() }).catch((e: unknown) => e));
        expect((err as Error).name, `${code} at ${probe.calls[i]!.name}`).toBe('NotSavedError');
        expect((err as Error).message).toContain('the last answer was not saved');
        expect(readFileSync(file).equals(readFileSync(planned)), `the plan is untouched after ${code} at ${probe.calls[i]!.name}`).toBe(true);
        expect(tempFiles(dir)).toEqual([]);
      }
    }
  });
});
