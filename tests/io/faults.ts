/**
 * Fault injection for the file-system calls of src/io/fs.ts, without root: make the n-th call of
 * a kind fail with a system error, or make writes short, while the others go to the real calls.
 */
import { readdirSync } from 'node:fs';
import { errnoError, realFsOps, type FsOps } from '../../src/io/fs.js';

export type CallName = keyof FsOps;

export interface Call {
  name: CallName;
  /** The path, or the path the fd was opened with. */
  path: string;
}

/** Wrap every call: record it, and let `fail` decide to throw instead (return an errno code). */
export function tracing(fail?: (c: Call, index: number) => string | undefined): { ops: Partial<FsOps>; calls: Call[] } {
  const calls: Call[] = [];
  const fdPath = new Map<number, string>();
  const step = (c: Call): void => {
    const i = calls.length;
    calls.push(c);
    const code = fail?.(c, i);
    if (code) throw errnoError(code, c.name.replace(/Sync$/, ''), c.path);
  };
  const ops: Partial<FsOps> = {
    openSync: (p, f, m) => {
      step({ name: 'openSync', path: p });
      const fd = realFsOps.openSync(p, f, m);
      fdPath.set(fd, p);
      return fd;
    },
    writeSync: (fd, b, o, l, p) => {
      step({ name: 'writeSync', path: fdPath.get(fd) ?? `fd ${fd}` });
      return realFsOps.writeSync(fd, b, o, l, p);
    },
    fsyncSync: (fd) => {
      step({ name: 'fsyncSync', path: fdPath.get(fd) ?? `fd ${fd}` });
      realFsOps.fsyncSync(fd);
    },
    fchmodSync: (fd, m) => {
      step({ name: 'fchmodSync', path: fdPath.get(fd) ?? `fd ${fd}` });
      realFsOps.fchmodSync(fd, m);
    },
    fstatSync: (fd) => {
      step({ name: 'fstatSync', path: fdPath.get(fd) ?? `fd ${fd}` });
      return realFsOps.fstatSync(fd);
    },
    closeSync: (fd) => {
      // A close is recorded but never failed: the writer closes in its clean-up too.
      calls.push({ name: 'closeSync', path: fdPath.get(fd) ?? `fd ${fd}` });
      fdPath.delete(fd);
      realFsOps.closeSync(fd);
    },
    renameSync: (a, b) => {
      step({ name: 'renameSync', path: a });
      realFsOps.renameSync(a, b);
    },
  };
  return { ops, calls };
}

/**
 * Writes to files whose path matches `match` write at most `max` bytes per call, and nothing once
 * `budget` bytes are written (a nearly full disk: short writes, no error).
 */
export function shortWrites(match: RegExp, budget: number, max = 4096): Partial<FsOps> {
  const fdPath = new Map<number, string>();
  let left = budget;
  return {
    openSync: (p, f, m) => {
      const fd = realFsOps.openSync(p, f, m);
      fdPath.set(fd, p);
      return fd;
    },
    writeSync: (fd, b, o, l, p) => {
      if (!match.test(fdPath.get(fd) ?? '')) return realFsOps.writeSync(fd, b, o, l, p);
      const n = Math.max(0, Math.min(l, max, left));
      left -= n;
      return n === 0 ? 0 : realFsOps.writeSync(fd, b, o, n, p);
    },
  };
}

/** Temporary files of the writer left in `dir`. */
export function tempFiles(dir: string): string[] {
  return readdirSync(dir).filter((n) => /\.tmp$/.test(n));
}
