/**
 * Environment errors are the environment's, not bugs: a full disk, a folder without write
 * permission, a read-only file system, in `select`, `demo --out`, `memo` and the interview each
 * give a message saying what to do and exit 2 (the case found: "internal error ... This is a bug
 * in tolrate", exit 70, and the typed answer lost). Simulated through src/io/fs.ts, so no root
 * is needed; tests/io/tmpfs.test.ts does the same on a real small disk.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { withFsOps } from '../../src/io/fs.js';
import { lockPathFor } from '../../src/io/lock.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { captureContext, fixedClock, plannedTest, tempDir, writePopulation } from '../fixtures/interview.js';
import { tracing, tempFiles } from './faults.js';

const ADVICE: Record<string, RegExp> = { ENOSPC: /disk full/, EACCES: /permission denied/, EROFS: /read-only/ };

/** Fail every write call (open of a new file, or write) under `dir` with `code`. */
function failWrites(code: string, at: 'openSync' | 'writeSync' | 'renameSync', match: RegExp) {
  return tracing((c) => (c.name === at && match.test(c.path) ? code : undefined));
}

describe('environment errors give a message and exit 2', () => {
  for (const code of ['ENOSPC', 'EACCES', 'EROFS']) {
    it(`select: ${code} writing the fieldwork sheet`, async () => {
      const dir = tempDir();
      writePopulation(dir);
      const ctx = captureContext(dir, false);
      const f = failWrites(code, code === 'ENOSPC' ? 'writeSync' : 'openSync', /sheet\.csv/);
      const exit = await withFsOps(f.ops, () => runCli(['select', '--population', 'vouchers.csv', '--key', 'voucher', '--size', '20', '--seed', 'x', '--out', 'sheet.csv'], ctx));
      expect(exit).toBe(2);
      expect(ctx.err.join('')).toMatch(ADVICE[code]!);
      expect(ctx.err.join('')).not.toContain('internal error');
      expect(existsSync(join(dir, 'sheet.csv'))).toBe(false);
      expect(tempFiles(dir)).toEqual([]);
    });

    it(`demo --out: ${code} at the first file written`, async () => {
      const dir = tempDir();
      const ctx = captureContext(dir, false);
      const f = failWrites(code, code === 'ENOSPC' ? 'writeSync' : 'openSync', /\/out\/\..*\.tmp$/);
      expect(await withFsOps(f.ops, () => runCli(['demo', '--out', 'out'], ctx))).toBe(2);
      expect(ctx.err.join('')).toMatch(ADVICE[code]!);
      expect(tempFiles(join(dir, 'out'))).toEqual([]);
      expect(readdirSync(join(dir, 'out')).filter((n) => n.endsWith('.lock'))).toEqual([]);
    });
  }

  it('memo: a full disk leaves the memo before it (or none) whole, and says "disk full"', async () => {
    const { dir, file } = await plannedTest();
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', 't1.tolrate.json'], ctx)).toBe(0);
    const before = readFileSync(join(dir, 't1.memo.docx'));
    const f = failWrites('ENOSPC', 'writeSync', /t1\.memo\.docx/);
    const ctx2 = captureContext(dir, false);
    expect(await withFsOps(f.ops, () => runCli(['memo', 't1.tolrate.json'], ctx2))).toBe(2);
    expect(ctx2.err.join('')).toMatch(/Cannot write the memo .*t1\.memo\.docx: disk full/);
    expect(ctx2.out.join('')).not.toContain('Memo written');
    expect(readFileSync(join(dir, 't1.memo.docx')).equals(before)).toBe(true);
    expect(tempFiles(dir)).toEqual([]);
    // memo only reads the workpaper: it takes no lock.
    expect(existsSync(lockPathFor(file))).toBe(false);
  });

  it('memo and reperform read a workpaper that another session has open (no lock needed to read); memo then does not record itself in it', async () => {
    const { dir, file } = await plannedTest();
    const { acquireLock } = await import('../../src/io/lock.js');
    const lock = acquireLock(file);
    try {
      expect(await runCli(['reperform', 't1.tolrate.json'], captureContext(dir, false))).toBe(0);
      const before = readFileSync(file);
      const m = captureContext(dir, false);
      expect(await runCli(['memo', 't1.tolrate.json'], m)).toBe(0);
      // Recording the memo in the workpaper is a save: not while another session has it open.
      expect(m.text()).toMatch(/Not recorded in the workpaper: t1\.tolrate\.json is open in another session/);
      expect(readFileSync(file).equals(before)).toBe(true);
    } finally {
      lock.release();
    }
  });

  it('the interview in a folder where nothing can be written: refused at the start (nothing typed is lost), or shown read-only', async () => {
    // The case found: in a read-only folder the typed answer was lost with "internal error".
    const { dir, file } = await plannedTest();
    const before = readFileSync(file);
    const f = failWrites('EACCES', 'openSync', /t1\.tolrate\.json(\.lock|\..*\.tmp)$/);
    const err = await withFsOps(f.ops, () => record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'open.locked.readOnly': false }), { now: fixedClock() }).catch((e: unknown) => e));
    expect((err as Error).message).toMatch(/Cannot write the lock file .*t1\.tolrate\.json\.lock: permission denied/);
    const ctx = captureContext(dir);
    expect(await withFsOps(f.ops, () => record(['t1.tolrate.json'], ctx, new ScriptedAsker({ 'open.locked.readOnly': true }), { now: fixedClock() }))).toBe(0);
    expect(ctx.text()).toContain('Nothing was saved (read-only).');
    expect(readFileSync(file).equals(before)).toBe(true);
  });
});
