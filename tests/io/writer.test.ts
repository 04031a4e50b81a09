/**
 * The one file writer (src/io/write.ts) under faults: a short write, ENOSPC, EACCES and EROFS at
 * each file-system call of a save; the old file kept, no temporary file left, a message saying
 * what to do. Also: mode kept, a symbolic link kept, stale temporary files found, fsync of the
 * file and of its folder.
 *
 * The errno codes and their meanings are the POSIX ones (The Open Group Base Specifications,
 * <errno.h>); that write(2) may write fewer bytes than asked without an error is POSIX too.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { chmodSync, lstatSync, mkdtempSync, readFileSync, readlinkSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { FileSystemError } from '../../src/errors.js';
import { withFsOps } from '../../src/io/fs.js';
import { staleTempFiles, writeFileSafely } from '../../src/io/write.js';
import { shortWrites, tempFiles, tracing } from './faults.js';

const dir = () => mkdtempSync(join(tmpdir(), 'tolrate-io-'));
const OLD = `${JSON.stringify({ old: true, pad: 'x'.repeat(5000) })}\n`;
const NEW = Buffer.from(`${JSON.stringify({ new: true, pad: 'y'.repeat(400_000) })}\n`);

// These tests check the fsync path, so the suite's TOLRATE_TEST_NO_FSYNC is turned off here.
let saved: string | undefined;
beforeEach(() => {
  saved = process.env.TOLRATE_TEST_NO_FSYNC;
  delete process.env.TOLRATE_TEST_NO_FSYNC;
});
afterEach(() => {
  if (saved === undefined) delete process.env.TOLRATE_TEST_NO_FSYNC;
  else process.env.TOLRATE_TEST_NO_FSYNC = saved;
});

const ADVICE: Record<string, RegExp> = {
  ENOSPC: /disk full/,
  EACCES: /permission denied/,
  EROFS: /read-only/,
};

describe('writeFileSafely', () => {
  it('writes the whole file, flushes the file and then its folder, and leaves nothing else', async () => {
    const d = dir();
    const p = join(d, 'w.json');
    writeFileSync(p, OLD);
    const t = tracing();
    await withFsOps(t.ops, () => writeFileSafely(p, NEW));
    expect(readFileSync(p).equals(NEW)).toBe(true);
    expect(tempFiles(d)).toEqual([]);
    const names = t.calls.map((c) => c.name);
    // The file is flushed before the rename, the folder after it.
    expect(names.indexOf('fsyncSync')).toBeLessThan(names.indexOf('renameSync'));
    expect(names.lastIndexOf('fsyncSync')).toBeGreaterThan(names.indexOf('renameSync'));
    expect(t.calls.filter((c) => c.name === 'fsyncSync').map((c) => c.path)).toEqual([expect.stringMatching(/\.tmp$/), d]);
  });

  it('skips fsync only under TOLRATE_TEST_NO_FSYNC=1', async () => {
    const d = dir();
    process.env.TOLRATE_TEST_NO_FSYNC = '1';
    const t = tracing();
    await withFsOps(t.ops, () => writeFileSafely(join(d, 'a'), 'x'));
    expect(t.calls.some((c) => c.name === 'fsyncSync')).toBe(false);
  });

  it('a short write (fewer bytes written than asked, no error) keeps the old file and says "disk full"', async () => {
    // The case found: 167,936 of 400,000 bytes written and the short file renamed over the good one.
    const d = dir();
    const p = join(d, 'w.json');
    writeFileSync(p, OLD);
    let err: unknown;
    await withFsOps(shortWrites(/\.tmp$/, 167_936), () => {
      try {
        writeFileSafely(p, NEW, { what: 'the workpaper' });
      } catch (e) {
        err = e;
      }
    });
    expect(err).toBeInstanceOf(FileSystemError);
    expect((err as Error).message).toMatch(/^Cannot write the workpaper .*w\.json: disk full/);
    expect(readFileSync(p, 'utf8')).toBe(OLD);
    expect(tempFiles(d)).toEqual([]);
  });

  it('writes in pieces when each write takes only part (and still gets every byte)', async () => {
    const d = dir();
    const p = join(d, 'w.json');
    await withFsOps(shortWrites(/\.tmp$/, Infinity, 1000), () => writeFileSafely(p, NEW));
    expect(readFileSync(p).equals(NEW)).toBe(true);
  });

  // Every call of a save, failed in turn with each error: the trace of a good save gives the calls.
  const probe = (() => {
    const d = dir();
    const p = join(d, 'w.json');
    writeFileSync(p, OLD);
    return { d, p };
  })();

  for (const code of ['ENOSPC', 'EACCES', 'EROFS']) {
    it(`${code} at each call of a save: the old file is kept whole, no temporary file is left, the message says what to do`, async () => {
      const first = tracing();
      await withFsOps(first.ops, () => writeFileSafely(probe.p, NEW));
      const failable = first.calls.map((c, i) => ({ c, i })).filter(({ c }) => c.name !== 'closeSync');
      expect(failable.length).toBeGreaterThanOrEqual(7);
      for (const { c, i } of failable) {
        const d = dir();
        const p = join(d, 'w.json');
        writeFileSync(p, OLD);
        chmodSync(p, 0o640);
        let failedAt = -1;
        const t = tracing((call, j) => {
          if (j === i && call.name === c.name) {
            failedAt = j;
            return code;
          }
          return undefined;
        });
        let err: unknown;
        await withFsOps(t.ops, () => {
          try {
            writeFileSafely(p, NEW, { what: 'the workpaper' });
          } catch (e) {
            err = e;
          }
        });
        expect(failedAt, `call ${i} (${c.name}) was made`).toBe(i);
        const now = readFileSync(p);
        const renamed = t.calls.slice(0, i).some((x) => x.name === 'renameSync');
        if (renamed) {
          // After the rename only the folder's flush is left: the new file is whole and in place.
          expect(err).toBeUndefined();
          expect(now.equals(NEW)).toBe(true);
        } else {
          expect(err, `${code} at ${c.name}`).toBeInstanceOf(FileSystemError);
          expect((err as FileSystemError).errno).toBe(code);
          expect((err as Error).message).toMatch(ADVICE[code]!);
          expect(now.toString('utf8')).toBe(OLD);
        }
        expect(statSync(p).mode & 0o777).toBe(0o640);
        expect(tempFiles(d), `no temporary file after ${code} at ${c.name}`).toEqual([]);
      }
    });
  }

  it('keeps the mode of the file it replaces (a 0600 workpaper stays 0600)', () => {
    const d = dir();
    const p = join(d, 'w.json');
    writeFileSync(p, OLD);
    chmodSync(p, 0o600);
    writeFileSafely(p, NEW);
    expect(statSync(p).mode & 0o777).toBe(0o600);
  });

  it('writes the target of a symbolic link and leaves the link a link', () => {
    const d = dir();
    const real = join(d, 'real.json');
    const link = join(d, 'link.json');
    writeFileSync(real, OLD);
    symlinkSync('real.json', link);
    const got = writeFileSafely(link, NEW);
    expect(got.path).toBe(real);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readlinkSync(link)).toBe('real.json');
    expect(readFileSync(real).equals(NEW)).toBe(true);
  });

  it('refuses a folder as the target, with the reason', () => {
    const d = dir();
    expect(() => writeFileSafely(d, 'x', { what: 'the memo' })).toThrow(/is a folder/);
  });

  it('finds the temporary files a killed save left (its own name pattern, a process no longer running)', () => {
    const d = dir();
    const p = join(d, 'w.tolrate.json');
    writeFileSync(p, OLD);
    // A process id above the kernel's pid_max (4,194,304 at most on Linux) is never running.
    writeFileSync(join(d, '.w.tolrate.json.99999999.0123abcd.tmp'), OLD.slice(0, 100));
    writeFileSync(join(d, `.w.tolrate.json.${process.pid}.0123abcd.tmp`), 'ours, in progress');
    writeFileSync(join(d, '.other.json.99999999.0123abcd.tmp'), 'not this file');
    expect(staleTempFiles(p).map((t) => t.path)).toEqual([join(d, '.w.tolrate.json.99999999.0123abcd.tmp')]);
  });
});
